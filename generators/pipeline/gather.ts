/**
 * `kiln gather SHARD...`: checks the shard folders against a fresh plan of the content tree, then
 * runs the normal build with every job's output taken from the shards (BuildOptions.prebuilt), so
 * the cross-release review, site data and output tree are exactly what a one-machine build writes.
 *
 * Nothing is written unless every planned job is present exactly once, with the fingerprint the
 * content gives now (not stale), built by this Kiln version, and its sealed output intact (every
 * file's SHA-256). A refusal is one line naming the job and the shard.
 */
import { existsSync } from 'node:fs';
import { readRegularFile } from '../node/files.ts';
import { join } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { build, type BuildOptions, type BuildSummary } from './build.ts';
import { readJobEntry } from './job-store.ts';
import { assertPlanCurrent, makePlan, MAX_PLAN_BYTES, readPlan, shardOfJob, type BuildPlan } from './plan.ts';
import { SHARD_JOBS, SHARD_MANIFEST, SHARD_SCHEMA, type ShardManifest } from './shard.ts';

export interface GatherOptions extends Pick<BuildOptions, 'contentDir' | 'outDir' | 'workers' | 'log' | 'warn'> {
  shardDirs: string[];
  /** The plan the shards were built from: refused unless it is the plan of the content now. */
  planFile?: string;
}

export interface GatherSummary extends BuildSummary {
  shards: number;
}

/** Where a planned job's output is: its shard folder and the shard's label ("2/3"). */
interface Source {
  dir: string;
  label: string;
  fingerprint: string;
}

/** How many job ids a refusal lists before "…": the line stays readable at thousands of jobs. */
const MAX_NAMED = 6;
const names = (ids: string[]): string => ids.slice(0, MAX_NAMED).join(', ') + (ids.length > MAX_NAMED ? `, … (${ids.length} in all)` : '');

function readManifest(dir: string): ShardManifest {
  const file = join(dir, SHARD_MANIFEST);
  if (!existsSync(file)) throw new KilnInputError('not a shard folder (no shard.json)', { file: dir, expected: 'a folder written by `kiln build --shard K/N --out DIR`' });
  let m: Partial<ShardManifest>;
  try {
    // A manifest lists no more than a plan does.
    const bytes = readRegularFile(file, { maxBytes: MAX_PLAN_BYTES, limitName: 'the plan limit', expected: 'a shard manifest written by `kiln build --shard`' });
    m = JSON.parse(new TextDecoder().decode(bytes)) as Partial<ShardManifest>;
  } catch (e) {
    if (e instanceof KilnInputError) throw e;
    throw new KilnInputError('shard manifest is not JSON', { file });
  }
  if (m === null || typeof m !== 'object' || m.schema !== SHARD_SCHEMA) throw new KilnInputError('not a shard manifest', { file, field: 'schema', value: m?.schema ?? null, expected: SHARD_SCHEMA });
  const ok = typeof m.generator === 'string' && Number.isInteger(m.shard) && Number.isInteger(m.of) && Array.isArray(m.jobs) && m.jobs.every((j) => j && typeof j.id === 'string' && typeof j.fingerprint === 'string');
  if (!ok) throw new KilnInputError('malformed shard manifest', { file, expected: 'generator, shard, of and jobs [{ id, fingerprint }]' });
  return m as ShardManifest;
}

/**
 * Maps every planned job to the shard holding it, or throws one line: a shard of another Kiln
 * version or another split, a job in two shards, a job not in the plan, a stale job (its inputs
 * changed after the shard was built), a planned job no shard holds, an entry that fails its seal.
 */
export function verifyShards(plan: BuildPlan, shardDirs: string[]): Map<string, Source> {
  const planned = new Map(plan.jobs.map((j, i) => [j.id, { fingerprint: j.fingerprint, shard: i }]));
  const found = new Map<string, Source>();
  const given = new Map<number, string>();
  let count: number | null = null;
  for (const dir of shardDirs) {
    const m = readManifest(dir);
    const label = `${m.shard}/${m.of}`;
    const where = { file: join(dir, SHARD_MANIFEST) };
    if (m.generator !== plan.generator)
      throw new KilnInputError(`shard ${label} was built by another Kiln version`, { ...where, field: 'generator', value: m.generator, expected: plan.generator, todo: 'rebuild the shard with this Kiln' });
    if (count !== null && m.of !== count)
      throw new KilnInputError(`shard ${label} is from a split into ${m.of}, the others into ${count}`, { ...where, field: 'of', value: m.of, expected: String(count) });
    count = m.of;
    const twice = given.get(m.shard);
    if (twice !== undefined) throw new KilnInputError(`shard ${label} is given twice: ${twice} and ${dir}`, { expected: 'each shard once' });
    given.set(m.shard, dir);
    for (const j of m.jobs) {
      const seen = found.get(j.id);
      if (seen) throw new KilnInputError(`job ${j.id} is in two shards: ${seen.label} (${seen.dir}) and ${label} (${dir})`, { ...where, expected: 'each job in exactly one shard' });
      const p = planned.get(j.id);
      if (!p) throw new KilnInputError(`job ${j.id} of shard ${label} is not in the plan of this content tree (a shard of another content tree?)`, { ...where, expected: 'shards built from this content tree' });
      if (p.fingerprint !== j.fingerprint)
        throw new KilnInputError(`job ${j.id} of shard ${label} is stale: its inputs changed after the shard was built (or it is from another content tree)`, {
          ...where,
          value: j.fingerprint.slice(0, 12),
          expected: `fingerprint ${p.fingerprint.slice(0, 12)} of the content now`,
          todo: 'make a new plan and rebuild the shards',
        });
      found.set(j.id, { dir, label, fingerprint: j.fingerprint });
    }
  }
  const missing = plan.jobs.filter((j) => !found.has(j.id));
  if (missing.length) {
    const n = count ?? 1;
    const absent = [...new Set(missing.map((j) => shardOfJob(planned.get(j.id)!.shard, n)))].filter((k) => !given.has(k)).sort((a, b) => a - b);
    const why = absent.length ? `shard ${absent.map((k) => `${k}/${n}`).join(', ')} not given or failed` : 'no shard holds them: jobs added after the shards were built?';
    throw new KilnInputError(`${missing.length} of ${plan.jobs.length} planned jobs missing: ${names(missing.map((j) => j.id))} (${why})`, { todo: 'build the missing shards and gather again' });
  }
  // Every entry is opened and hashed before anything is written (and again when it is used).
  for (const [id, s] of found) checkedEntry(id, s, plan.generator);
  return found;
}

function checkedEntry(id: string, s: Source, generator: string) {
  const e = readJobEntry(join(s.dir, SHARD_JOBS), s.fingerprint, { job: id, generator });
  if (!e.ok) throw new KilnInputError(`job ${id} of shard ${s.label} is ${e.missing ? 'missing from its folder' : 'damaged'}: ${e.reason}`, { file: join(s.dir, SHARD_JOBS, s.fingerprint), todo: 'rebuild that shard' });
  return e.output;
}

export async function gather(opts: GatherOptions): Promise<GatherSummary> {
  const { plan } = await makePlan(opts.contentDir);
  if (opts.planFile !== undefined) assertPlanCurrent(readPlan(opts.planFile), plan, opts.planFile);
  const sources = verifyShards(plan, opts.shardDirs);
  const prebuilt = (jobId: string, fingerprint: string) => {
    const s = sources.get(jobId);
    if (!s || s.fingerprint !== fingerprint) throw new KilnInputError(`job ${jobId} (fingerprint ${fingerprint.slice(0, 12)}) is in no shard: the content changed while gathering`, { file: opts.contentDir });
    return checkedEntry(jobId, s, plan.generator);
  };
  const { contentDir, outDir, workers, log, warn } = opts;
  const summary = await build({ contentDir, outDir, workers, log, warn, prebuilt });
  return { ...summary, shards: opts.shardDirs.length };
}
