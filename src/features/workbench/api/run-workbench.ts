import { useMutation } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { WorkbenchRun, WorkbenchRunInput } from '../../../../shared/api/workbench.ts';
import { api } from '@/lib/api-client';

/** POST /api/instruments/:instrumentId/workbench/runs — the engine runs on the server (synchronous, ~0.5 s). */
export function runWorkbench(instrumentId: string, input: WorkbenchRunInput): Promise<WorkbenchRun> {
  return api.post<WorkbenchRun>(paths.workbenchRuns(instrumentId), input);
}

/** Starts a run; the result is the mutation's data (a run is a record, not a cached query). */
export function useRunWorkbench(instrumentId: string) {
  return useMutation({ mutationFn: (input: WorkbenchRunInput) => runWorkbench(instrumentId, input) });
}
