/**
 * Every entity schema the ORM knows. A new server module appends its schemas here
 * (and its migration to `migrations.ts`), see DEVELOPERS.md "Adding a server module".
 */
import type { EntitySchema } from '@mikro-orm/core';
import { ActivityEventSchema } from '../modules/activity/activity-event.entity';
import { PasswordResetTokenSchema } from '../modules/auth/password-reset-token.entity';
import { BenchSchema } from '../modules/benches/bench.entity';
import { CorpusWordSchema } from '../modules/corpora/corpus-word.entity';
import { CorpusSchema } from '../modules/corpora/corpus.entity';
import { EvaluationSchema } from '../modules/evaluations/evaluation.entity';
import { GridSchema } from '../modules/grids/grid.entity';
import { ReportSchema } from '../modules/reports/report.entity';
import { MembershipSchema } from '../modules/benches/membership.entity';
import { InvitationSchema } from '../modules/invitations/invitation.entity';
import { CheckpointSchema, MetricPointSchema, RunSchema } from '../modules/runs/run-entities';
import { UserSchema } from '../modules/users/user.entity';
import { RunnerSchema } from '../modules/runners/runner.entity';
import { EvaluationRequestSchema } from '../modules/evaluation-jobs/evaluation-request.entity';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export const entities: EntitySchema<any, never>[] = [
  UserSchema,
  PasswordResetTokenSchema,
  BenchSchema,
  MembershipSchema,
  InvitationSchema,
  ActivityEventSchema,
  CorpusSchema,
  CorpusWordSchema,
  RunSchema,
  MetricPointSchema,
  CheckpointSchema,
  GridSchema,
  EvaluationSchema,
  ReportSchema,
  RunnerSchema,
  EvaluationRequestSchema,
];
