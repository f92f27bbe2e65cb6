/**
 * The apply queue on pg-boss 10 (PostgreSQL-backed; schema `pgboss` in the app's database).
 * One job per run item; the job id is stored on the item so cancel can reach it. An active job
 * whose worker died is failed by pg-boss's maintenance after `expireInSeconds` and retried, so a
 * killed worker's frame is picked up by another worker.
 */
import PgBoss from 'pg-boss';

export const APPLY_QUEUE = 'orderly-apply';

export interface ApplyJobData {
  runItemId: string;
}

export interface ApplyQueue {
  enqueue(items: Array<{ itemId: string; jobId: string }>): Promise<void>;
  cancel(jobIds: string[]): Promise<void>;
}

export interface QueueOptions {
  databaseUrl: string;
  /** Seconds an active job may run before it counts as lost and is retried. */
  expireInSeconds: number;
  /** How often pg-boss looks for lost jobs. */
  maintenanceIntervalSeconds: number;
}

/** Retries after an unexpected error or a lost worker (engine errors fail the item at once). */
export const APPLY_RETRY_LIMIT = 3;

export async function startBoss(options: QueueOptions): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: options.databaseUrl,
    max: 4,
    schedule: false,
    maintenanceIntervalSeconds: options.maintenanceIntervalSeconds,
    monitorStateIntervalSeconds: 3600,
  });
  boss.on('error', (error: Error) => console.error('job queue error:', error.message));
  await boss.start();
  await boss.createQueue(APPLY_QUEUE, { name: APPLY_QUEUE, retryLimit: APPLY_RETRY_LIMIT, retryDelay: 1 });
  return boss;
}

export function pgBossQueue(boss: PgBoss, expireInSeconds: number): ApplyQueue {
  return {
    async enqueue(items) {
      if (items.length === 0) return;
      await boss.insert(
        items.map((i) => ({
          id: i.jobId,
          name: APPLY_QUEUE,
          data: { runItemId: i.itemId } satisfies ApplyJobData,
          retryLimit: APPLY_RETRY_LIMIT,
          retryDelay: 1,
          expireInSeconds,
        })),
      );
    },
    async cancel(jobIds) {
      if (jobIds.length > 0) await boss.cancel(APPLY_QUEUE, jobIds);
    },
  };
}
