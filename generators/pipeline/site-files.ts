/**
 * The split site documents on disk (Node layer): written with the build's fixed JSON form, read
 * back with their schema checked, joined into a whole release where one is wanted.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { SUMMARY_FILE } from '../site-data/paths.ts';
import { joinRelease, type JoinParts, type SiteDocument } from '../site-data/split.ts';
import type { Check, ReleaseSite, ReleaseSummaryDoc } from '../site-data/types.ts';

/** The build's JSON form: compact, fixed key order as built, non-finite numbers as null. */
export function json(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 0) + '\n';
}

export function writeJson(path: string, value: unknown): void {
  writeFileSync(path, json(value));
}

export function writeSiteDocuments(releaseDir: string, docs: SiteDocument[]): void {
  for (const d of docs) {
    const file = join(releaseDir, d.path);
    mkdirSync(dirname(file), { recursive: true });
    writeJson(file, d.doc);
  }
}

/** One document of a built release, its schema checked. */
export function readSiteDocument<T>(releaseDir: string, path: string): T {
  const file = join(releaseDir, path);
  if (!existsSync(file)) throw new KilnInputError('site document missing from the build output', { file, expected: 'the documents `kiln build` writes (rebuild)' });
  const v = JSON.parse(readFileSync(file, 'utf8')) as { schema?: unknown };
  if (typeof v.schema !== 'string' || !v.schema.startsWith('kiln/'))
    throw new KilnInputError('not a Kiln site document', { file, field: 'schema', value: String(v.schema), expected: 'a kiln/… schema' });
  return v as T;
}

export function hasReleaseSummary(releaseDir: string): boolean {
  return existsSync(join(releaseDir, SUMMARY_FILE));
}

export function readReleaseSummary(releaseDir: string): ReleaseSummaryDoc {
  return readSiteDocument<ReleaseSummaryDoc>(releaseDir, SUMMARY_FILE);
}

/** A built release as one object (whole-release uses only: publishing, `kiln compare`, tests). */
export function readReleaseSite(releaseDir: string, parts: JoinParts = {}): { site: ReleaseSite; checks: Check[] } {
  return joinRelease(readReleaseSummary(releaseDir), (p) => readSiteDocument(releaseDir, p), parts);
}
