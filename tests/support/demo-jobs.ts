/**
 * The demo's detector jobs, loaded in-process (generators/content loadContent + pipeline jobsOf),
 * for tests that exercise the build's per-detector steps without spawning `kiln build`.
 */
import { join } from 'node:path';
import { loadContent } from '../../generators/content/index.ts';
import { jobsOf } from '../../generators/pipeline/inputs.ts';
import type { DetectorJob } from '../../generators/pipeline/job.ts';

/** content/ of the working tree, or the tree named by KILN_TEST_CONTENT (as the pipeline tests). */
export const DEMO_CONTENT_DIR = process.env.KILN_TEST_CONTENT ?? join(import.meta.dirname, '..', '..', 'content');

/** Jobs of every release, keyed by release id. */
export async function demoJobs(): Promise<Map<string, DetectorJob[]>> {
  const content = await loadContent(DEMO_CONTENT_DIR);
  return new Map(content.releases.map((r) => [r.release.id, jobsOf(r)]));
}
