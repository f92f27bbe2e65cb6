import { useState, type FormEvent } from 'react';
import { createInvitationSchema, roles, type Role } from '../../../../shared/api/members.ts';
import { Button } from '@/components/button';
import { SelectField, TextField } from '@/components/field';
import { Alert, ErrorAlert } from '@/components/alert';
import { ApiError, fieldErrorsFromDetails } from '@/lib/api-client';
import { useInviteMember } from '../api/invite-member';

/** Invite by e-mail with a role; the server mails a one-time link valid for 7 days. */
export function InviteForm({ instrumentId }: { instrumentId: string }) {
  const invite = useInviteMember(instrumentId);
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('scientist');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const serverFieldErrors =
    invite.error instanceof ApiError && invite.error.status === 400 ? fieldErrorsFromDetails(invite.error.details) : {};
  const shown = { ...serverFieldErrors, ...errors };

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = createInvitationSchema.safeParse({ email, role });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.map(String).join('.'), i.message])));
      return;
    }
    setErrors({});
    invite.mutate(parsed.data, { onSuccess: () => setEmail('') });
  };

  return (
    <form noValidate onSubmit={handleSubmit} aria-label="Invite a member" className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-[1fr_12rem_auto] sm:items-start">
        <TextField label="E-mail" name="email" type="email" autoComplete="off" value={email} error={shown.email} onChange={(e) => setEmail(e.target.value)} />
        <SelectField
          label="Role"
          name="role"
          value={role}
          error={shown.role}
          onChange={(e) => setRole(e.target.value as Role)}
          options={roles.map((r) => ({ value: r, label: r }))}
        />
        <div className="sm:pt-6">
          <Button type="submit" pending={invite.isPending}>
            Send invitation
          </Button>
        </div>
      </div>
      {invite.isSuccess ? (
        <Alert tone="success">
          Invitation sent to {invite.data.email} as {invite.data.role}. The link is valid until{' '}
          {new Date(invite.data.expiresAt).toLocaleDateString()}.
        </Alert>
      ) : null}
      <ErrorAlert error={Object.keys(serverFieldErrors).length ? null : invite.error} title="The invitation was not sent" />
    </form>
  );
}
