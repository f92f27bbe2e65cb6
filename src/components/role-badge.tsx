/** A small label for a role (or "site admin"); colours differ only in intensity, one accent. */
export function RoleBadge({ role }: { role: string | null | undefined }) {
  if (!role) return <span className="text-sm text-slate-400">—</span>;
  const strong = role === 'owner' || role === 'site admin';
  return (
    <span
      className={`inline-flex items-center rounded-full px-2 py-0.5 text-xs font-medium ${
        strong ? 'bg-accent-100 text-accent-800' : 'bg-slate-100 text-slate-700'
      }`}
    >
      {role}
    </span>
  );
}
