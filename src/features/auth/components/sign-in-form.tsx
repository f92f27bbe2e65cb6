import { useState, type FormEvent } from 'react';
import { signInSchema } from '../../../../shared/api/session.ts';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { Alert } from '@/components/alert';
import { ApiError } from '@/lib/api-client';
import { useSignIn } from '../api/sign-in';

/**
 * The API's message for a failed sign-in. A 429 always reads as a rate limit, whatever body the
 * limiter sent (the api client supplies a plain message when it sent none).
 */
export function signInErrorMessage(error: unknown): string {
  if (error instanceof ApiError) {
    return error.message;
  }
  return 'Could not reach the server. Check the connection and try again.';
}

/** E-mail + password. Calls `onSignedIn` once the new session is in the cache. */
export function SignInForm({ onSignedIn }: { onSignedIn: () => void }) {
  const signIn = useSignIn();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = signInSchema.safeParse({ email, password });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.map(String).join('.'), i.message])));
      return;
    }
    setErrors({});
    signIn.mutate(parsed.data, { onSuccess: onSignedIn });
  };

  return (
    <form noValidate onSubmit={handleSubmit} aria-label="Sign in" className="flex flex-col gap-4">
      {signIn.error ? (
        <Alert title={signIn.error instanceof ApiError && signIn.error.status === 429 ? 'Too many sign-in attempts' : 'Not signed in'}>
          {signInErrorMessage(signIn.error)}
        </Alert>
      ) : null}
      <TextField label="E-mail" name="email" type="email" autoComplete="username" value={email} error={errors.email} onChange={(e) => setEmail(e.target.value)} />
      <TextField label="Password" name="password" type="password" autoComplete="current-password" value={password} error={errors.password} onChange={(e) => setPassword(e.target.value)} />
      <Button type="submit" pending={signIn.isPending} className="w-full">
        Sign in
      </Button>
    </form>
  );
}
