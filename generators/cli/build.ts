/** kiln build: thin shell over generators/pipeline/build.ts. */
import { resolve } from 'node:path';
import { build, BuildRefused } from '../pipeline/build.ts';
import { shardLabel, type Shard } from '../pipeline/plan.ts';
import { buildShard } from '../pipeline/shard.ts';
import { optFlag, optString, UsageError, type CommandSpec } from './args.ts';

export const DEFAULT_CONTENT_DIR = 'content';
export const DEFAULT_OUT_DIR = '.kiln/out';

const USAGE = 'kiln build [--content DIR] [--out DIR] [--workers N] [--cache DIR] [--no-cache] [--shard K/N [--plan FILE]] [--quiet]';

/** "--workers N": a whole number ≥ 1, or undefined when not given. */
export function parseWorkers(w: string | undefined): number | undefined {
  const workers = w === undefined ? undefined : Number(w);
  if (workers !== undefined && !(Number.isInteger(workers) && workers >= 1)) throw new UsageError(`--workers must be a whole number ≥ 1 (got "${w}")`);
  return workers;
}

/** "--shard K/N": whole numbers with 1 ≤ K ≤ N; anything else is a usage error showing the form. */
export function parseShard(text: string): Shard {
  const m = /^(\d+)\/(\d+)$/.exec(text.trim());
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!m || !Number.isSafeInteger(index) || !Number.isSafeInteger(count) || count < 1 || index < 1 || index > count)
    throw new UsageError(`--shard must be K/N with whole numbers 1 ≤ K ≤ N, e.g. --shard 2/4 (got "${text}"); usage: kiln build --shard K/N [--plan FILE] --out SHARD_DIR`);
  return { index, count };
}

export const command: CommandSpec = {
  name: 'build',
  summary: 'Build every release of the content tree: products (RMF, ARF), validation reports, manifests and site data.',
  usage: USAGE,
  positionals: { min: 0, max: 0, names: '' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree to build (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'out', arg: 'DIR', help: `output directory, replaced atomically when the build succeeds (default ${DEFAULT_OUT_DIR})` },
    { name: 'workers', arg: 'N', help: 'worker threads for product generation (default: one per core)' },
    { name: 'cache', arg: 'DIR', help: 'job cache: unchanged jobs reuse their verified outputs (default .kiln/cache for .kiln/out, else OUT.cache)' },
    { name: 'no-cache', help: 'rebuild every job (the cache is refreshed)' },
    { name: 'shard', arg: 'K/N', help: 'build only shard K of N of the plan (jobs K, K+N, K+2N…) into the shard folder --out, for `kiln gather`' },
    { name: 'plan', arg: 'FILE', help: 'with --shard: the plan from `kiln plan`; refused unless it is the plan of the content now' },
    { name: 'quiet', help: 'print only the summary' },
  ],
  async run(args) {
    const contentDir = resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR);
    const outDir = resolve(optString(args, 'out') ?? DEFAULT_OUT_DIR);
    const workers = parseWorkers(optString(args, 'workers'));
    const quiet = optFlag(args, 'quiet');
    const log = quiet ? undefined : (line: string) => process.stderr.write(`kiln build: ${line}\n`);
    const shardText = optString(args, 'shard');
    const plan = optString(args, 'plan');
    if (shardText === undefined && plan !== undefined) throw new UsageError('--plan FILE goes with --shard K/N (a whole build plans itself)');
    if (shardText !== undefined) {
      const shard = parseShard(shardText);
      if (optString(args, 'out') === undefined) throw new UsageError('--shard K/N needs --out SHARD_DIR (the shard folder to write)');
      for (const o of ['cache', 'no-cache']) if (args.options[o] !== undefined) throw new UsageError(`--${o} does not apply to --shard (a shard runs each of its jobs)`);
      return runShard(contentDir, outDir, shard, plan === undefined ? undefined : resolve(plan), workers, log);
    }
    try {
      const t0 = performance.now();
      const cache = optString(args, 'cache');
      const warn = (line: string) => process.stderr.write(`kiln build: ${line}\n`);
      const s = await build({ contentDir, outDir, workers, log, warn, cacheDir: cache === undefined ? undefined : resolve(cache), noCache: optFlag(args, 'no-cache') });
      const fails = s.releases.reduce((n, r) => n + r.checks.fail, 0);
      process.stdout.write(
        `kiln build: ${s.releases.length} releases, ${s.products} products (${s.jobs.built} jobs built, ${s.jobs.cached} from cache), ` +
          (s.unchanged
            ? `nothing changed: the ${s.unchanged.files} files in ${outDir} verified and left in place (${((performance.now() - t0) / 1000).toFixed(1)} s)`
            : `written to ${outDir} in ${((performance.now() - t0) / 1000).toFixed(1)} s`) +
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

async function runShard(contentDir: string, outDir: string, shard: Shard, planFile: string | undefined, workers: number | undefined, log?: (line: string) => void): Promise<number> {
  const t0 = performance.now();
  const s = await buildShard({ contentDir, outDir, shard, planFile, workers, log });
  process.stdout.write(`kiln build: shard ${shardLabel(shard)}: ${s.jobs} of ${s.planned} planned jobs built, written to ${outDir} in ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
  return 0;
}
