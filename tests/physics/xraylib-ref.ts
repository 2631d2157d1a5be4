/**
 * Reference values straight from Debian's python3-xraylib (via tests/support/python.ts), batched
 * into one interpreter call per request.
 */
import { runPythonJson } from '../support/python.ts';

/** Evaluates `expr` (python, with xraylib imported as xrl, math as math, and
 * safe(f, *args) giving None where xraylib raises ValueError) for each item of `items`, bound to `x`. */
export function xraylibMap<T, R = number>(expr: string, items: T[]): R[] {
  const code = [
    'import json, sys, math',
    'import xraylib as xrl',
    'def safe(f, *a):',
    '    try:',
    '        return f(*a)',
    '    except ValueError:',
    '        return None',
    'items = json.load(sys.stdin)',
    `out = [(lambda x: ${expr})(x) for x in items]`,
    'print(json.dumps(out))',
  ].join('\n');
  return runPythonJson<R[]>('xraylib', code, items);
}

/** Small seeded PRNG (mulberry32) so random checks are reproducible. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function relErr(a: number, b: number): number {
  return Math.abs(a / b - 1);
}
