/**
 * From a stored run (RunDto) and its corpus's training set to what a worker needs, and the parameter count of a
 * model design before anything is built (counted from the shared/model parameter tables).
 */
import { gruSpecs } from '../../../shared/model/gru-lm';
import { countParams } from '../../../shared/model/params';
import { ssmParameterCount } from '../../../shared/model/ssm-settings';
import type { TrainerSettings } from '../workers/trainer-api';

export { trainerSettingsOf, trainingSetOf } from '../../../shared/training/run-settings';

/** Trainable scalars of a design (the n-gram's size is known only after fitting: null). */
export function parameterCountOf(s: TrainerSettings, vocabSize: number): number | null {
  if (s.family === 'ngram') return null;
  if (s.family === 'gru') {
    return countParams(gruSpecs({ vocabSize, stateSize: s.stateSize, embeddingSize: s.embeddingSize, observationHidden: s.observationHidden }));
  }
  return ssmParameterCount({
    stateSize: s.stateSize, vocabSize, generativeFlow: s.generativeFlow.map((kind) => ({ kind })),
    inferenceFlow: s.inferenceFlow.map((kind) => ({ kind })), flowHidden: s.flowHidden, observationHidden: s.observationHidden,
    embeddingSize: s.embeddingSize, encoderSize: s.encoderSize, proposalHidden: s.proposalHidden,
  });
}
