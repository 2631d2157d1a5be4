/**
 * Architecture rules of the project (DEVELOPERS.md): the core of generators/ is browser-safe (no
 * Node built-ins, so the site and, later, an observer's browser can run it), and nothing in
 * generators/ imports Astro. Checked by bundling each core entry for the browser with esbuild:
 * any Node built-in or Astro import makes the bundle fail.
 */
import { describe, expect, it } from 'vitest';
import { build } from 'esbuild';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';

const ROOT = join(import.meta.dirname, '..', '..');
/** Entry points that must run in a browser (what the inspect page and future in-browser builds use). */
const BROWSER_SAFE = [
  'generators/fits/index.ts',
  'generators/numeric/index.ts',
  'generators/ogip/index.ts',
  'generators/physics/index.ts',
  'generators/response/index.ts',
  'generators/fit/index.ts',
  'generators/checks/index.ts',
  'generators/compare/index.ts',
  'generators/spectrum/index.ts',
  'generators/content/source-schema.ts',
  'generators/content/schema.ts',
  'generators/pipeline/product.ts',
  'generators/pipeline/site-detector.ts',
  'generators/pipeline/validate.ts',
];

async function bundleForBrowser(entry: string): Promise<{ errors: string[]; inputs: string[] }> {
  try {
    const r = await build({
      entryPoints: [join(ROOT, entry)],
      bundle: true,
      write: false,
      platform: 'browser',
      format: 'esm',
      metafile: true,
      logLevel: 'silent',
    });
    return { errors: [], inputs: Object.keys(r.metafile!.inputs) };
  } catch (e) {
    const errs = (e as { errors?: { text: string }[] }).errors ?? [{ text: String(e) }];
    return { errors: errs.map((x) => x.text), inputs: [] };
  }
}

function filesUnder(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    return statSync(p).isDirectory() ? filesUnder(p) : p.endsWith('.ts') || p.endsWith('.mjs') ? [p] : [];
  });
}

describe('layering', () => {
  for (const entry of BROWSER_SAFE)
    it(`${entry} bundles for the browser without Node built-ins`, async () => {
      const r = await bundleForBrowser(entry);
      expect(r.errors, r.errors.join('\n')).toEqual([]);
      expect(r.inputs.filter((i) => i.startsWith('node:'))).toEqual([]);
    });

  it('the checker itself works: a module importing node:fs does not bundle for the browser', async () => {
    const r = await bundleForBrowser('generators/node/fits-file.ts');
    expect(r.errors.length).toBeGreaterThan(0);
  });

  it('nothing in generators/ imports Astro', () => {
    // Static (`from 'astro'`, `import 'astro:content'`) and dynamic (`import('astro')`) forms.
    const ASTRO_IMPORT = /(?:from\s+|import\s*\(?\s*)['"](?:astro|astro:[^'"]*|astro\/[^'"]*|@astrojs\/[^'"]*)['"]/;
    expect(ASTRO_IMPORT.test("import { z } from 'astro:content';") && ASTRO_IMPORT.test("await import('astro')") && ASTRO_IMPORT.test("import 'astro/zod';")).toBe(true);
    const offenders = filesUnder(join(ROOT, 'generators')).filter((f) => ASTRO_IMPORT.test(readFileSync(f, 'utf8')));
    expect(offenders.map((f) => relative(ROOT, f))).toEqual([]);
  });

  it('the product core takes exp/log/pow/expm1/log1p from generators/numeric, never from the engine', () => {
    // ECMAScript leaves Math.exp, log, pow, expm1, log1p, hypot, the trigonometric functions and
    // the ** operator to the engine (ECMA-262 §21.3.2, "implementation-approximated"): a product
    // built in a browser would not equal the published bytes. generators/numeric fixes every bit.
    const ENGINE_MATH = /\bMath\.(?:exp|log|log10|log2|pow|expm1|log1p|hypot|cbrt|sinh|cosh|tanh|asinh|acosh|atanh|sin|cos|tan|asin|acos|atan|atan2)\b|[\w)\]]\s*\*\*\s*[\w(.-]/;
    /** Code of a line without doc comments, line comments and single-quoted strings (units such as 'cm**2'). */
    const usesEngineMath = (line: string) => !/^\s*(?:\*|\/\*\*)/.test(line) && ENGINE_MATH.test(line.replace(/\/\/.*$/, '').replace(/'[^']*'/g, "''"));
    expect([usesEngineMath('  y = Math.exp(x);'), usesEngineMath('  y = (a * b) ** 2;'), usesEngineMath('  y = x ** -1;'), usesEngineMath("  { unit: 'cm**2' }"), usesEngineMath(' * Math.exp in a doc comment'), usesEngineMath('  y = exp(x); // not Math.exp')]).toEqual([true, true, true, false, false, false]);
    const CORE = ['fits', 'ogip', 'physics', 'response', 'fit', 'checks', 'compare', 'spectrum', 'model', 'site-data', 'content'];
    const offenders: string[] = [];
    for (const dir of CORE)
      for (const f of filesUnder(join(ROOT, 'generators', dir)))
        readFileSync(f, 'utf8').split('\n').forEach((line, i) => {
          if (usesEngineMath(line)) offenders.push(`${relative(ROOT, f)}:${i + 1}: ${line.trim()}`);
        });
    expect(offenders).toEqual([]);
  });
});
