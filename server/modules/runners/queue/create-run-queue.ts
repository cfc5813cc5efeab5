/** Picks the queue back-end from the configuration: BullMQ when QUEUE_URL is set, the embedded one otherwise. */
import type { Config } from '../../../config';
import { BullmqRunQueue } from './bullmq-run-queue';
import { EmbeddedRunQueue, type RunQueue } from './run-queue';

export function createRunQueue(config: Pick<Config, 'queueUrl'>): RunQueue {
  return config.queueUrl ? new BullmqRunQueue(config.queueUrl) : new EmbeddedRunQueue();
}
