/** Small dense symmetric positive-definite algebra for fit covariances (n ≲ 10). */

/** Cholesky factor L (row-major, lower) of A; null when A is not positive definite (relative pivot below tol). */
export function cholesky(a: readonly number[][], tol = 1e-12): number[][] | null {
  const n = a.length;
  const l = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i][j];
      // Stryker disable next-line EqualityOperator: `k <= j` adds the term l[i][j]·l[j][j] while l[i][j] is still the 0 it was filled with (it is assigned just below), so s is unchanged (`k >= j` never ends the loop: a timeout).
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      if (i === j) {
        if (!(s > tol * Math.abs(a[i][i])) || !Number.isFinite(s)) return null;
        l[i][i] = Math.sqrt(s);
      } else l[i][j] = s / l[j][j];
    }
  }
  return l;
}

/** Solves A x = b with a Cholesky factor of A. */
export function choleskySolve(l: readonly number[][], b: readonly number[]): number[] {
  const n = l.length;
  // Stryker disable next-line ArrayDeclaration: every index 0…n−1 is assigned before it is read, so an array grown from empty ends with the same elements.
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i][k] * y[k];
    y[i] = s / l[i][i];
  }
  // Stryker disable next-line ArrayDeclaration: every index n−1…0 is assigned before it is read, so an array grown from empty ends with the same elements.
  const x = new Array<number>(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= l[k][i] * x[k];
    x[i] = s / l[i][i];
  }
  return x;
}

/** Inverse of an SPD matrix via Cholesky, or null when singular. */
export function spdInverse(a: readonly number[][]): number[][] | null {
  const l = cholesky(a);
  if (!l) return null;
  const n = a.length;
  const cols = Array.from({ length: n }, (_, j) => choleskySolve(l, Array.from({ length: n }, (_, i) => (i === j ? 1 : 0))));
  // symmetrise against rounding
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => 0.5 * (cols[j][i] + cols[i][j])));
}
