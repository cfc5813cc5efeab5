import { describe, expect, it } from 'vitest';
import { SERIES } from '../live-run';
import { curveLines } from './curve-lines';

describe('curveLines', () => {
  it('calls the SSM\'s training figure a bound and shows its noise information', () => {
    const names = curveLines('ssm').map((l) => l.name);
    expect(names).toContain('Training bound');
    expect(names).toContain('Mean noise MI');
  });

  it('never calls an exact figure a bound and lists no noise for the GRU and the n-gram', () => {
    for (const family of ['gru', 'ngram'] as const) {
      const lines = curveLines(family);
      expect(lines.map((l) => l.key)).not.toContain(SERIES.noise);
      expect(lines.some((l) => /bound|noise/i.test(l.name))).toBe(false);
      expect(lines.find((l) => l.key === SERIES.train)?.name).toBe('Training cross entropy (exact)');
    }
  });
});
