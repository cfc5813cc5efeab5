import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';

/** A team space. Bench-scoped tables of later modules reference `benches.id` with ON DELETE CASCADE. */
export class Bench {
  [OptionalProps]?: 'id' | 'description' | 'createdAt' | 'updatedAt';
  id: string = randomUUID();
  name!: string;
  description = '';
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const BenchSchema = new EntitySchema<Bench>({
  class: Bench,
  tableName: 'benches',
  properties: {
    id: { type: 'uuid', primary: true },
    name: { type: 'string', length: 80 },
    description: { type: 'text', default: '' },
    createdAt: { type: 'datetime' },
    updatedAt: { type: 'datetime', onUpdate: () => new Date() },
  },
});
