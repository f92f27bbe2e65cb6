import { roles, type Member, type Role } from '../../../../shared/api/members.ts';
import { Button } from '@/components/button';
import { RoleBadge } from '@/components/role-badge';
import { ErrorAlert } from '@/components/alert';
import { useUpdateMemberRole } from '../api/update-member-role';
import { useRemoveMember } from '../api/remove-member';

export interface MembersTableProps {
  instrumentId: string;
  members: Member[];
  /** Show role and remove controls (admin or owner). Only hides them: the server decides. */
  canManage: boolean;
  currentUserId?: string;
}

/** Members with their roles; managers get a role select and a remove button per row. */
export function MembersTable({ instrumentId, members, canManage, currentUserId }: MembersTableProps) {
  const updateRole = useUpdateMemberRole(instrumentId);
  const remove = useRemoveMember(instrumentId);

  return (
    <div className="flex flex-col gap-3">
      <ErrorAlert error={updateRole.error} title="The role was not changed" />
      <ErrorAlert error={remove.error} title="The member was not removed" />
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="min-w-full divide-y divide-slate-200 text-sm">
          <thead className="bg-slate-50 text-left text-xs font-semibold tracking-wide text-slate-500 uppercase">
            <tr>
              <th scope="col" className="px-4 py-3">Name</th>
              <th scope="col" className="px-4 py-3">E-mail</th>
              <th scope="col" className="px-4 py-3">Role</th>
              {canManage ? <th scope="col" className="px-4 py-3"><span className="sr-only">Actions</span></th> : null}
            </tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {members.map((member) => (
              <tr key={member.userId} data-testid="member-row">
                <td className="px-4 py-3 font-medium text-slate-900">
                  {member.name}
                  {member.userId === currentUserId ? <span className="ml-2 text-xs text-slate-500">(you)</span> : null}
                </td>
                <td className="px-4 py-3 text-slate-600">{member.email}</td>
                <td className="px-4 py-3">
                  {canManage ? (
                    <select
                      aria-label={`Role of ${member.name}`}
                      className="rounded-md border border-slate-300 bg-white px-2 py-1 text-sm focus:outline-2 focus:outline-accent-600"
                      value={member.role}
                      disabled={updateRole.isPending}
                      onChange={(e) => updateRole.mutate({ userId: member.userId, role: e.target.value as Role })}
                    >
                      {roles.map((r) => (
                        <option key={r} value={r}>
                          {r}
                        </option>
                      ))}
                    </select>
                  ) : (
                    <RoleBadge role={member.role} />
                  )}
                </td>
                {canManage ? (
                  <td className="px-4 py-3 text-right">
                    <Button
                      variant="danger"
                      className="px-2.5 py-1 text-xs"
                      pending={remove.isPending && remove.variables === member.userId}
                      onClick={() => {
                        if (window.confirm(`Remove ${member.name} from this instrument?`)) remove.mutate(member.userId);
                      }}
                    >
                      Remove
                    </Button>
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
