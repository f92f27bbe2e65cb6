import type { VersionState } from '../../../../shared/api/versions.ts';
import { STATE_STYLE } from '../lib/version-permissions.ts';

/** A version's state as a small coloured label. */
export function VersionStateBadge({ state }: { state: VersionState }) {
  const style = STATE_STYLE[state];
  return <span className={`inline-flex items-center rounded-full px-2 py-0.5 text-xs font-medium ring-1 ${style.className}`} data-testid="version-state">{style.label}</span>;
}
