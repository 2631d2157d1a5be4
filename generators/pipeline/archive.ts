/**
 * The archive of published releases, inside the content tree:
 *   <content>/archive/<id>/seal.json         what was frozen: inputs fingerprint, every file's hash
 *   <content>/archive/<id>/files/*.gz        the products, byte for byte as published
 *   <content>/archive/<id>/site.json         the site data of the release as published
 *   <content>/archive/<id>/validation.json   its validation report as published
 *   <content>/archive/<id>/manifest.json     its manifest as published (parameters, fits)
 * Nothing in Kiln rewrites or deletes an archive once written.
 *
 * Seal versions (both are accepted; `kiln publish` writes the newest):
 *   kiln/seal/1  files: every archived file but the seal. Checked: each file's size and SHA-256,
 *                the folder holds exactly those files, the date equals the release's. Not
 *                covered: an edit of its own inputFiles hashes (used only to name changed files).
 *   kiln/seal/2  as 1, plus the status it was sealed with, inputFiles hashed independently of the
 *                status line (notes excluded: they never feed a product), and sealSha256 over all
 *                its other fields, so an edit of any field of the seal itself is refused.
 * Deliberate forgery (editing a file and recomputing every hash) is what version control and
 * review of content/archive/ guard against; the seal makes every accidental or silent edit loud.
 */
import { lstatSync, readdirSync, readFileSync } from 'node:fs';
import { idOfKey } from '../content/release-key.ts';
import { join } from 'node:path';
import { z } from 'zod';
import { parseWith } from '../content/issues.ts';
import { RELEASE_STATUSES } from '../content/schema.ts';
import { KilnInputError } from '../errors.ts';
import type { ReleaseManifest, ReleaseSite, ValidationReport } from '../site-data/types.ts';
import { canonicalJson, sha256Hex } from './hash.ts';

export const ARCHIVE_DIR = 'archive';
export const SEAL_FILE = 'seal.json';
export const SEAL_V1 = 'kiln/seal/1';
export const SEAL_V2 = 'kiln/seal/2';
/** Largest seal.json read (a seal lists a few hundred files at most; common practice, no source). */
export const MAX_SEAL_BYTES = 4 * 1024 * 1024;
/** Largest site.json / validation.json / manifest.json parsed from an archive. */
export const MAX_ARCHIVE_JSON_BYTES = 256 * 1024 * 1024;

const HEX64 = /^[0-9a-f]{64}$/;
/** One safe path segment: no dots-only names, no separators. */
const SEGMENT = /^[A-Za-z0-9_][A-Za-z0-9._-]*$/;

function isSafeRelPath(s: string, maxDepth: number): boolean {
  const parts = s.split('/');
  return parts.length <= maxDepth && parts.every((p) => SEGMENT.test(p) && p !== '.' && p !== '..');
}

const sha = z.string().regex(HEX64, 'not a lower-case SHA-256 hex digest');
/** An archive-relative path: `files/<name>` or a top-level document, never leaving the folder. */
const archivePath = z.string().refine((s) => isSafeRelPath(s, 2) && (s.startsWith('files/') || !s.includes('/')) && s !== SEAL_FILE, {
  message: 'not a path inside the archive folder',
  params: { expected: 'files/<name> or a top-level name such as site.json (letters, digits, . _ -; no "..")' },
});
const contentPath = z.string().refine((s) => isSafeRelPath(s, 8), {
  message: 'not a path inside the content tree',
  params: { expected: 'a content-relative path (letters, digits, . _ -; no "..")' },
});
const sealFile = z.object({ path: archivePath, bytes: z.number().int().nonnegative(), sha256: sha }).strict();
const common = {
  release: z.string().min(1),
  date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'not a date YYYY-MM-DD'),
  inputsSha256: sha,
  inputFiles: z.record(contentPath, sha),
  files: z.array(sealFile).min(1),
};
const sealV1Schema = z.object({ schema: z.literal(SEAL_V1), ...common }).strict();
/** A review item accepted when publishing: release.yaml's `accepted` or `kiln publish --accept-all`. */
const signOffItem = z
  .object({
    check: z.string().min(1),
    product: z.string().min(1).nullable(),
    reason: z.string().min(1),
    role: z.string().min(1),
    source: z.enum(['release.yaml', 'publish --accept-all']),
  })
  .strict();
const sealV2Schema = z
  .object({
    schema: z.literal(SEAL_V2),
    ...common,
    status: z.enum(RELEASE_STATUSES),
    /** The review sign-off (absent in v2 seals written before sign-off existed); covered by sealSha256. */
    signOff: z.array(signOffItem).optional(),
    sealSha256: sha,
  })
  .strict();
const sealSchema = z.discriminatedUnion('schema', [sealV1Schema, sealV2Schema]);

export type SealV1 = z.infer<typeof sealV1Schema>;
export type SealV2 = z.infer<typeof sealV2Schema>;
export type Seal = SealV1 | SealV2;
export type SealFile = Seal['files'][number];
export type SignOffItem = z.infer<typeof signOffItem>;

/** `archive/<key>/`: the key is the release's folder name (id, or `<instrument>~<id>`). */
export function archiveDirOf(contentRoot: string, releaseKey: string): string {
  return join(contentRoot, ARCHIVE_DIR, releaseKey);
}

function kindOf(path: string): 'missing' | 'file' | 'dir' | 'link' | 'other' {
  try {
    const s = lstatSync(path);
    return s.isSymbolicLink() ? 'link' : s.isFile() ? 'file' : s.isDirectory() ? 'dir' : 'other';
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT' || (e as NodeJS.ErrnoException).code === 'ENOTDIR') return 'missing';
    throw e;
  }
}

/** An archive folder exists for the release (sealed or not: a folder without a seal is refused when read). */
export function hasArchive(contentRoot: string, releaseId: string): boolean {
  return kindOf(archiveDirOf(contentRoot, releaseId)) !== 'missing';
}

/** SHA-256 of a v2 seal's own fields (everything but sealSha256). */
export function sealHash(seal: Omit<SealV2, 'sealSha256'> & { sealSha256?: string }): string {
  const { sealSha256: _own, ...rest } = seal;
  return sha256Hex(canonicalJson(rest));
}

function tampered(releaseId: string, message: string, file: string, value?: unknown, expected?: string): KilnInputError {
  return new KilnInputError(`archive of published release ${releaseId}: ${message}`, {
    file,
    value,
    expected,
    todo: 'published releases are never rewritten: restore content/archive/ from version control',
  });
}

/** Reads a regular file of the archive, bounded; a link, folder or device is refused naming it. */
function readArchiveFile(releaseId: string, file: string, maxBytes: number): Uint8Array {
  const kind = kindOf(file);
  if (kind === 'missing') throw tampered(releaseId, 'file is missing', file);
  if (kind !== 'file') throw tampered(releaseId, `is a ${kind === 'dir' ? 'folder' : kind === 'link' ? 'symbolic link' : 'special file'}, not a regular file`, file);
  const size = lstatSync(file).size;
  if (size > maxBytes) throw tampered(releaseId, `file is larger than the limit of ${maxBytes} bytes`, file, `${size} bytes`);
  return new Uint8Array(readFileSync(file));
}

export function readSeal(contentRoot: string, releaseKey: string): Seal {
  const file = join(archiveDirOf(contentRoot, releaseKey), SEAL_FILE);
  const releaseId = idOfKey(releaseKey);
  const bytes = readArchiveFile(releaseId, file, MAX_SEAL_BYTES);
  let raw: unknown;
  try {
    raw = JSON.parse(new TextDecoder().decode(bytes));
  } catch (e) {
    throw tampered(releaseId, 'seal is not valid JSON', file, e instanceof Error ? e.message : String(e), 'the JSON written by kiln publish');
  }
  let seal: Seal;
  try {
    seal = parseWith(sealSchema, raw, { file });
  } catch (e) {
    if (e instanceof KilnInputError) throw tampered(releaseId, `seal ${e.where.field ? `field ${e.where.field}` : ''}: ${e.message}`, file, e.where.value, e.where.expected);
    throw e;
  }
  if (seal.release !== releaseId) throw tampered(releaseId, 'seal describes another release', file, seal.release, releaseId);
  if (seal.schema === SEAL_V2 && sealHash(seal) !== seal.sealSha256)
    throw tampered(releaseId, 'seal was edited after sealing (its sealSha256 does not match its fields)', file, seal.sealSha256, sealHash(seal));
  const seen = new Set<string>();
  for (const f of seal.files) {
    if (seen.has(f.path)) throw tampered(releaseId, 'seal lists a file twice', file, f.path);
    seen.add(f.path);
  }
  for (const need of ['site.json', 'validation.json'])
    if (!seen.has(need)) throw tampered(releaseId, `seal does not list ${need}`, file, undefined, `an entry for ${need}`);
  return seal;
}

/** Every entry under `dir` as an archive-relative path; links and special files refused. */
function listArchive(releaseId: string, dir: string, prefix = ''): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    const rel = prefix + name;
    const kind = kindOf(p);
    if (kind === 'dir') out.push(...listArchive(releaseId, p, rel + '/'));
    else if (kind === 'file') out.push(rel);
    else throw tampered(releaseId, `holds a ${kind === 'link' ? 'symbolic link' : 'special file'} the seal does not allow`, p);
  }
  return out;
}

function parseJsonDoc<T>(releaseId: string, bytes: Uint8Array, file: string): T {
  try {
    return JSON.parse(new TextDecoder().decode(bytes)) as T;
  } catch (e) {
    throw tampered(releaseId, 'archived document is not valid JSON', file, e instanceof Error ? e.message : String(e));
  }
}

export interface VerifiedArchive {
  bytes: Map<string, Uint8Array>;
  site: ReleaseSite;
  report: ValidationReport;
  manifest: ReleaseManifest | null;
  /** The status the release had when it was sealed. */
  sealedStatus: string;
  /** Every sealed file's path and SHA-256 (verified): what a cache key of derived documents covers. */
  sealed: { path: string; sha256: string }[];
}

/**
 * Checks the archive folder against its seal: exactly the sealed files (nothing extra, nothing
 * missing, no links), each with its size and SHA-256, the seal's date equal to the release's,
 * and the site data and manifest advertising the same hashes as the seal. Every difference is an
 * input error naming the archive file.
 */
export function verifyArchive(contentRoot: string, seal: Seal, release: { date: string; key: string }): VerifiedArchive {
  const id = seal.release;
  const dir = archiveDirOf(contentRoot, release.key);
  const sealPath = join(dir, SEAL_FILE);
  if (seal.date !== release.date) throw tampered(id, 'seal date differs from the release date', sealPath, seal.date, release.date);
  const listed = new Map(seal.files.map((f) => [f.path, f]));
  for (const path of listArchive(id, dir))
    if (path !== SEAL_FILE && !listed.has(path)) throw tampered(id, 'holds a file its seal does not list', join(dir, path), undefined, `only the ${listed.size} sealed files and ${SEAL_FILE}`);
  const bytes = new Map<string, Uint8Array>();
  for (const f of seal.files) {
    const file = join(dir, f.path);
    const b = readArchiveFile(id, file, f.path.startsWith('files/') ? Number.MAX_SAFE_INTEGER : MAX_ARCHIVE_JSON_BYTES);
    const got = sha256Hex(b);
    if (b.length !== f.bytes || got !== f.sha256) throw tampered(id, 'file is corrupt or was altered', file, `${b.length} bytes, SHA-256 ${got}`, `${f.bytes} bytes, SHA-256 ${f.sha256}`);
    bytes.set(f.path, b);
  }
  const site = parseJsonDoc<ReleaseSite>(id, bytes.get('site.json')!, join(dir, 'site.json'));
  const report = parseJsonDoc<ValidationReport>(id, bytes.get('validation.json')!, join(dir, 'validation.json'));
  const manifest = bytes.has('manifest.json') ? parseJsonDoc<ReleaseManifest>(id, bytes.get('manifest.json')!, join(dir, 'manifest.json')) : null;
  if (site?.id !== id) throw tampered(id, 'site data describes another release', join(dir, 'site.json'), site?.id, id);
  if (report?.release !== id || !Array.isArray(report.checks)) throw tampered(id, 'validation report describes another release', join(dir, 'validation.json'), report?.release, id);
  // What the site advertises must be what the seal covers, byte for byte.
  const sealedProducts = seal.files.filter((f) => f.path.startsWith('files/'));
  const advertised: { doc: string; list: unknown }[] = [{ doc: 'site.json', list: site.products }];
  if (manifest) advertised.push({ doc: 'manifest.json', list: manifest.files });
  for (const { doc, list } of advertised) {
    const file = join(dir, doc);
    if (!Array.isArray(list)) throw tampered(id, 'archived document has no product list', file);
    const entries = list as { path?: unknown; bytes?: unknown; sha256?: unknown }[];
    for (const p of entries) {
      const s = typeof p?.path === 'string' ? listed.get(p.path) : undefined;
      if (!s || !s.path.startsWith('files/')) throw tampered(id, 'lists a product the seal does not cover', file, p?.path);
      if (p.bytes !== s.bytes || p.sha256 !== s.sha256) throw tampered(id, 'advertises a hash or size the seal does not have', file, `${String(p.path)}: ${String(p.sha256)}`, s.sha256);
    }
    for (const s of sealedProducts)
      if (!entries.some((p) => p?.path === s.path)) throw tampered(id, 'does not list a sealed product', file, s.path);
  }
  const sealedStatus = seal.schema === SEAL_V2 ? seal.status : String(site.status);
  return { bytes, site, report, manifest, sealedStatus, sealed: seal.files.map((f) => ({ path: f.path, sha256: f.sha256 })) };
}
