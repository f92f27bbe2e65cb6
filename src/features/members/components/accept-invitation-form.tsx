import { useState, type FormEvent } from 'react';
import { nameSchema, passwordSchema, type InvitationPreview } from '../../../../shared/api/members.ts';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { ErrorAlert } from '@/components/alert';
import { ApiError, fieldErrorsFromDetails } from '@/lib/api-client';
import { useAcceptInvitation } from '../api/accept-invitation';

export interface AcceptInvitationFormProps {
  token: string;
  invitation: InvitationPreview;
  /** Whether someone is signed in (an existing account accepts without name and password). */
  signedIn: boolean;
  onAccepted: () => void;
}

/** Name + password for a new account, or a single button for a signed-in existing account. */
export function AcceptInvitationForm({ token, invitation, signedIn, onAccepted }: AcceptInvitationFormProps) {
  const accept = useAcceptInvitation(token);
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const needsAccount = !(invitation.accountExists && signedIn);

  const serverFieldErrors =
    accept.error instanceof ApiError && accept.error.status === 400 ? fieldErrorsFromDetails(accept.error.details) : {};
  const shown = { ...serverFieldErrors, ...errors };

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    if (!needsAccount) {
      accept.mutate({}, { onSuccess: onAccepted });
      return;
    }
    const next: Record<string, string> = {};
    const n = nameSchema.safeParse(name);
    if (!n.success) next.name = n.error.issues[0].message;
    const p = passwordSchema.safeParse(password);
    if (!p.success) next.password = p.error.issues[0].message;
    setErrors(next);
    if (Object.keys(next).length) return;
    accept.mutate({ name: n.data, password: p.data }, { onSuccess: onAccepted });
  };

  return (
    <form noValidate onSubmit={handleSubmit} aria-label="Accept invitation" className="flex flex-col gap-4">
      {needsAccount ? (
        <>
          <TextField label="E-mail" value={invitation.email} readOnly disabled />
          <TextField label="Your name" name="name" autoComplete="name" value={name} error={shown.name} onChange={(e) => setName(e.target.value)} />
          <TextField
            label="Choose a password"
            name="password"
            type="password"
            autoComplete="new-password"
            hint="At least 10 characters"
            value={password}
            error={shown.password}
            onChange={(e) => setPassword(e.target.value)}
          />
        </>
      ) : null}
      <ErrorAlert error={Object.keys(serverFieldErrors).length ? null : accept.error} title="The invitation was not accepted" />
      <Button type="submit" pending={accept.isPending}>
        {needsAccount ? 'Create account and join' : 'Join instrument'}
      </Button>
    </form>
  );
}
