/**
 * The small SPD algebra of generators/fit/linalg.ts against Debian's python3-numpy
 * (numpy.linalg.cholesky, solve, inv) and exact identities: A = L·Lᵀ with L lower triangular and a
 * positive diagonal (the Cholesky factor is unique: Golub & Van Loan, Matrix Computations, 4th ed.
 * §4.2, from memory), A·x = b, A·A⁻¹ = I and A⁻¹ symmetric. The refusal rule is the code's
 * stated contract: a pivot at or below tol × its diagonal entry, or a non-finite one, is no factor.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { cholesky, choleskySolve, spdInverse } from '../../generators/fit/linalg.ts';
import { requirePython } from '../support/python.ts';
import { mulberry32 } from './rng.ts';

/** A random SPD matrix B·Bᵀ + n·I (seeded), n × n. */
function spd(n: number, seed: number): number[][] {
  const r = mulberry32(seed);
  const b = Array.from({ length: n }, () => Array.from({ length: n }, () => r() - 0.5));
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => b[i].reduce((s, v, k) => s + v * b[j][k], 0) + (i === j ? n * 0.1 : 0)));
}

const A3 = spd(3, 7);
const A5 = spd(5, 11);
const B5 = [1, -2, 0.5, 3, -1];

let cached: { l3: number[][]; l5: number[][]; x5: number[]; inv5: number[][] } | undefined;
function numpy() {
  if (cached) return cached;
  const py = requirePython('scipy');
  const script = `
import sys, json, numpy as np
d = json.load(sys.stdin)
a3, a5, b5 = np.array(d["a3"]), np.array(d["a5"]), np.array(d["b5"])
print(json.dumps({"l3": np.linalg.cholesky(a3).tolist(), "l5": np.linalg.cholesky(a5).tolist(),
  "x5": np.linalg.solve(a5, b5).tolist(), "inv5": np.linalg.inv(a5).tolist()}))`;
  cached = JSON.parse(execFileSync(py, ['-c', script], { input: JSON.stringify({ a3: A3, a5: A5, b5: B5 }) }).toString());
  return cached as { l3: number[][]; l5: number[][]; x5: number[]; inv5: number[][] };
}

const close = (a: number, b: number, tol = 1e-12) => Math.abs(a - b) <= tol * (1 + Math.abs(b));

describe('Cholesky factor, solve and inverse against numpy', () => {
  it('the factor equals numpy’s (unique: lower triangular, positive diagonal), and L·Lᵀ = A', () => {
    const ref = numpy();
    for (const [a, lr] of [
      [A3, ref.l3],
      [A5, ref.l5],
    ] as const) {
      const l = cholesky(a) as number[][];
      expect(l).not.toBeNull();
      const n = a.length;
      for (let i = 0; i < n; i++)
        for (let j = 0; j < n; j++) {
          expect(close(l[i][j], lr[i][j]), `L[${i}][${j}] ${l[i][j]} vs ${lr[i][j]}`).toBe(true);
          if (j > i) expect(l[i][j]).toBe(0);
          let s = 0;
          for (let k = 0; k < n; k++) s += l[i][k] * l[j][k];
          expect(close(s, a[i][j]), `(LLᵀ)[${i}][${j}]`).toBe(true);
        }
    }
  });

  it('solves A·x = b as numpy.linalg.solve does', () => {
    const x = choleskySolve(cholesky(A5) as number[][], B5);
    numpy().x5.forEach((v, i) => expect(close(x[i], v, 1e-11), `x[${i}]`).toBe(true));
    A5.forEach((row, i) => expect(close(row.reduce((s, v, k) => s + v * x[k], 0), B5[i], 1e-11), `(Ax)[${i}]`).toBe(true));
  });

  it('inverts as numpy.linalg.inv does, exactly symmetric, A·A⁻¹ = I', () => {
    const inv = spdInverse(A5) as number[][];
    const ref = numpy().inv5;
    for (let i = 0; i < 5; i++)
      for (let j = 0; j < 5; j++) {
        expect(close(inv[i][j], ref[i][j], 1e-11), `inv[${i}][${j}]`).toBe(true);
        expect(inv[i][j]).toBe(inv[j][i]);
        const p = A5[i].reduce((s, v, k) => s + v * inv[k][j], 0);
        expect(Math.abs(p - (i === j ? 1 : 0))).toBeLessThan(1e-11);
      }
  });
});

describe('refusals (the stated contract: relative pivot ≤ tol, or not finite)', () => {
  it('a matrix that is not positive definite, or singular, has no factor and no inverse', () => {
    expect(cholesky([[1, 2], [2, 1]])).toBeNull(); // eigenvalues −1 and 3
    expect(cholesky([[-1]])).toBeNull();
    expect(cholesky([[0]])).toBeNull();
    expect(spdInverse([[1, 1], [1, 1]])).toBeNull(); // singular
    expect(spdInverse([[4, 2, 2], [2, 5, 3], [2, 3, 2]])).toBeNull(); // third pivot 2 − 1 − 1 = 0
  });

  it('the pivot is judged relative to its own diagonal entry: 1e-14 of it fails, 1e-10 passes (tol 1e-12)', () => {
    expect(cholesky([[1, 1], [1, 1 + 1e-14]])).toBeNull();
    const ok = cholesky([[1, 1], [1, 1 + 1e-10]]) as number[][];
    expect(ok).not.toBeNull();
    expect(close(ok[1][1] ** 2, 1e-10, 1e-5)).toBe(true);
    // scale does not matter: the same matrix × 1e-20 is as well (or badly) conditioned
    expect(cholesky([[1e-20, 1e-20], [1e-20, 1e-20 * (1 + 1e-10)]])).not.toBeNull();
    expect(cholesky([[1e-20, 0], [0, 1e-30]])).not.toBeNull();
    // a tolerance can be given: 1e-9 refuses the 1e-10 pivot
    expect(cholesky([[1, 1], [1, 1 + 1e-10]], 1e-9)).toBeNull();
  });

  it('non-finite entries give no factor', () => {
    expect(cholesky([[Infinity]])).toBeNull();
    expect(cholesky([[NaN]])).toBeNull();
    expect(cholesky([[1, NaN], [NaN, 1]])).toBeNull();
    expect(cholesky([[1, 0], [0, Infinity]])).toBeNull();
  });

  it('the empty matrix factors to the empty matrix', () => {
    expect(cholesky([])).toEqual([]);
    expect(spdInverse([])).toEqual([]);
  });
});
