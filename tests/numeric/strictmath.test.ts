/**
 * generators/numeric bit for bit against java.lang.StrictMath (Debian's default-jre-headless),
 * whose exp, log, expm1, log1p and pow the Java SE API specification fixes to fdlibm 5.3's
 * results: the algorithms these files port. The arguments are every branch's edges (the
 * high-word thresholds in the code, each with its neighbouring doubles), special values, the
 * over- and underflow limits, and seeded random bit patterns over the whole double range.
 * Two deliberate differences are left out and checked on their own, both to keep Node's bytes:
 * exp(1) returns Math.E, as V8 does (fdlibm gives the double one ulp above); and log1p of x with
 * high word 0xbfd2bec4 (x just below −0.2929) takes the unreduced path, as V8's log1p does (its
 * port of FreeBSD's msun moved fdlibm's 0xbfd2bec3 bound by one, from memory; StrictMath keeps it).
 */
import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { exp, expm1, log, log1p, pow } from '../../generators/numeric/index.ts';
import { runJavaCached } from '../support/java.ts';
import { bits, mulberry32 } from './samples.ts';

const REFERENCE = fileURLToPath(new URL('./StrictMathReference.java', import.meta.url));

const f64 = new Float64Array(1);
const u64 = new BigUint64Array(f64.buffer);
function fromBits(b: bigint): number {
  u64[0] = b;
  return f64[0];
}
/** The double whose high word is `hi` and low word `lo`. */
const words = (hi: number, lo = 0) => fromBits((BigInt(hi >>> 0) << 32n) | BigInt(lo >>> 0));
/** x and its neighbours one and two ulps away on either side (same sign). */
function around(x: number): number[] {
  u64[0] = 0n;
  f64[0] = x;
  const b = u64[0];
  const out = [x];
  for (const d of [1n, 2n]) {
    out.push(fromBits(b + d));
    if (b >= d) out.push(fromBits(b - d));
  }
  return out.filter((v) => !Number.isNaN(v) || Number.isNaN(x));
}
const both = (xs: number[]) => xs.flatMap((x) => [x, -x]);

/** Seeded doubles from random bit patterns (every exponent, both signs) and from a few ranges. */
function randomDoubles(n: number, seed: number): number[] {
  const r = mulberry32(seed);
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const hi = Math.floor(r() * 2 ** 32);
    const lo = Math.floor(r() * 2 ** 32);
    out.push(words(hi, lo));
  }
  return out.filter((x) => !Number.isNaN(x));
}

// (NaNs of other signs and payloads are not listed: V8 stores a NaN in an array as its canonical
// pattern, so they would not reach the functions as written.)
const SPECIAL = [0, -0, Infinity, -Infinity, NaN, 1, -1, 0.5, -0.5, 2, -2, 3, -3, Number.MIN_VALUE, -Number.MIN_VALUE, 2 ** -1022, Number.MAX_VALUE, -Number.MAX_VALUE];
/**
 * Tiny arguments where 1 + x is (nearly) a tie on the grid of doubles: there e^x = 1 + x + x²/2
 * and 1 + x round apart, so the shortcut below 2⁻²⁸ (exp) must be taken exactly where fdlibm takes it.
 */
const TIES = [1, 3, 5, 2 ** 10 + 1, 2 ** 20 + 1, 2 ** 24 + 1, 2 ** 24 + 3, 2 ** 25 - 1, 2 ** 25 - 3, 2 ** 25 - 5].flatMap((m) => [m * 2 ** -53, -m * 2 ** -54, m * 2 ** -53 * (1 - 2 ** -40), m * 2 ** -54 * -(1 + 2 ** -40)]);

// exp.ts / expm1.ts thresholds (high words as in fdlibm's e_exp.c and s_expm1.c)
const EXP_EDGES = both([
  words(0x40862e42), // |x| ≥ 709.78
  7.09782712893383973096e2, // overflow
  words(0x3fd62e42, 0xffffffff), // ln2/2
  words(0x3fd62e43),
  words(0x3ff0a2b2), // 1.5·ln2
  words(0x3e300000), // 2⁻²⁸
  words(0x4043687a), // 56·ln2
  words(0x3c900000), // 2⁻⁵⁴
  0.25,
  Math.LN2,
  Math.LN2 / 2,
  1.5 * Math.LN2,
  20 * Math.LN2,
  19.5 * Math.LN2,
  56 * Math.LN2,
  57 * Math.LN2,
  700,
  -745.1,
  -708.4,
  -709.1,
  -720,
]).concat([-7.45133219101941108420e2, 7.45133219101941108420e2]);

// log.ts / log1p.ts thresholds
const LOG_EDGES = [
  words(0x00100000), // smallest normal
  words(0x000fffff, 0xffffffff),
  words(0x7fefffff, 0xffffffff),
  Math.SQRT2,
  Math.SQRT1_2,
  words(0x3ff6a09e), // √2, high word as fdlibm's normalisation test
  words(0x3ff6a09f),
  words(0x3fe6a09e),
  words(0x3ff00000 + 0x6147a), // the polynomial's split points (e_log.c, i = (hx−0x6147a)|(0x6b851−hx))
  words(0x3ff00000 + 0x6b851),
  words(0x3ff00000 + 0x6147b),
  words(0x3ff00000 + 0x6b850),
  1 + 2 ** -20,
  1 - 2 ** -21,
  1 + 2 ** -19,
  1 + 2 ** -40,
  words(0x3ff00001),
  words(0x3fefffff),
  words(0x3ff00002),
  words(0x3feffffe),
  2 ** 30,
  2 ** -30,
  2 ** -1074,
  3 * 2 ** -1074,
  2 ** -1030,
  1e-310,
  1e300,
  10,
  0.1,
];
const LOG1P_EDGES = [
  ...both([
    words(0x3fda827a), // 0.41422
    words(0x3fda8279, 0xffffffff),
    words(0x3e200000), // 2⁻²⁹
    words(0x3c900000), // 2⁻⁵⁴
    words(0x3fd2bec4), // 0.2929
    words(0x3fd2bec3, 0xffffffff),
    words(0x3fd2bec5),
    words(0x43400000), // 2⁵³
    words(0x433fffff, 0xffffffff),
    2 ** -20,
    2 ** -21,
    Math.SQRT2 - 1,
    Math.SQRT1_2 - 1,
    words(0x3ff6a09e) - 1,
    words(0x3ff6a09d) - 1,
    1,
    2,
    3,
    7,
    2 ** 20 - 1,
    2 ** 52,
    2 ** 60,
    0.75,
  ]),
  -1,
  words(0xbfefffff, 0xffffffff), // just above −1
  -0.99,
  -1 + 2 ** -30,
];

// pow.ts: bases and exponents at the branches of e_pow.c
const POW_BASES = [
  ...SPECIAL,
  ...both([
    10,
    1.5,
    0.75,
    1 + 2 ** -21,
    1 - 2 ** -21,
    1 + 2 ** -19,
    1 - 2 ** -19,
    words(0x3ff00000, 1),
    words(0x3fefffff, 0xffffffff),
    words(0x3fefffff),
    words(0x3ff00001),
    words(0x3ff3988e), // √(3/2)
    words(0x3ff3988f),
    words(0x3ffbb67a), // √3
    words(0x3ffbb679, 0xffffffff),
    1.7,
    Math.SQRT2,
    Math.E,
    2 ** -1074,
    2 ** -1050,
    3 * 2 ** -1070,
    1e-310,
    1e308,
    2 ** 1023,
    0.1,
    123.456,
  ]),
];
const POW_EXPONENTS = [
  ...SPECIAL,
  ...both([
    4,
    5,
    0.25,
    1.5,
    2.5,
    1 / 3,
    10,
    11,
    31,
    2 ** 20 + 1,
    2 ** 21 + 1,
    2 ** 21,
    2 ** 31,
    2 ** 31 + 1,
    2 ** 31 + 0.5,
    2 ** 31 - 1,
    words(0x41e00000, 1),
    2 ** 40 + 1,
    2 ** 52 + 1,
    2 ** 52 + 0.5,
    2 ** 53,
    2 ** 53 + 2,
    2 ** 63,
    2 ** 64,
    2 ** 64 + 2 ** 12,
    words(0x43f00000, 1),
    1e20,
    1e300,
    1023,
    1024,
    1023.5,
    1074,
    1075,
    1076,
    1074.5,
    0.1,
    123.456,
    2 ** -30,
  ]),
];
/** Products at the over- and underflow limits: z = y·log₂x near 1024 and −1075. */
const POW_LIMITS: [number, number][] = [
  ...[1023, 1024, 1023.5, 1024.5, 1075, 1074, 1074.5, 1075.5, 1076].flatMap((y) => around(y).flatMap((yy) => [[2, yy], [2, -yy], [0.5, yy], [-2, yy], [-2, -yy]] as [number, number][])),
  ...around(308.25).map((y) => [10, y] as [number, number]),
  ...around(-323.3).map((y) => [10, y] as [number, number]),
  ...around(-324).map((y) => [10, y] as [number, number]),
  ...around(Number.MAX_VALUE).map((x) => [x, 1.0000001] as [number, number]),
  ...around(1 + 2 ** -30).flatMap((x) => [[x, 2 ** 40], [x, -(2 ** 40)], [x, 2 ** 39 * 1419.5], [x, 2 ** 40 * 744.4]] as [number, number][]),
];

/** log1p's arguments whose high word is 0xbfd2bec4, where V8 (and this code) leave fdlibm 5.3. */
const inMovedLog1pBand = (x: number) => x <= words(0xbfd2bec4) && x >= words(0xbfd2bec4, 0xffffffff);

type Call = { fn: 'exp' | 'log' | 'expm1' | 'log1p'; x: number } | { fn: 'pow'; x: number; y: number };

function calls(): Call[] {
  const one = (fn: 'exp' | 'log' | 'expm1' | 'log1p', edges: number[], xs: number[]) => [...edges.flatMap(around), ...xs].map((x) => ({ fn, x }));
  const rnd = randomDoubles(3000, 151515);
  const moderate = Array.from({ length: 2000 }, (_, i) => (mulberry32(i + 1)() - 0.5) * 2 ** ((i % 24) - 12));
  const c: Call[] = [
    ...one('exp', [...SPECIAL, ...EXP_EDGES, ...TIES], [...rnd, ...moderate]),
    ...one('expm1', [...SPECIAL, ...EXP_EDGES, ...TIES], [...rnd, ...moderate]),
    ...one('log', [...SPECIAL, ...LOG_EDGES], [...rnd.map(Math.abs), ...moderate.map(Math.abs)]),
    ...one('log1p', [...SPECIAL, ...LOG1P_EDGES, ...TIES], [...rnd, ...moderate]),
  ].filter((k) => !(k.fn === 'exp' && k.x === 1) && !(k.fn === 'log1p' && inMovedLog1pBand(k.x)));
  for (const x of POW_BASES) for (const y of POW_EXPONENTS) c.push({ fn: 'pow', x, y });
  for (const [x, y] of POW_LIMITS) c.push({ fn: 'pow', x, y });
  const r = mulberry32(777);
  for (let i = 0; i < 1500; i++) {
    // random bases over the whole range with exponents that keep many results finite
    const x = rnd[i % rnd.length];
    c.push({ fn: 'pow', x, y: (r() - 0.5) * 8 });
    c.push({ fn: 'pow', x: Math.exp((r() - 0.5) * 1400), y: (r() - 0.5) * 4 });
    c.push({ fn: 'pow', x: -Math.exp((r() - 0.5) * 80), y: Math.round((r() - 0.5) * 60) });
    c.push({ fn: 'pow', x: 1 + (r() - 0.5) * 2 ** -18, y: (r() - 0.5) * 2 ** 34 });
    c.push({ fn: 'pow', x: Math.exp((r() - 0.5) * 60), y: rnd[(i * 7) % rnd.length] });
  }
  return c;
}

const ours = (k: Call) => (k.fn === 'pow' ? pow(k.x, k.y) : { exp, log, expm1, log1p }[k.fn](k.x));
const label = (k: Call) => (k.fn === 'pow' ? `pow(${k.x}, ${k.y})` : `${k.fn}(${k.x})`);

const rb = mulberry32(4242);
/** log1p arguments with high word 0xbfd2bec4, and neighbours just outside (0xbfd2bec3 and 0xbfd2bec5). */
const BAND = [words(0xbfd2bec4), words(0xbfd2bec4, 1), words(0xbfd2bec4, 0xffffffff), ...Array.from({ length: 2000 }, () => words(0xbfd2bec4, Math.floor(rb() * 2 ** 32)))];
const OUTSIDE = [words(0xbfd2bec3, 0xffffffff), words(0xbfd2bec5), words(0xbfd2bec3, 0x80000000), words(0xbfd2bec5, 0x12345678)];

/** Every call's StrictMath bits, from one run of the Java program (it takes seconds to start; its output is kept per input). */
let cached: { cs: Call[]; ref: string[] } | undefined;
function reference(): { cs: Call[]; ref: string[] } {
  if (cached) return cached;
  const cs: Call[] = [...calls(), ...[...BAND, ...OUTSIDE].map((x) => ({ fn: 'log1p' as const, x })), { fn: 'exp', x: 1 }];
  const input = cs.map((k) => (k.fn === 'pow' ? `pow ${bits(k.x)} ${bits(k.y)}` : `${k.fn} ${bits(k.x)}`)).join('\n');
  const ref = runJavaCached(REFERENCE, input + '\n').trim().split('\n');
  cached = { cs, ref };
  return cached;
}

describe('generators/numeric against java.lang.StrictMath (fdlibm 5.3 by specification)', () => {
  it('gives the same bits at every branch edge, special value and seeded random argument', () => {
    const { cs: all, ref: allRef } = reference();
    expect(allRef.length).toBe(all.length);
    const n = all.length - BAND.length - OUTSIDE.length - 1;
    const cs = all.slice(0, n);
    const differ = cs.flatMap((k, i) => {
      const got = bits(ours(k));
      // every NaN is a NaN: only the bits of numbers are compared
      const same = got === allRef[i] || (Number.isNaN(ours(k)) && Number.isNaN(fromBits(BigInt(`0x${allRef[i]}`))));
      return same ? [] : [`${label(k)}: ${got}, StrictMath ${allRef[i]}`];
    });
    expect(differ.slice(0, 20), `${differ.length} of ${cs.length} differ`).toEqual([]);
    expect(cs.length).toBeGreaterThan(30_000);
  });

  it('log1p just below −0.2929 (high word 0xbfd2bec4): V8’s bits, and StrictMath’s only through the other branch', () => {
    expect(BAND.filter((x) => !Object.is(log1p(x), Math.log1p(x)))).toEqual([]);
    // the band is where the two bounds disagree: StrictMath's bits there differ for some arguments,
    // and agree at the neighbours just outside it
    const { cs, ref } = reference();
    const at = cs.length - 1 - OUTSIDE.length - BAND.length;
    expect(BAND.some((x, i) => bits(log1p(x)) !== ref[at + i])).toBe(true);
    OUTSIDE.forEach((x, i) => expect(bits(log1p(x)), `log1p(${x})`).toBe(ref[at + BAND.length + i]));
  });

  it('exp(1) is Math.E, V8’s value (one ulp below fdlibm’s, which StrictMath gives)', () => {
    const { ref } = reference();
    expect(exp(1)).toBe(Math.E);
    expect(BigInt(`0x${ref[ref.length - 1]}`) - BigInt(`0x${bits(Math.E)}`)).toBe(1n);
  });
});
