/**
 * A release's checks as the build makes them, without touching any output folder: builds the
 * content up to that release in a private temporary folder (a refused candidate still yields its
 * checks) and returns them. Behind `kiln report`.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { build, BuildRefused, type BuildOptions, type ReleaseOutcome } from './build.ts';

/** Temp folder prefix; the pid lets a cleaner tell a live report from litter. */
const TEMP_PREFIX = 'kiln-report-';

export async function releaseChecks(opts: { contentDir: string; id: string; log?: BuildOptions['log'] }): Promise<ReleaseOutcome> {
  const tmp = mkdtempSync(join(tmpdir(), `${TEMP_PREFIX}${process.pid}-`));
  try {
    let outcomes: ReleaseOutcome[];
    try {
      outcomes = (await build({ contentDir: resolve(opts.contentDir), outDir: join(tmp, 'out'), upTo: opts.id, log: opts.log })).releases;
    } catch (e) {
      if (!(e instanceof BuildRefused)) throw e;
      outcomes = e.outcomes;
    }
    // The build stops after the named release (resolved there: key, instrument~id or bare id), so it is the last.
    return outcomes[outcomes.length - 1];
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}
