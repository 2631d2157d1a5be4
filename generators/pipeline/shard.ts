/**
 * `kiln build --shard K/N`: runs only the jobs of shard K of N of the plan and writes their
 * outputs into a shard folder, in the job-store layout (job-store.ts), with no release trees:
 *
 *   <shard>/shard.json          ShardManifest (which plan, which shard, which jobs)
 *   <shard>/jobs/<fingerprint>/ one sealed job output per job
 *
 * The folder is staged and swapped in whole (atomic.ts), so a killed shard leaves no folder a
 * gather could mistake for a complete one. An empty shard (more shards than jobs) is a valid one.
 */
import { join } from 'node:path';
import { mkdirSync } from 'node:fs';
import { recoverInterruptedSwap, removeStaleStaging, stagingDir, swapInto } from './atomic.ts';
import { withLock } from './lock.ts';
import { writeJobEntry } from './job-store.ts';
import { jobIdOf } from './job-output.ts';
import { JobPool, defaultWorkerCount } from './pool.ts';
import { assertPlanCurrent, makePlan, readPlan, shardLabel, shardOfJob, type Shard } from './plan.ts';
import { writeJson } from './site-files.ts';

export const SHARD_SCHEMA = 'kiln/shard/1';
export const SHARD_MANIFEST = 'shard.json';
export const SHARD_JOBS = 'jobs';

export interface ShardManifest {
  schema: typeof SHARD_SCHEMA;
  generator: string;
  planSha256: string;
  shard: number;
  of: number;
  jobs: { id: string; fingerprint: string }[];
}

export interface ShardOptions {
  contentDir: string;
  outDir: string;
  shard: Shard;
  /** A plan file from `kiln plan`: refused unless it is the plan of the content as it is now. */
  planFile?: string;
  workers?: number;
  log?: (line: string) => void;
}

export async function buildShard(opts: ShardOptions): Promise<{ outDir: string; jobs: number; planned: number }> {
  const { plan, tasks } = await makePlan(opts.contentDir);
  if (opts.planFile !== undefined) assertPlanCurrent(readPlan(opts.planFile), plan, opts.planFile);
  const { index, count } = opts.shard;
  const mine = tasks.filter((_, i) => shardOfJob(i, count) === index);
  const log = opts.log ?? (() => {});
  mkdirSync(join(opts.outDir, '..'), { recursive: true });
  return withLock(opts.outDir, 'kiln build --shard', async () => {
    recoverInterruptedSwap(opts.outDir);
    removeStaleStaging(opts.outDir);
    const staging = stagingDir(opts.outDir);
    const root = join(staging, SHARD_JOBS);
    mkdirSync(root, { recursive: true });
    const pool = new JobPool(opts.workers ?? defaultWorkerCount());
    let done = 0;
    try {
      await pool.run(mine, (out) => {
        writeJobEntry(root, out);
        log(`shard ${shardLabel(opts.shard)}: job ${out.meta.job} built, ${out.meta.files.length} products [${++done}/${mine.length}]`);
      });
    } catch (e) {
      removeStaleStaging(opts.outDir);
      throw e;
    } finally {
      await pool.close();
    }
    const manifest: ShardManifest = {
      schema: SHARD_SCHEMA,
      generator: plan.generator,
      planSha256: plan.planSha256,
      shard: index,
      of: count,
      jobs: mine.map((t) => ({ id: jobIdOf(t.job), fingerprint: t.fingerprint })),
    };
    writeJson(join(staging, SHARD_MANIFEST), manifest);
    swapInto(staging, opts.outDir);
    return { outDir: opts.outDir, jobs: mine.length, planned: tasks.length };
  });
}
