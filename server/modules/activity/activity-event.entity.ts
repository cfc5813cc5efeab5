import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import { Bench } from '../benches/bench.entity';
import { User } from '../users/user.entity';

/** One line of a bench's activity log. `summary` is written for people when the event happens. */
export class ActivityEvent {
  [OptionalProps]?: 'id' | 'createdAt';
  id: string = randomUUID();
  bench!: Bench;
  actor!: User | null;
  kind!: string;
  summary!: string;
  createdAt: Date = new Date();
}

export const ActivityEventSchema = new EntitySchema<ActivityEvent>({
  class: ActivityEvent,
  tableName: 'activity_events',
  indexes: [{ properties: ['bench', 'createdAt'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    actor: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    kind: { type: 'string', length: 64 },
    summary: { type: 'text' },
    createdAt: { type: 'datetime' },
  },
});
