/**
 * The spectra of an instrument as a list (`GET /api/instruments/:instrumentId/spectra[?stale=true]`):
 * which frame, which version made it, whether that version was superseded or withdrawn since
 * (stale), and the drift flag. The numbers themselves come from the frame's spectrum route.
 */
import { z } from 'zod';

export const listSpectraQuerySchema = z.object({
  stale: z.enum(['true', 'false'], { error: 'stale must be true or false' }).optional(),
  limit: z.coerce.number({ error: 'limit must be a whole number' }).int({ message: 'limit must be a whole number' }).min(1, { message: 'limit must be ≥ 1' }).max(1000, { message: 'limit must be ≤ 1000' }).default(200),
});

export interface SpectrumSummary {
  id: string;
  frameId: string;
  frameName: string;
  takenAt: string;
  versionId: string;
  version: number;
  versionState: string;
  stale: boolean;
  driftFlagged: boolean;
  createdAt: string;
  updatedAt: string;
}

export interface SpectrumList {
  items: SpectrumSummary[];
  /** Stale spectra of frames that have no fresh spectrum: what one re-apply redoes. */
  staleFrames: number;
}
