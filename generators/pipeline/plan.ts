/**
 * The build plan: every job a build of a content tree runs (the detectors of each release that is
 * not served from its archive), with its input fingerprint, as a JSON document a batch scheduler
 * reads (`kiln plan`). Shards are a fixed function of the plan: job i (in plan order) belongs to
 * shard (i mod N) + 1 of N, so every machine agrees on the split without talking to the others.
 *
 *   { schema: "kiln/plan/1", generator, planSha256, content, jobs: [{ id, release, detector, fingerprint }] }
 *
 * `planSha256` covers the generator and the jobs: two plans are the same plan exactly when their
 * digests are equal. `content` (the tree's absolute path) is outside it and only names the cause
 * of a mismatch: a plan of another tree.
 */
import { loadContent } from '../content/index.ts';
import type { ContentTree } from '../content/types.ts';
import { KilnInputError } from '../errors.ts';
import { readRegularFile } from '../node/files.ts';
import { verifyFrozenReleases } from './build.ts';
import { generatorVersion } from './generator-version.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import { modelJobs } from './model-jobs.ts';
import { jobFingerprint, jobIdOf } from './job-output.ts';
import type { JobTask } from './pool.ts';

export const PLAN_SCHEMA = 'kiln/plan/1';
/** A plan file is a list of ids and digests: far below this even at 100,000 jobs. */
export const MAX_PLAN_BYTES = 64 * 1024 * 1024;

export interface PlannedJob {
  /** "<release>/<detector>", as in job outputs. */
  id: string;
  release: string;
  detector: string;
  fingerprint: string;
}

export interface BuildPlan {
  schema: typeof PLAN_SCHEMA;
  generator: string;
  planSha256: string;
  /** Absolute path of the content tree the plan was made from (informative). */
  content: string;
  jobs: PlannedJob[];
}

export interface Shard {
  /** 1-based. */
  index: number;
  count: number;
}

export const shardLabel = (s: Shard): string => `${s.index}/${s.count}`;

/** The shard (1-based) that job number `i` (0-based, plan order) belongs to among `count`. */
export const shardOfJob = (i: number, count: number): number => (i % count) + 1;

export const planDigest = (generator: string, jobs: PlannedJob[]): string =>
  sha256Hex(canonicalJson({ schema: PLAN_SCHEMA, generator, jobs: jobs.map((j) => [j.id, j.fingerprint]) }));

/** The plan of a loaded content tree, with the runnable tasks aligned with `plan.jobs`. */
export function planOf(content: ContentTree): { plan: BuildPlan; tasks: JobTask[] } {
  const { isFrozen } = verifyFrozenReleases(content);
  const generator = generatorVersion();
  const keyed = content.releases.filter((r) => !isFrozen(r)).flatMap((r) => modelJobs(r).jobs.map((job) => ({ key: r.release.key, task: { job, fingerprint: jobFingerprint(job, generator), generator } })));
  const tasks: JobTask[] = keyed.map((k) => k.task);
  // `release` is the release's key (its folder name), as in the build output.
  const jobs = keyed.map(({ key, task: t }) => ({ id: jobIdOf(t.job), release: key, detector: t.job.detector.id, fingerprint: t.fingerprint }));
  return { plan: { schema: PLAN_SCHEMA, generator, planSha256: planDigest(generator, jobs), content: content.root, jobs }, tasks };
}

export async function makePlan(contentDir: string): Promise<{ plan: BuildPlan; tasks: JobTask[] }> {
  return planOf(await loadContent(contentDir));
}

/** Reads a plan file; anything that is not a kiln/plan/1 document is refused naming the file. */
export function readPlan(file: string): BuildPlan {
  const text = new TextDecoder().decode(readRegularFile(file, { maxBytes: MAX_PLAN_BYTES, limitName: 'the plan limit', expected: 'a plan written by `kiln plan`' }));
  let doc: Partial<BuildPlan>;
  try {
    doc = JSON.parse(text) as Partial<BuildPlan>;
  } catch {
    throw new KilnInputError('plan file is not JSON', { file, expected: 'a plan written by `kiln plan`' });
  }
  if (doc === null || typeof doc !== 'object' || doc.schema !== PLAN_SCHEMA)
    throw new KilnInputError('not a build plan', { file, field: 'schema', value: doc?.schema ?? null, expected: PLAN_SCHEMA });
  const ok =
    typeof doc.generator === 'string' &&
    typeof doc.planSha256 === 'string' &&
    typeof doc.content === 'string' &&
    Array.isArray(doc.jobs) &&
    doc.jobs.every((j) => j && typeof j.id === 'string' && typeof j.fingerprint === 'string' && typeof j.release === 'string' && typeof j.detector === 'string');
  if (!ok) throw new KilnInputError('malformed build plan', { file, expected: 'generator, planSha256, content and jobs [{ id, release, detector, fingerprint }]' });
  const plan = doc as BuildPlan;
  if (planDigest(plan.generator, plan.jobs) !== plan.planSha256)
    throw new KilnInputError('plan file was edited: its jobs do not match its planSha256', { file, field: 'planSha256', value: plan.planSha256, expected: 'a plan as `kiln plan` wrote it' });
  return plan;
}

/**
 * Refuses a plan that is not the plan of the content tree as it is now: made by another Kiln
 * version, from another content tree, or stale (the content changed after planning). Names the
 * first job that differs.
 */
export function assertPlanCurrent(given: BuildPlan, fresh: BuildPlan, file: string): void {
  if (given.planSha256 === fresh.planSha256) return;
  const todo = 'make a new plan with `kiln plan` and rebuild the shards from it';
  if (given.generator !== fresh.generator)
    throw new KilnInputError('plan was made by another Kiln version', { file, field: 'generator', value: given.generator, expected: fresh.generator, todo });
  // Fingerprints include file paths: a plan of a tree elsewhere can never match, so say so.
  if (given.content !== fresh.content)
    throw new KilnInputError('plan was made from another content tree', { file, field: 'content', value: given.content, expected: fresh.content, todo });
  const now = new Map(fresh.jobs.map((j) => [j.id, j.fingerprint]));
  const then = new Set(given.jobs.map((j) => j.id));
  const changed = given.jobs.find((j) => now.has(j.id) && now.get(j.id) !== j.fingerprint);
  if (changed)
    throw new KilnInputError(`plan is stale: the inputs of job ${changed.id} changed since planning`, { file, value: changed.fingerprint.slice(0, 12), expected: `fingerprint ${now.get(changed.id)!.slice(0, 12)} of the content now`, todo });
  const gone = given.jobs.find((j) => !now.has(j.id));
  const added = fresh.jobs.find((j) => !then.has(j.id));
  const what = gone ? `job ${gone.id} is not in the content tree` : added ? `job ${added.id} of the content tree is not in the plan` : 'its jobs are in another order';
  throw new KilnInputError(`plan is from another content tree or stale: ${what}`, { file, expected: `the plan of ${fresh.content}`, todo });
}
