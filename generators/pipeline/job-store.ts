/**
 * A directory of job outputs keyed by fingerprint: the build cache (`.kiln/cache/jobs/`) and a
 * shard's output (`<shard>/jobs/`) share this layout.
 *
 *   <root>/<fingerprint>/meta.json     JobOutputMeta
 *   <root>/<fingerprint>/files/<name>  gzipped products
 *   <root>/<fingerprint>/entry.json    { schema, metaSha256 }: the entry's own seal
 *
 * Nothing read from here is trusted: the seal, the meta's fingerprint, job and generator, and
 * every file's size and SHA-256 are checked; any mismatch is reported with its reason.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { sha256Hex } from './hash.ts';
import type { JobOutput, JobOutputMeta } from './job-output.ts';

const META = 'meta.json';
const ENTRY = 'entry.json';
const ENTRY_SCHEMA = 'kiln/job-entry/1';
const HEX64 = /^[0-9a-f]{64}$/;

export function writeJobEntry(root: string, out: JobOutput): void {
  const fp = out.meta.fingerprint;
  // Called only after the job was run: an existing entry is a rejected one, replaced here.
  const dir = join(root, fp);
  const tmp = join(root, `.${fp}.tmp-${process.pid}`);
  rmSync(tmp, { recursive: true, force: true });
  mkdirSync(join(tmp, 'files'), { recursive: true });
  out.meta.files.forEach((f, i) => writeFileSync(join(tmp, 'files', f.name), out.gz[i]));
  const meta = JSON.stringify(out.meta);
  writeFileSync(join(tmp, META), meta);
  writeFileSync(join(tmp, ENTRY), JSON.stringify({ schema: ENTRY_SCHEMA, metaSha256: sha256Hex(meta) }) + '\n');
  rmSync(dir, { recursive: true, force: true });
  renameSync(tmp, dir);
}

export type EntryRead = { ok: true; output: JobOutput } | { ok: false; missing: boolean; reason: string };

/** Reads and verifies one entry; `expect` is what the caller planned (job id and generator). */
export function readJobEntry(root: string, fingerprint: string, expect: { job: string; generator: string }): EntryRead {
  const dir = join(root, fingerprint);
  if (!existsSync(join(dir, ENTRY))) return { ok: false, missing: true, reason: 'no entry' };
  try {
    const seal = JSON.parse(readFileSync(join(dir, ENTRY), 'utf8')) as { schema?: string; metaSha256?: string };
    if (seal.schema !== ENTRY_SCHEMA) return bad(`${ENTRY} has schema ${JSON.stringify(seal.schema)}, expected ${ENTRY_SCHEMA}`);
    const metaText = readFileSync(join(dir, META));
    if (sha256Hex(metaText) !== seal.metaSha256) return bad(`${META} does not match its SHA-256 in ${ENTRY}`);
    const meta = JSON.parse(metaText.toString('utf8')) as JobOutputMeta;
    if (meta.fingerprint !== fingerprint) return bad(`${META} is for fingerprint ${meta.fingerprint}`);
    if (meta.job !== expect.job) return bad(`${META} is for job ${meta.job}, expected ${expect.job}`);
    if (meta.generator !== expect.generator) return bad(`built by ${meta.generator}, this is ${expect.generator}`);
    const gz: Uint8Array[] = [];
    for (const f of meta.files) {
      const file = join(dir, 'files', f.name);
      if (!existsSync(file)) return bad(`files/${f.name} is missing`);
      const b = new Uint8Array(readFileSync(file));
      if (b.length !== f.bytes || sha256Hex(b) !== f.sha256) return bad(`files/${f.name} does not match its SHA-256`);
      gz.push(b);
    }
    return { ok: true, output: { meta, gz } };
  } catch (e) {
    return bad(`unreadable (${e instanceof Error ? e.message : String(e)})`);
  }
}

const bad = (reason: string): EntryRead => ({ ok: false, missing: false, reason });

/** Fingerprints present under root (entries with a seal file; temporary directories skipped). */
export function listJobEntries(root: string): string[] {
  if (!existsSync(root)) return [];
  return readdirSync(root).filter((n) => HEX64.test(n) && existsSync(join(root, n, ENTRY)));
}

/** Removes every entry not in `keep` (the cache holds the jobs of the last build only). */
export function pruneJobEntries(root: string, keep: Set<string>): void {
  if (!existsSync(root)) return;
  for (const n of readdirSync(root)) if (!keep.has(n)) rmSync(join(root, n), { recursive: true, force: true });
}
