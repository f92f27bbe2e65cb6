/** The queue an app gets when none was started (e.g. API tests of other resources): runs answer 503. */
import { HttpError } from '../../lib/errors.ts';
import type { ApplyQueue } from './queue.ts';

export const unavailableQueue: ApplyQueue = {
  async enqueue() {
    throw new HttpError(503, 'internal', 'The job queue is not running on this server; runs cannot start.');
  },
  async cancel() {
    // Nothing was queued here, so there is nothing to cancel.
  },
};
