/**
 * generators/numeric against two outside references:
 * - the C library of Debian's python3 (glibc's libm through Python's math module): every result
 *   within 1 ulp, fdlibm's stated bound for exp, log, expm1, log1p and pow;
 * - Node 20's own Math.exp/log/expm1/log1p (V8's port of the same fdlibm routines): identical bits,
 *   so moving the core to these functions changed no byte Node builds.
 * Special values follow ECMA-262 §6.1.6.1.3 (Number::exponentiate) and §21.3.2 (Math).
 * Engine independence itself is tested in chromium (tests/browser/numeric-bits.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { exp, expm1, log, log1p, pow } from '../../generators/numeric/index.ts';
import { requirePython } from '../support/python.ts';
import { samples, ulpDistance } from './samples.ts';

const N = 20_000;
const S = samples(N);

/** glibc's results for the same arguments, computed by Debian's python3. */
function glibc(): Record<'exp' | 'log' | 'expm1' | 'log1p' | 'pow', number[]> {
  const py = requirePython('scipy'); // the system interpreter; math is in its standard library
  const script = `
import sys, json, math
d = json.load(sys.stdin)
out = {"exp": [math.exp(x) for x in d["exp"]], "log": [math.log(x) for x in d["log"]],
       "expm1": [math.expm1(x) for x in d["small"]], "log1p": [math.log1p(x) for x in d["small"]],
       "pow": [math.pow(a, b) for a, b in zip(d["powBase"], d["powExp"])]}
print(json.dumps(out))`;
  return JSON.parse(execFileSync(py, ['-c', script], { input: JSON.stringify(S), maxBuffer: 1 << 28 }).toString());
}

function maxUlps(ours: number[], ref: number[]): { max: number; at: number } {
  let max = 0;
  let at = -1;
  ours.forEach((v, i) => {
    const d = ulpDistance(v, ref[i]);
    if (d > max) [max, at] = [d, i];
  });
  return { max, at };
}

describe('elementary functions of generators/numeric', () => {
  it('are within 1 ulp of glibc (Debian python3 math) on 20,000 seeded arguments each', () => {
    const ref = glibc();
    const got = {
      exp: maxUlps(S.exp.map(exp), ref.exp),
      log: maxUlps(S.log.map(log), ref.log),
      expm1: maxUlps(S.small.map(expm1), ref.expm1),
      log1p: maxUlps(S.small.map(log1p), ref.log1p),
      pow: maxUlps(S.powBase.map((b, i) => pow(b, S.powExp[i])), ref.pow),
    };
    for (const [name, r] of Object.entries(got)) expect(r.max, `${name}: ${r.max} ulp at sample ${r.at}`).toBeLessThanOrEqual(1);
  });

  it("give Node 20's Math.exp, log, expm1 and log1p bit for bit (V8 ports the same fdlibm routines)", () => {
    const differ = (f: (x: number) => number, g: (x: number) => number, xs: number[]) => xs.filter((x) => !Object.is(f(x), g(x)));
    expect(differ(exp, Math.exp, S.exp)).toEqual([]);
    expect(differ(log, Math.log, S.log)).toEqual([]);
    expect(differ(expm1, Math.expm1, [...S.small, ...S.exp])).toEqual([]);
    expect(differ(log1p, Math.log1p, [...S.small, ...S.log])).toEqual([]);
  });

  it('follow ECMAScript for special values', () => {
    const specials = [0, -0, 1, -1, 0.5, -0.5, 2, -2, 3, -3, Infinity, -Infinity, NaN, 5e-324, 1e308, -1e308];
    for (const x of specials) {
      expect(exp(x), `exp(${x})`).toBe(Math.exp(x));
      expect(log(x), `log(${x})`).toBe(Math.log(x));
      expect(expm1(x), `expm1(${x})`).toBe(Math.expm1(x));
      expect(log1p(x), `log1p(${x})`).toBe(Math.log1p(x));
      // Special cases of exponentiation are exact, so they must agree with the engine's.
      for (const y of specials) if (!Number.isFinite(x) || !Number.isFinite(y) || x === 0 || y === 0 || Math.abs(x) === 1 || Math.abs(y) === 1 || y === 2 || y === 0.5)
        expect(pow(x, y), `pow(${x}, ${y})`).toBe(x ** y);
    }
    expect(pow(-8, 1 / 3)).toBeNaN(); // negative base, non-integer exponent
    expect(pow(-2, 3)).toBe(-8);
    expect(pow(-2, -2)).toBe(0.25);
    expect(exp(709.7) / 1.6549840276802644e308).toBeCloseTo(1, 12); // e^709.7 (glibc: 1.6549840276802644e308)
    expect(exp(710)).toBe(Infinity);
    expect(exp(-746)).toBe(0);
    expect(exp(-745)).toBe(5e-324); // the smallest subnormal, reached with one rounding
  });

  it('keep integer powers exact where the product is (2^k, 10^k up to 10^22)', () => {
    for (let k = -1074; k <= 1023; k += 7) expect(pow(2, k), `2^${k}`).toBe(k >= 0 ? Number(2n ** BigInt(k)) : k >= -1022 ? 1 / Number(2n ** BigInt(-k)) : Number.MIN_VALUE * Number(2n ** BigInt(k + 1074)));
    for (let k = 0; k <= 22; k++) expect(pow(10, k), `10^${k}`).toBe(Number(`1e${k}`));
  });
});
