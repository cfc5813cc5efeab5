/** The runs module's entity schemas, in one import for server/db/entities.ts. */
export { CheckpointSchema } from './checkpoint.entity';
export { MetricPointSchema } from './metric-point.entity';
export { RunSchema } from './run.entity';
