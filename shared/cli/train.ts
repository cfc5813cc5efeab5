/** `npm run train -- --corpus <file> --model ssm|gru|ngram ...` (see --help). */
import { parseTrainArgs, TRAIN_HELP } from './train-options';
import { runTraining } from './train-run';

try {
  const opts = parseTrainArgs(process.argv.slice(2));
  if (!opts) {
    process.stdout.write(TRAIN_HELP);
  } else {
    const { checkpointPath, metricsPath, metrics } = await runTraining(opts);
    const last = metrics.validation[metrics.validation.length - 1];
    process.stdout.write(`Trained ${metrics.model} (${metrics.parameterCount} parameters) for ${metrics.steps} steps in ` +
      `${metrics.seconds.toFixed(1)} s on ${metrics.backend}.\n` +
      (last ? `Held-out (${last.words} words): ${last.bitsPerChar.toFixed(3)} bits/char (end-of-word counted), ` +
        `${last.bitsPerWord.toFixed(2)} bits/word${last.exact ? ' (exact)' : ` (IWAE estimate, K = ${last.k})`}.\n` : '') +
      `Checkpoint: ${checkpointPath}\nMetrics: ${metricsPath}\n`);
  }
} catch (e) {
  process.stderr.write(`train: ${(e as Error).message}\n`);
  process.exitCode = 1;
}
