/**
 * Apply workers: pg-boss `work` loops on `orderly-apply`, one job per fetch so several processes
 * share a run frame by frame. Each worker process has an id (host:pid:random) recorded on every
 * item it takes.
 */
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import type PgBoss from 'pg-boss';
import type { SpectraDeps } from '../spectra/service.ts';
import { APPLY_QUEUE, type ApplyJobData } from './queue.ts';
import { processApplyItem } from './service.ts';

export function newWorkerId(): string {
  return `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
}

export interface ApplyWorkers {
  workerId: string;
  stop(): Promise<void>;
}

/**
 * @param concurrency parallel work loops in this process (each fetches one job at a time).
 * @param pollingIntervalSeconds how often an idle loop asks for work (pg-boss minimum 0.5 s).
 */
export async function startApplyWorkers(
  deps: SpectraDeps,
  boss: PgBoss,
  options: { concurrency?: number; workerId?: string; pollingIntervalSeconds?: number } = {},
): Promise<ApplyWorkers> {
  const workerId = options.workerId ?? newWorkerId();
  const ids: string[] = [];
  for (let k = 0; k < (options.concurrency ?? 1); k++) {
    const id = await boss.work<ApplyJobData>(
      APPLY_QUEUE,
      { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: options.pollingIntervalSeconds ?? 0.5 },
      async (jobs) => {
        for (const job of jobs) {
          await processApplyItem(deps, job.data.runItemId, workerId, { retryCount: job.retryCount, retryLimit: job.retryLimit });
        }
      },
    );
    ids.push(id);
  }
  return {
    workerId,
    async stop() {
      for (const id of ids) await boss.offWork({ id });
    },
  };
}
