/** kiln build: thin shell over generators/pipeline/build.ts. */
import { resolve } from 'node:path';
import { build, BuildRefused } from '../pipeline/build.ts';
import { optFlag, optString, UsageError, type CommandSpec } from './args.ts';

export const DEFAULT_CONTENT_DIR = 'content';
export const DEFAULT_OUT_DIR = '.kiln/out';

export const command: CommandSpec = {
  name: 'build',
  summary: 'Build every release of the content tree: products (RMF, ARF), validation reports, manifests and site data.',
  usage: 'kiln build [--content DIR] [--out DIR] [--workers N] [--cache DIR] [--no-cache] [--quiet]',
  positionals: { min: 0, max: 0, names: '' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree to build (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'out', arg: 'DIR', help: `output directory, replaced atomically when the build succeeds (default ${DEFAULT_OUT_DIR})` },
    { name: 'workers', arg: 'N', help: 'worker threads for product generation (default: one per core)' },
    { name: 'cache', arg: 'DIR', help: 'job cache: unchanged jobs reuse their verified outputs (default .kiln/cache for .kiln/out, else OUT.cache)' },
    { name: 'no-cache', help: 'rebuild every job (the cache is refreshed)' },
    { name: 'quiet', help: 'print only the summary' },
  ],
  async run(args) {
    const contentDir = resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR);
    const outDir = resolve(optString(args, 'out') ?? DEFAULT_OUT_DIR);
    const w = optString(args, 'workers');
    const workers = w === undefined ? undefined : Number(w);
    if (workers !== undefined && !(Number.isInteger(workers) && workers >= 1)) throw new UsageError(`--workers must be a whole number ≥ 1 (got "${w}")`);
    const quiet = optFlag(args, 'quiet');
    const log = quiet ? undefined : (line: string) => process.stderr.write(`kiln build: ${line}\n`);
    try {
      const t0 = performance.now();
      const cache = optString(args, 'cache');
      const warn = (line: string) => process.stderr.write(`kiln build: ${line}\n`);
      const s = await build({ contentDir, outDir, workers, log, warn, cacheDir: cache === undefined ? undefined : resolve(cache), noCache: optFlag(args, 'no-cache') });
      const fails = s.releases.reduce((n, r) => n + r.checks.fail, 0);
      process.stdout.write(
        `kiln build: ${s.releases.length} releases, ${s.products} products (${s.jobs.built} jobs built, ${s.jobs.cached} from cache), written to ${outDir} in ${((performance.now() - t0) / 1000).toFixed(1)} s` +
          (fails ? `; ${fails} failed checks in draft releases (see validation.json)` : '') +
          '\n',
      );
      return 0;
    } catch (e) {
      if (e instanceof BuildRefused) {
        process.stderr.write(`kiln build: refused, nothing written:\n${e.message}\n`);
        return 1;
      }
      throw e;
    }
  },
};
