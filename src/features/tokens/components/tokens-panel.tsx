import { useState, type FormEvent } from 'react';
import { createTokenSchema } from '../../../../shared/api/session.ts';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { Alert, ErrorAlert } from '@/components/alert';
import { EmptyState, Loading } from '@/components/page';
import { useTokens } from '../api/get-tokens';
import { useCreateToken } from '../api/create-token';
import { useRevokeToken } from '../api/revoke-token';

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : '—');

/** Personal API tokens: create (secret shown once), list, revoke. */
export function TokensPanel() {
  const tokens = useTokens();
  const create = useCreateToken();
  const revoke = useRevokeToken();
  const [name, setName] = useState('');
  const [nameError, setNameError] = useState<string>();

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    const parsed = createTokenSchema.safeParse({ name });
    if (!parsed.success) {
      setNameError(parsed.error.issues[0].message);
      return;
    }
    setNameError(undefined);
    create.mutate(parsed.data, { onSuccess: () => setName('') });
  };

  return (
    <div className="flex flex-col gap-5">
      <p className="text-sm text-slate-600">
        A token lets a script act as you: send it as <code className="rounded bg-slate-100 px-1">Authorization: Bearer &lt;token&gt;</code>.
        Revoke it when the script is retired.
      </p>
      <form noValidate onSubmit={handleSubmit} aria-label="Create API token" className="grid gap-3 sm:grid-cols-[1fr_auto] sm:items-start">
        <TextField label="Token name" name="tokenName" hint="e.g. acquisition PC, beamtime 2026-12" value={name} error={nameError} onChange={(e) => setName(e.target.value)} />
        <div className="sm:pt-6">
          <Button type="submit" pending={create.isPending}>
            Create token
          </Button>
        </div>
      </form>
      <ErrorAlert error={create.error} title="The token was not created" />
      {create.data ? (
        <Alert tone="success" title={`Token "${create.data.name}" created. Copy it now: it is shown only this once.`}>
          <code className="mt-1 block rounded bg-white px-2 py-1 font-mono text-xs break-all text-slate-900" data-testid="new-token">
            {create.data.token}
          </code>
        </Alert>
      ) : null}
      <ErrorAlert error={revoke.error} title="The token was not revoked" />
      {tokens.isPending ? (
        <Loading what="Loading tokens" />
      ) : tokens.isError ? (
        <ErrorAlert error={tokens.error} />
      ) : tokens.data.length === 0 ? (
        <EmptyState>No API tokens yet.</EmptyState>
      ) : (
        <div className="overflow-x-auto rounded-lg border border-slate-200">
          <table className="min-w-full divide-y divide-slate-200 text-sm">
            <thead className="bg-slate-50 text-left text-xs font-semibold tracking-wide text-slate-500 uppercase">
              <tr>
                <th scope="col" className="px-4 py-2">Name</th>
                <th scope="col" className="px-4 py-2">Created</th>
                <th scope="col" className="px-4 py-2">Last used</th>
                <th scope="col" className="px-4 py-2">State</th>
                <th scope="col" className="px-4 py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {tokens.data.map((t) => (
                <tr key={t.id} data-testid="token-row">
                  <td className="px-4 py-2 font-medium">{t.name}</td>
                  <td className="px-4 py-2 text-slate-600">{when(t.createdAt)}</td>
                  <td className="px-4 py-2 text-slate-600">{when(t.lastUsedAt)}</td>
                  <td className="px-4 py-2">{t.revokedAt ? <span className="text-slate-500">revoked {when(t.revokedAt)}</span> : 'active'}</td>
                  <td className="px-4 py-2 text-right">
                    {t.revokedAt ? null : (
                      <Button variant="danger" className="px-2.5 py-1 text-xs" pending={revoke.isPending && revoke.variables === t.id} onClick={() => revoke.mutate(t.id)}>
                        Revoke
                      </Button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
