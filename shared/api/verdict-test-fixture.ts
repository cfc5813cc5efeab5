/**
 * A finished learnability verdict for display tests (report rows, the verdict table): one n-gram, one GRU and
 * one state-space row of state size 8, the last without a bits-per-word figure (as runs stored before it was
 * kept). Invented display values: the code under test copies them; the verdict itself is computed elsewhere.
 */
import type { LearnabilityVerdict } from './grids';

export function verdictFixture(): LearnabilityVerdict {
  return {
    gridId: 'g', toleranceBits: 0.05, budgetSteps: 300, ngramFloor: { order: 3, bitsPerChar: 2.5 }, complete: true,
    rows: [
      { model: 'ngram-3', family: 'ngram', size: 3, runId: 'a', status: 'finished', bitsPerChar: 2.5, bitsPerWord: 13.75, gapToNgramFloor: 0 },
      { model: 'gru-8', family: 'gru', size: 8, runId: 'b', status: 'finished', bitsPerChar: 2.25, bitsPerWord: 12.5, gapToNgramFloor: -0.25 },
      { model: 'ssm-8', family: 'ssm', size: 8, runId: 'c', status: 'finished', bitsPerChar: 2.375, gapToNgramFloor: -0.125 },
    ],
    comparisons: [{ stateSize: 8, gruBitsPerChar: 2.25, ssmBitsPerChar: 2.375, difference: 0.125, onPar: false }],
  };
}
