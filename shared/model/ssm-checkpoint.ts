/** Building checkpoints from a state-space model and restoring a model (and trainer) from one. */
import { CheckpointError, CHECKPOINT_FORMAT_VERSION, type Checkpoint } from './checkpoint';
import { checkWeightShapes, WeightShapeError, type NamedWeights } from './params';
import { StateSpaceModel } from './ssm';
import { ssmParamSpecs, validateSsmSettings, type SsmSettings } from './ssm-settings';
import type { SsmTrainer } from './trainer';

export interface SsmCheckpointInfo {
  alphabet: string[];
  seed: number | string;
  /** When given, its step count and optimiser state are stored for an exact resume. */
  trainer?: SsmTrainer;
  step?: number;
  createdAt?: Date;
}

export function ssmCheckpoint(model: StateSpaceModel, info: SsmCheckpointInfo): Checkpoint {
  if (info.alphabet.length + 1 !== model.settings.vocabSize) {
    throw new Error(`The alphabet has ${info.alphabet.length} characters but the model expects ${model.settings.vocabSize - 1}.`);
  }
  return {
    formatVersion: CHECKPOINT_FORMAT_VERSION,
    family: 'ssm',
    settings: structuredClone(model.settings),
    alphabet: info.alphabet.slice(),
    step: info.trainer?.stepCount ?? info.step ?? 0,
    seed: info.seed,
    weights: model.getWeights(),
    ...(info.trainer ? { optimizer: info.trainer.getOptimizerState() } : {}),
    createdAt: (info.createdAt ?? new Date()).toISOString(),
  };
}

/** Checks a checkpoint's weights against the settings it carries; throws `CheckpointError('SHAPE_MISMATCH')`. */
export function checkSsmCheckpoint(ck: Checkpoint): SsmSettings {
  if (ck.family !== 'ssm') {
    throw new CheckpointError('SHAPE_MISMATCH', `This checkpoint holds a ${ck.family} model, not a state-space model; open it as a ${ck.family} run.`);
  }
  const settings = ck.settings as SsmSettings;
  try {
    validateSsmSettings(settings);
  } catch (e) {
    throw new CheckpointError('SHAPE_MISMATCH', `The checkpoint's model settings are invalid: ${(e as Error).message}`);
  }
  if (ck.alphabet.length + 1 !== settings.vocabSize) {
    throw new CheckpointError(
      'SHAPE_MISMATCH',
      `The checkpoint's alphabet has ${ck.alphabet.length} characters but its model expects ${settings.vocabSize - 1}.`,
    );
  }
  try {
    checkWeightShapes(ssmParamSpecs(settings), ck.weights, 'checkpoint');
  } catch (e) {
    if (e instanceof WeightShapeError) throw new CheckpointError('SHAPE_MISMATCH', e.message);
    throw e;
  }
  return settings;
}

/** A model with the checkpoint's settings and weights (validated first; nothing is built on error). */
export function modelFromCheckpoint(ck: Checkpoint): StateSpaceModel {
  const settings = checkSsmCheckpoint(ck);
  const model = new StateSpaceModel(settings, ck.seed);
  try {
    model.setWeights(ck.weights);
  } catch (e) {
    model.dispose();
    throw e;
  }
  return model;
}

/** Puts a checkpoint's optimiser state into a trainer built on the restored model. */
export function restoreTrainer(trainer: SsmTrainer, ck: Checkpoint): void {
  if (!ck.optimizer) throw new CheckpointError('SHAPE_MISMATCH', 'This checkpoint has no optimiser state; it can be evaluated but not resumed exactly.');
  trainer.setOptimizerState(ck.optimizer as NamedWeights);
}
