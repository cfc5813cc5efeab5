/** The evaluation job the evaluation worker runs lives in shared/training/evaluation-job.ts (shared with `npm run evaluate`). */
export {
  checkEvaluationSettings, checkJobChoices, evaluateCheckpoint, evaluationData, runEvaluationJob, type EvaluationJobInput, type EvaluationJobResult,
} from '../../../shared/training/evaluation-job';
