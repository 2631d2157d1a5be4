/** kiln gather: thin shell over generators/pipeline/gather.ts. */
import { resolve } from 'node:path';
import { BuildRefused } from '../pipeline/build.ts';
import { gather } from '../pipeline/gather.ts';
import { optFlag, optString, type CommandSpec } from './args.ts';
import { DEFAULT_CONTENT_DIR, DEFAULT_OUT_DIR, parseWorkers } from './build.ts';

export const command: CommandSpec = {
  name: 'gather',
  summary:
    'Check the shard folders of a sharded build against a fresh plan of the content tree (every job present once, current, intact), then write the same output a one-machine `kiln build` writes, byte for byte.',
  usage: 'kiln gather SHARD_DIR... [--content DIR] [--out DIR] [--plan FILE] [--workers N] [--quiet]',
  positionals: { min: 1, max: Infinity, names: 'SHARD_DIR... (folders written by kiln build --shard)' },
  options: [
    { name: 'content', arg: 'DIR', help: `content tree the shards were built from (default ${DEFAULT_CONTENT_DIR})` },
    { name: 'out', arg: 'DIR', help: `output directory, replaced atomically (default ${DEFAULT_OUT_DIR})` },
    { name: 'plan', arg: 'FILE', help: 'the plan the shards were built from: refused unless it is the plan of the content now' },
    { name: 'workers', arg: 'N', help: 'worker threads (default: one per core)' },
    { name: 'quiet', help: 'print only the summary' },
  ],
  async run(args) {
    const contentDir = resolve(optString(args, 'content') ?? DEFAULT_CONTENT_DIR);
    const outDir = resolve(optString(args, 'out') ?? DEFAULT_OUT_DIR);
    const plan = optString(args, 'plan');
    const say = (line: string) => process.stderr.write(`kiln gather: ${line}\n`);
    try {
      const t0 = performance.now();
      const s = await gather({
        contentDir,
        outDir,
        shardDirs: args.positionals.map((d) => resolve(d)),
        planFile: plan === undefined ? undefined : resolve(plan),
        workers: parseWorkers(optString(args, 'workers')),
        log: optFlag(args, 'quiet') ? undefined : say,
        warn: say,
      });
      process.stdout.write(
        `kiln gather: ${s.shards} shards, ${s.jobs.gathered} jobs verified; ${s.releases.length} releases, ${s.products} products written to ${outDir} in ${((performance.now() - t0) / 1000).toFixed(1)} s\n`,
      );
      return 0;
    } catch (e) {
      if (e instanceof BuildRefused) {
        process.stderr.write(`kiln gather: refused, nothing written:\n${e.message}\n`);
        return 1;
      }
      throw e;
    }
  },
};
