import { describe, expect, it } from 'vitest';
import { gaussHermite, standardNormalRule } from './gauss-hermite';

describe('Gauss–Hermite rule (Golub–Welsch)', () => {
  it('matches the n = 5 nodes and weights of a reference library', () => {
    // Reference library: NumPy 1.24.2, numpy.polynomial.hermite.hermgauss(5) (weight e^{-x^2}), printed with
    // Python's repr and copied here (Debian python3-numpy, run with /usr/bin/python3). The same rule is tabulated
    // in Abramowitz & Stegun, Handbook of Mathematical Functions, table 25.10 — not consulted here.
    const nodes = [-2.0201828704560856, -0.9585724646138185, 0, 0.9585724646138185, 2.0201828704560856];
    const weights = [0.019953242059045917, 0.3936193231522411, 0.9453087204829418, 0.3936193231522411, 0.019953242059045917];
    const rule = gaussHermite(5);
    rule.nodes.forEach((x, i) => expect(x).toBeCloseTo(nodes[i] as number, 12));
    rule.weights.forEach((w, i) => expect(w).toBeCloseTo(weights[i] as number, 12));
  });

  it('integrates the moments of N(0,1) exactly up to degree 2n - 1', () => {
    // Closed form: E[x^(2k)] = (2k - 1)!! for the standard normal; odd moments are 0.
    const rule = standardNormalRule(6);
    const moment = (p: number) => rule.nodes.reduce((s, x, i) => s + (rule.weights[i] as number) * x ** p, 0);
    expect(moment(0)).toBeCloseTo(1, 12);
    expect(moment(2)).toBeCloseTo(1, 12);
    expect(moment(4)).toBeCloseTo(3, 11);
    expect(moment(6)).toBeCloseTo(15, 10);
    expect(moment(10)).toBeCloseTo(945, 7);
    expect(moment(5)).toBeCloseTo(0, 10);
    // Degree 12 > 2n - 1 = 11 is no longer exact: the rule must miss E[x^12] = 10395.
    expect(Math.abs(moment(12) - 10395)).toBeGreaterThan(1);
  });
});
