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

/** Small seeded PRNG so random checks are reproducible (scripts/prng.ts). */
export { mulberry32 as seededRandom } from '../../scripts/prng.ts';

export function relErr(a: number, b: number): number {
  return Math.abs(a / b - 1);
}
