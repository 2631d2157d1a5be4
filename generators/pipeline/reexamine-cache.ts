/**
 * Cache of an archived release's re-examination (`<cache>/reexamined/<key>.json`): today's checks
 * on the archived bytes, with the curves its site data predate (supplement.json per detector),
 * take seconds and depend only on those bytes, the release's frozen inputs
 * and check settings, and the code. The key covers all of them: every sealed file's SHA-256
 * (verified before this runs), the detector jobs the checks read (paths left out, so a moved
 * content tree still hits) and the generator's version, which changes with any code change.
 */
import type { ResolvedRelease } from '../content/types.ts';
import type { DetectorSupplementDoc, ReexaminationDoc } from '../site-data/types.ts';
import type { VerifiedArchive } from './archive.ts';
import { readDocEntry, writeDocEntry, type DocCache } from './doc-cache.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import { jobsOf } from './inputs.ts';
import { reexamineArchive } from './reexamine.ts';

const ENTRY_SCHEMA = 'kiln/reexamined-entry/2';
export const REEXAMINED_DIR = 'reexamined';

/** Drops where inputs live (file and folder paths), keeps what they say. */
const withoutPaths = (v: unknown): unknown =>
  JSON.parse(JSON.stringify(v, (k, x: unknown) => (k === 'file' || k === 'dir' || k.endsWith('File') ? undefined : x)));

export function reexaminedKey(r: ResolvedRelease, archive: VerifiedArchive, generator: string): string {
  return sha256Hex(canonicalJson({ schema: ENTRY_SCHEMA, generator, release: r.release.key, jobs: withoutPaths(jobsOf(r)), sealed: archive.sealed }));
}

export interface ReexamineCacheContext {
  /** `<cache>/reexamined`, or null without a cache. */
  root: string | null;
  noCache: boolean;
  generator: string;
  used: Set<string>;
  warn: (line: string) => void;
  /** Where the entry's write is queued: the build runs it once its output is in place. */
  later: (() => void)[];
}

/** What one entry holds: the re-examination and the supplements per detector. */
interface Entry {
  reexamination: ReexaminationDoc;
  supplements: [string, DetectorSupplementDoc][];
}

/** The release's re-examination and supplements, from the cache when its key is unchanged; `fromCache` says which. */
export function cachedReexamination(c: ReexamineCacheContext, r: ResolvedRelease, archive: VerifiedArchive): { doc: ReexaminationDoc; supplements: Map<string, DetectorSupplementDoc>; fromCache: boolean } {
  const key = reexaminedKey(r, archive, c.generator);
  c.used.add(key);
  const cache: DocCache | null = c.root === null ? null : { root: c.root, schema: ENTRY_SCHEMA };
  if (cache && !c.noCache) {
    const e = readDocEntry<Entry>(cache, key);
    if (e.ok) return { doc: e.doc.reexamination, supplements: new Map(e.doc.supplements), fromCache: true };
    if (!e.missing) c.warn(`cache entry of the re-examination of release ${r.release.key} (${key.slice(0, 12)}) rejected: ${e.reason}; recomputing it`);
  }
  const supplements = new Map<string, DetectorSupplementDoc>();
  const doc = reexamineArchive(r, archive, c.generator, supplements);
  if (cache) {
    // A copy as computed now: the build goes on using (and may extend) the documents.
    const entry: Entry = structuredClone({ reexamination: doc, supplements: [...supplements] });
    c.later.push(() => writeDocEntry(cache, key, entry));
  }
  return { doc, supplements, fromCache: false };
}
