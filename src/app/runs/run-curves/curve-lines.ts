/** The series of a run's live chart and their names, by model family. */
import { trainingFigureName, validationFigureName } from '../../../../shared/api/figure-names';
import { SERIES } from '../live-run';

/** Our palette (the product look): deep teal, amber for live activity, and two calm companions. */
const LINES = [
  { key: SERIES.train, name: trainingFigureName('ssm'), scale: 'bits', color: '#0f5e5a', points: false },
  { key: SERIES.validation, name: validationFigureName('ssm'), scale: 'bits', color: '#c7861a', points: true },
  { key: SERIES.entropy, name: 'Observation entropy', scale: 'info', color: '#6b5b95', points: true },
  { key: SERIES.noise, name: 'Mean noise MI', scale: 'info', color: '#8a9a5b', points: true },
] as const;
type Line = { key: string; name: string; scale: string; color: string; points: boolean };

/**
 * The series a family has: the GRU's (and n-gram's) figures are exact cross entropies, never bounds, and they
 * have no noise; their "entropy" is the predictive entropy.
 */
export function curveLines(family: 'ssm' | 'gru' | 'ngram'): Line[] {
  if (family === 'ssm') return LINES.map((l) => ({ ...l }));
  const names: Record<string, string> = {
    [SERIES.train]: trainingFigureName(family), [SERIES.validation]: validationFigureName(family), [SERIES.entropy]: 'Predictive entropy',
  };
  return LINES.filter((l) => l.key !== SERIES.noise).map((l) => ({ ...l, name: names[l.key] ?? l.name }));
}
