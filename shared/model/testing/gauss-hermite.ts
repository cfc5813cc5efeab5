/**
 * Gauss–Hermite quadrature for tests: nodes and weights for  ∫ e^{-x²} f(x) dx ≈ Σ w_i f(x_i)  by the
 * Golub–Welsch method (eigen-decomposition of the Jacobi matrix of the physicists' Hermite polynomials:
 * zero diagonal, off-diagonal sqrt(k/2), k = 1..n-1; weight_i = sqrt(pi) * (first component of eigenvector i)²).
 * Test-only: uses the ml-matrix package (a dev dependency).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

export interface QuadratureRule {
  nodes: number[];
  weights: number[];
}

export function gaussHermite(n: number): QuadratureRule {
  const jacobi = Matrix.zeros(n, n);
  for (let k = 1; k < n; k++) {
    const b = Math.sqrt(k / 2);
    jacobi.set(k - 1, k, b);
    jacobi.set(k, k - 1, b);
  }
  const eig = new EigenvalueDecomposition(jacobi, { assumeSymmetric: true });
  const vectors = eig.eigenvectorMatrix;
  const pairs = eig.realEigenvalues.map((x, i) => {
    let norm = 0;
    for (let r = 0; r < n; r++) norm += vectors.get(r, i) ** 2;
    return { x, w: (Math.sqrt(Math.PI) * vectors.get(0, i) ** 2) / norm };
  });
  pairs.sort((a, b) => a.x - b.x);
  return { nodes: pairs.map((p) => p.x), weights: pairs.map((p) => p.w) };
}

/**
 * The same rule turned into an expectation under N(0, 1):  E[f(xi)] ≈ Σ (w_i / sqrt(pi)) f(sqrt(2) x_i).
 */
export function standardNormalRule(n: number): QuadratureRule {
  const { nodes, weights } = gaussHermite(n);
  return { nodes: nodes.map((x) => Math.SQRT2 * x), weights: weights.map((w) => w / Math.sqrt(Math.PI)) };
}
