/**
 * Puts release B's published curve on release A's energy grid for a ratio/difference: linear
 * interpolation in log energy between B's neighbouring points; null outside B's range. When the
 * grids are equal (the usual case) the values are B's own.
 */
export function onGrid(xA: number[], xB: number[], yB: (number | null)[]): (number | null)[] {
  const out: (number | null)[] = new Array(xA.length).fill(null);
  let j = 0;
  for (let i = 0; i < xA.length; i++) {
    const x = xA[i];
    while (j < xB.length - 2 && xB[j + 1] < x) j++;
    const x0 = xB[j];
    const x1 = xB[j + 1];
    if (x === x0) out[i] = yB[j];
    else if (x1 === undefined) out[i] = x === x0 ? yB[j] : null;
    else if (x === x1) out[i] = yB[j + 1];
    else if (x > x0 && x < x1) {
      const a = yB[j];
      const b = yB[j + 1];
      if (a === null || b === null) continue;
      const t = x0 > 0 && x1 > 0 && x > 0 ? Math.log(x / x0) / Math.log(x1 / x0) : (x - x0) / (x1 - x0);
      out[i] = a + t * (b - a);
    }
  }
  return out;
}

export function ratio(a: (number | null)[], b: (number | null)[]): (number | null)[] {
  return a.map((v, i) => (v === null || b[i] === null || v === 0 ? null : (b[i] as number) / v));
}

export function difference(a: (number | null)[], b: (number | null)[]): (number | null)[] {
  return a.map((v, i) => (v === null || b[i] === null ? null : (b[i] as number) - v));
}
