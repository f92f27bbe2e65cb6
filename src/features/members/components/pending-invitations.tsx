import type { PendingInvitation } from '../../../../shared/api/members.ts';
import { RoleBadge } from '@/components/role-badge';

/** Invitations sent and not yet accepted (the server lists them to managers only). */
export function PendingInvitations({ invitations }: { invitations: PendingInvitation[] }) {
  return (
    <ul className="divide-y divide-slate-100 text-sm" aria-label="Pending invitations">
      {invitations.map((i) => (
        <li key={i.id} className="flex flex-wrap items-center justify-between gap-2 py-2" data-testid="invitation-row">
          <span className="font-medium text-slate-800">{i.email}</span>
          <span className="flex items-center gap-3 text-slate-500">
            <RoleBadge role={i.role} />
            until {new Date(i.expiresAt).toLocaleDateString()}
          </span>
        </li>
      ))}
    </ul>
  );
}
