/**
 * Server-side checks of uploaded checkpoint files: the bytes must decode with the model core's
 * `decodeCheckpoint`, the weights must have exactly the shapes the stored settings imply, and (for an
 * upload to an existing run) family, alphabet and model settings must be the run's. Every refusal is a
 * 422 with a sentence that says what is wrong and what to do; nothing is stored by these functions.
 */
import { ErrorCode } from '../../../shared/api/errors';
import {
  gruModelSchema,
  ngramModelSchema,
  ssmModelSchema,
  trainingSchema,
  type RunFamily,
  type RunSettings,
} from '../../../shared/api/runs';
import { CheckpointError, decodeCheckpoint, type Checkpoint } from '../../../shared/model/checkpoint';
import { gruSpecs, type GruSettings } from '../../../shared/model/gru-lm';
import { KneserNeyModel } from '../../../shared/model/ngram-kn';
import { checkWeightShapes, WeightShapeError } from '../../../shared/model/params';
import { checkSsmCheckpoint } from '../../../shared/model/ssm-checkpoint';
import { HttpError } from '../../http-error';
import { FAMILY_LABELS } from './run-settings';


export const unusable = (message: string) => new HttpError(422, ErrorCode.CheckpointUnusable, message);

/** The model part of a run's settings as the checkpoint describes it (validated). */
export type CheckpointModel =
  | { family: 'ssm'; model: ReturnType<typeof ssmModelSchema.parse> }
  | { family: 'gru'; model: ReturnType<typeof gruModelSchema.parse> }
  | { family: 'ngram'; model: ReturnType<typeof ngramModelSchema.parse> };

/** Decodes the bytes and checks the checkpoint is complete and self-consistent. */
export function readCheckpoint(bytes: Uint8Array): { checkpoint: Checkpoint; model: CheckpointModel } {
  if (bytes.length === 0) throw unusable('The checkpoint file is empty; choose a .nwck file exported from Noisewright.');
  let checkpoint: Checkpoint;
  try {
    checkpoint = decodeCheckpoint(bytes);
  } catch (e) {
    if (e instanceof CheckpointError) throw unusable(e.message);
    throw e;
  }
  try {
    return { checkpoint, model: modelOf(checkpoint) };
  } catch (e) {
    if (e instanceof CheckpointError || e instanceof WeightShapeError) throw unusable(e.message);
    if (e instanceof HttpError) throw e;
    throw unusable(`The checkpoint's model settings are damaged: ${(e as Error).message}`);
  }
}

function modelOf(ck: Checkpoint): CheckpointModel {
  if (ck.family === 'ssm') {
    const s = checkSsmCheckpoint(ck);
    const model = ssmModelSchema.parse({
      stateSize: s.stateSize,
      generativeFlow: s.generativeFlow.map((l) => ({ kind: l.kind })),
      inferenceFlow: s.inferenceFlow.map((l) => ({ kind: l.kind })),
      flowHidden: s.flowHidden,
      observationHidden: s.observationHidden,
      embeddingSize: s.embeddingSize,
      encoderSize: s.encoderSize,
      proposalHidden: s.proposalHidden,
    });
    return { family: 'ssm', model };
  }
  if (ck.family === 'gru') {
    const s = ck.settings as GruSettings;
    const parsed = gruModelSchema.safeParse({ stateSize: s?.stateSize, embeddingSize: s?.embeddingSize, observationHidden: s?.observationHidden });
    if (!parsed.success) throw unusable(`The checkpoint's GRU settings are invalid: ${parsed.error.issues[0]?.message ?? 'unknown problem'}`);
    if (s.vocabSize !== ck.alphabet.length + 1) {
      throw unusable(`The checkpoint's alphabet has ${ck.alphabet.length} characters but its model expects ${s.vocabSize - 1}; export it again.`);
    }
    checkWeightShapes(gruSpecs({ ...parsed.data, vocabSize: s.vocabSize }), ck.weights, 'checkpoint');
    return { family: 'gru', model: parsed.data };
  }
  const ngram = KneserNeyModel.fromJSON(ck.settings);
  if (ngram.chars.join('\u0000') !== ck.alphabet.join('\u0000')) {
    throw unusable('The n-gram model inside the checkpoint was fitted on another alphabet than the one stored with it; export it again.');
  }
  if (Object.keys(ck.weights).length > 0) throw unusable('An n-gram checkpoint carries its counts in the settings block, not as weights; export it again.');
  return { family: 'ngram', model: ngramModelSchema.parse({ order: ngram.order, discount: ngram.fixedDiscount }) };
}

function describeDifference(a: Record<string, unknown>, b: Record<string, unknown>): string | null {
  for (const key of Object.keys(b)) {
    const x = JSON.stringify(a[key]);
    const y = JSON.stringify(b[key]);
    if (x !== y) return `${key} is ${x} in the checkpoint but ${y} in this run`;
  }
  return null;
}

/** Checks a decoded checkpoint against the run it is uploaded to. */
export function checkFitsRun(
  found: { checkpoint: Checkpoint; model: CheckpointModel },
  run: { family: RunFamily; settings: RunSettings; alphabet: string[] },
): void {
  const { checkpoint } = found;
  if (checkpoint.family !== run.family) {
    throw unusable(
      `This checkpoint holds a ${FAMILY_LABELS[checkpoint.family]}, but this run trains a ${FAMILY_LABELS[run.family]}; ` +
        'upload it to a run of the same kind, or import it as a new run.',
    );
  }
  if (checkpoint.alphabet.join('\u0000') !== run.alphabet.join('\u0000')) {
    throw unusable(
      `The checkpoint's alphabet (${checkpoint.alphabet.length} characters) differs from this run's (${run.alphabet.length}); ` +
        'it was trained on another corpus: import it as a new run instead.',
    );
  }
  const difference = describeDifference(found.model.model as Record<string, unknown>, run.settings.model as Record<string, unknown>);
  if (difference) {
    throw unusable(`The checkpoint's model does not match this run (${difference}); upload it to a run with the same settings, or import it as a new run.`);
  }
}

/**
 * Settings for a run created from an imported checkpoint: the model part comes from the checkpoint;
 * training settings are not stored in checkpoint files, so they take their defaults (steps = the
 * checkpoint's step, at least 1; seed = the checkpoint's seed when it is a whole number).
 */
export function runSettingsFromCheckpoint(found: { checkpoint: Checkpoint; model: CheckpointModel }, split: RunSettings['split']): RunSettings {
  const { checkpoint } = found;
  const seed = typeof checkpoint.seed === 'number' && Number.isInteger(checkpoint.seed) && checkpoint.seed >= 0 && checkpoint.seed < 2 ** 31 ? checkpoint.seed : 1;
  const training = trainingSchema.parse({
    steps: Math.max(1, Math.min(checkpoint.step, 1_000_000)),
    batchSize: 64,
    learningRate: 0.003,
    seed,
  });
  return { model: found.model.model, training, ...(split ? { split } : {}) } as RunSettings;
}
