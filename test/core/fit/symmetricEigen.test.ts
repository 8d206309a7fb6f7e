/**
 * The Jacobi eigen-solver of the fits (src/core/fit/symmetricEigen.ts) against mathjs `eigs` (the
 * reference library) on seeded random symmetric matrices, and against closed forms.
 */
import { create, eigsDependencies } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { symmetricEigen } from '../../../src/core/fit/symmetricEigen';
import { gaussian } from './support/synthetic';

const math = create({ eigsDependencies });

describe('symmetricEigen', () => {
  it('2 x 2 closed form: [[2, 1], [1, 2]] has eigenvalues 1 and 3, vectors (1, -1)/sqrt 2 and (1, 1)/sqrt 2', () => {
    // elementary linear algebra (characteristic polynomial (2 - l)^2 - 1 = 0); 1e-15: rounding
    const { values, vectors } = symmetricEigen([[2, 1], [1, 2]]);
    const order = values[0] < values[1] ? [0, 1] : [1, 0];
    expect(Math.abs(values[order[0]] - 1)).toBeLessThan(1e-15);
    expect(Math.abs(values[order[1]] - 3)).toBeLessThan(1e-15);
    expect(Math.abs(Math.abs(vectors[order[1]][0]) - Math.SQRT1_2)).toBeLessThan(1e-15);
    expect(vectors[order[1]][0] * vectors[order[1]][1]).toBeGreaterThan(0);
    expect(vectors[order[0]][0] * vectors[order[0]][1]).toBeLessThan(0);
  });

  it('random symmetric matrices, 2 to 7 rows: the same eigenvalues as mathjs eigs, A v = lambda v', () => {
    const noise = gaussian(99);
    for (let trial = 0; trial < 60; trial++) {
      const n = 2 + (trial % 6);
      const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
      for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) A[i][j] = A[j][i] = noise();
      const ours = symmetricEigen(A);
      const ref = (math.eigs(A).values as unknown as number[]).map(Number).sort((a, b) => a - b);
      const norm = Math.max(...ref.map(Math.abs));
      // both are backward stable: eigenvalues agree to a few ulps of the norm (1e-13 with margin)
      [...ours.values].sort((a, b) => a - b).forEach((l, k) => expect(Math.abs(l - ref[k]) / norm).toBeLessThan(1e-13));
      ours.values.forEach((l, k) => {
        const v = ours.vectors[k];
        for (let i = 0; i < n; i++) expect(Math.abs(A[i].reduce((s, a, j) => s + a * v[j], 0) - l * v[i]) / norm).toBeLessThan(1e-13);
      });
    }
  });

  it('the 4 x 4 Hilbert matrix: smallest eigenvalue 9.67023e-5 to all digits printed', () => {
    // lambda_min of the 4 x 4 Hilbert matrix = 9.670230402e-5 (from memory; a condition of
    // 1.6e4, so a small eigenvalue to find accurately); 1e-9 relative (10 digits quoted)
    const H = Array.from({ length: 4 }, (_, i) => Array.from({ length: 4 }, (_, j) => 1 / (i + j + 1)));
    expect(Math.abs(Math.min(...symmetricEigen(H).values) / 9.670230402e-5 - 1)).toBeLessThan(1e-9);
  });
});
