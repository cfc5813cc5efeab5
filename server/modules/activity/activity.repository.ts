import type { EntityManager } from '@mikro-orm/core';
import type { ActivityEvent as ActivityEventDto, ActivityPage } from '../../../shared/api/types';
import type { Bench } from '../benches/bench.entity';
import type { User } from '../users/user.entity';
import { ActivityEvent } from './activity-event.entity';

export function toActivityDto(event: ActivityEvent): ActivityEventDto {
  return {
    id: event.id,
    kind: event.kind,
    actor: event.actor ? { id: event.actor.id, displayName: event.actor.displayName } : null,
    summary: event.summary,
    createdAt: event.createdAt.toISOString(),
  };
}

/** The activity log. Other modules record their own kinds (e.g. `corpus.uploaded`) through `record`. */
export class ActivityRepository {
  constructor(private readonly em: EntityManager) {}

  /** Adds an event to the unit of work; it is written by the caller's flush. */
  record(bench: Bench, actor: User | null, kind: string, summary: string, at: Date): ActivityEvent {
    return this.em.create(ActivityEvent, { bench, actor, kind, summary, createdAt: at });
  }

  async page(bench: Bench, limit: number, offset: number): Promise<ActivityPage> {
    const [events, total] = await this.em.findAndCount(
      ActivityEvent,
      { bench },
      { orderBy: { createdAt: 'desc', id: 'asc' }, limit, offset, populate: ['actor'] },
    );
    return { items: events.map(toActivityDto), total };
  }
}
