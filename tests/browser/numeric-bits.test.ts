/**
 * generators/numeric gives the same bits in Debian's chromium as in Node, on the seeded arguments
 * of tests/numeric (the reason it exists: ECMA-262 leaves Math.exp/log/pow to the engine, and
 * Chromium's differ from Node 20's in the last bit for some inputs, which moved float32 values of
 * a response built in the browser). The module is bundled for the browser with esbuild, as the
 * site's worker chunk is. The arguments are made in Node and sent as JSON (round-trip exact), since
 * making them in the page would itself use the engine's Math.
 */
import { describe, expect, it } from 'vitest';
import { build } from 'esbuild';
import { join } from 'node:path';
import { launch } from './support/browser.ts';
import { exp, expm1, log, log1p, pow } from '../../generators/numeric/index.ts';
import { bits, samples } from '../numeric/samples.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const N = 20_000;

type Results = Record<'exp' | 'log' | 'expm1' | 'log1p' | 'pow' | 'mathExp' | 'mathLog' | 'mathPow', string[]>;

/** Runs in the page (and, for the reference, in Node) over the same arguments. */
function evaluate(m: { exp: typeof exp; log: typeof log; expm1: typeof expm1; log1p: typeof log1p; pow: typeof pow }, S: ReturnType<typeof samples>, hex: (x: number) => string): Results {
  return {
    exp: S.exp.map((x) => hex(m.exp(x))),
    log: S.log.map((x) => hex(m.log(x))),
    expm1: S.small.map((x) => hex(m.expm1(x))),
    log1p: S.small.map((x) => hex(m.log1p(x))),
    pow: S.powBase.map((b, i) => hex(m.pow(b, S.powExp[i]))),
    mathExp: S.exp.map((x) => hex(Math.exp(x))),
    mathLog: S.log.map((x) => hex(Math.log(x))),
    mathPow: S.powBase.map((b, i) => hex(Math.pow(b, S.powExp[i]))),
  };
}

describe('deterministic elementary functions in chromium', () => {
  it('exp, log, expm1, log1p and pow give Node\'s bits for 20,000 arguments each', async () => {
    const bundle = await build({
      stdin: {
        contents: `export { exp, log, expm1, log1p, pow } from './generators/numeric/index.ts'; export { bits } from './tests/numeric/samples.ts';`,
        resolveDir: ROOT,
        loader: 'ts',
      },
      bundle: true,
      write: false,
      format: 'iife',
      globalName: 'kilnNumeric',
      platform: 'browser',
      logLevel: 'silent',
    });
    const S = samples(N);
    const node = evaluate({ exp, log, expm1, log1p, pow }, S, bits);
    const { context, close } = await launch();
    try {
      const page = await context.newPage();
      await page.setContent('<!doctype html><title>numeric</title>');
      await page.addScriptTag({ content: bundle.outputFiles[0].text });
      const inPage = (await page.evaluate(
        `(${evaluate.toString()})(kilnNumeric, ${JSON.stringify(S)}, kilnNumeric.bits)`,
      )) as Results;
      for (const name of ['exp', 'log', 'expm1', 'log1p', 'pow'] as const) {
        const differ = inPage[name].filter((b, i) => b !== node[name][i]).length;
        expect(differ, `${name}: chromium and Node differ on ${differ} of ${N} arguments`).toBe(0);
      }
      // What the engine itself does (reported, not asserted: it is the engine's choice).
      const engine = (a: string[], b: string[]) => a.filter((x, i) => x !== b[i]).length;
      console.log(`chromium vs Node 20, engine Math: exp ${engine(inPage.mathExp, node.mathExp)}, log ${engine(inPage.mathLog, node.mathLog)}, pow ${engine(inPage.mathPow, node.mathPow)} of ${N} differ`);
    } finally {
      await close();
    }
  });
});
