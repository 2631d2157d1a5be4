/**
 * kiln site: products and site for one content tree, in one step. Runs `kiln build` on --content
 * into --data (a private temporary folder when --out is given without --data), then the Astro site
 * of this project (its root is the project, whatever the working directory) reading that output
 * and the same content tree, into --out. Relative paths are taken from the working directory;
 * nothing else is written there.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build, BuildRefused } from '../pipeline/build.ts';
import { optFlag, optString, UsageError, type CommandSpec } from './args.ts';
import { DEFAULT_CONTENT_DIR, DEFAULT_OUT_DIR } from './build.ts';

/** Site folder when --out is not given (the project's `npm run build` writes dist/). */
export const DEFAULT_SITE_DIR = 'dist';
const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const SITE_SCRIPT = join(PROJECT_ROOT, 'scripts', 'build-site.mjs');
/** Temp folder prefix; the pid lets a cleaner tell a live run from litter. */
const TEMP_PREFIX = 'kiln-site-';

function runSiteStep(env: Record<string, string>, quiet: boolean): Promise<number> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [SITE_SCRIPT], { cwd: PROJECT_ROOT, env: { ...process.env, ...env }, stdio: ['ignore', quiet ? 'ignore' : 'inherit', 'inherit'] });
    child.on('error', fail);
    child.on('exit', (code, signal) => done(code ?? (signal ? 1 : 0)));
  });
}

export const command: CommandSpec = {
  name: 'site',
  summary: 'Build products and the site for one content tree: kiln build, then the browsable site reading that build and the same tree. Exit 0 ok, 1 a candidate fails checks or the site step failed, 2 bad input.',
  usage: 'kiln site [--content DIR] [--out DIR] [--data DIR] [--workers N] [--quiet]',
  positionals: { min: 0, max: 0, names: '' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'out', arg: 'DIR', help: `site folder, replaced atomically when the site is complete (default ${DEFAULT_SITE_DIR})` },
    { name: 'data', arg: 'DIR', help: `keep the build output (JSON documents, products) here (default ${DEFAULT_OUT_DIR} without --out, else a temporary folder removed afterwards)` },
    { name: 'workers', arg: 'N', help: 'worker threads for product generation (default: one per core)' },
    { name: 'quiet', help: 'print only the summary' },
  ],
  async run(args) {
    const contentDir = resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR);
    const outArg = optString(args, 'out');
    const siteDir = resolve(outArg ?? DEFAULT_SITE_DIR);
    const dataArg = optString(args, 'data') ?? (outArg === undefined ? DEFAULT_OUT_DIR : undefined);
    const w = optString(args, 'workers');
    const workers = w === undefined ? undefined : Number(w);
    if (workers !== undefined && !(Number.isInteger(workers) && workers >= 1)) throw new UsageError(`--workers must be a whole number ≥ 1 (got "${w}")`);
    const quiet = optFlag(args, 'quiet');
    const log = quiet ? undefined : (line: string) => process.stderr.write(`kiln site: ${line}\n`);
    const tmp = dataArg === undefined ? mkdtempSync(join(tmpdir(), `${TEMP_PREFIX}${process.pid}-`)) : null;
    const dataDir = tmp ? join(tmp, 'out') : resolve(dataArg!);
    try {
      const t0 = performance.now();
      let s;
      try {
        s = await build({ contentDir, outDir: dataDir, workers, log });
      } catch (e) {
        if (e instanceof BuildRefused) {
          process.stderr.write(`kiln site: refused, nothing written:\n${e.message}\n`);
          return 1;
        }
        throw e;
      }
      const env: Record<string, string> = { KILN_OUT: dataDir, KILN_CONTENT: contentDir, KILN_SITE_DIST: siteDir };
      const code = await runSiteStep(env, quiet);
      if (code !== 0) {
        process.stderr.write(`kiln site: the site step failed (exit ${code}); ${siteDir} left as it was\n`);
        return 1;
      }
      process.stdout.write(`kiln site: ${s.releases.length} releases, ${s.products} products; site written to ${siteDir} in ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
      return 0;
    } finally {
      if (tmp) rmSync(tmp, { recursive: true, force: true });
    }
  },
};
