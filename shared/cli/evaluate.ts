/** `npm run evaluate -- <checkpoint> --corpus <file>` (see --help). */
import { EVALUATE_HELP, parseEvaluateArgs } from './evaluate-options';
import { runEvaluation } from './evaluate-run';

try {
  const opts = parseEvaluateArgs(process.argv.slice(2));
  if (!opts) {
    process.stdout.write(EVALUATE_HELP);
  } else {
    const { output, table } = await runEvaluation(opts);
    process.stdout.write(opts.json ? `${JSON.stringify(output, null, 1)}\n` : table);
  }
} catch (e) {
  process.stderr.write(`evaluate: ${(e as Error).message}\n`);
  process.exitCode = 1;
}
