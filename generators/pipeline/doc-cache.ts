/**
 * A cache of derived JSON documents (`<cache>/<folder>/<key>.json`): sections of a build that take
 * seconds and depend only on what their key covers. An entry is trusted only when its schema, its
 * key and the SHA-256 of its document all match; anything else is reported and recomputed. Safe to
 * delete at any time.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from '../node/files.ts';
import { sha256Hex } from './hash.ts';

/** One kind of cached document: its folder under the cache and the schema of its entries. */
export interface DocCache {
  root: string;
  schema: string;
}

export type DocRead<T> = { ok: true; doc: T } | { ok: false; missing: boolean; reason: string };

export function readDocEntry<T>(c: DocCache, key: string): DocRead<T> {
  const file = join(c.root, `${key}.json`);
  if (!existsSync(file)) return { ok: false, missing: true, reason: 'no entry' };
  try {
    const e = JSON.parse(readFileSync(file, 'utf8')) as { schema?: string; key?: string; docSha256?: string; doc?: string };
    if (e.schema !== c.schema) return { ok: false, missing: false, reason: `schema ${JSON.stringify(e.schema)}, expected ${c.schema}` };
    if (e.key !== key || typeof e.doc !== 'string') return { ok: false, missing: false, reason: 'entry is for another key' };
    if (sha256Hex(e.doc) !== e.docSha256) return { ok: false, missing: false, reason: 'document does not match its SHA-256' };
    return { ok: true, doc: JSON.parse(e.doc) as T };
  } catch (err) {
    return { ok: false, missing: false, reason: `unreadable (${(err as Error).message})` };
  }
}

export function writeDocEntry(c: DocCache, key: string, doc: unknown): void {
  mkdirSync(c.root, { recursive: true });
  const text = JSON.stringify(doc);
  writeFileAtomic(join(c.root, `${key}.json`), JSON.stringify({ schema: c.schema, key, docSha256: sha256Hex(text), doc: text }) + '\n');
}

/** Removes entries this build did not use (like the job entries): the cache stays bounded. */
export function pruneDocEntries(root: string, keep: Set<string>): void {
  if (!existsSync(root)) return;
  for (const n of readdirSync(root)) if (!keep.has(n.replace(/\.json$/, ''))) rmSync(join(root, n), { recursive: true, force: true });
}
