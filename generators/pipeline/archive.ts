/**
 * The archive of published releases, inside the content tree:
 *   <content>/archive/<id>/seal.json         what was frozen: inputs fingerprint, file hashes
 *   <content>/archive/<id>/files/*.gz        the products, byte for byte as published
 *   <content>/archive/<id>/site.json         the site data of the release as published
 *   <content>/archive/<id>/validation.json   its validation report as published
 *   <content>/archive/<id>/manifest.json     its manifest as published (parameters, fits)
 * Nothing in Kiln rewrites or deletes an archive once written.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { sha256Hex } from './hash.ts';

export const ARCHIVE_DIR = 'archive';
export const SEAL_FILE = 'seal.json';

export interface SealFile {
  path: string;
  bytes: number;
  sha256: string;
}

export interface Seal {
  schema: 'kiln/seal/1';
  release: string;
  /** Release date. */
  date: string;
  inputsSha256: string;
  inputFiles: Record<string, string>;
  files: SealFile[];
  /** Review items accepted when publishing (absent in seals written before sign-off existed). */
  signOff?: SignOffItem[];
}

export interface SignOffItem {
  check: string;
  product: string | null;
  reason: string;
  role: string;
  source: 'release.yaml' | 'publish --accept-all';
}

export function archiveDirOf(contentRoot: string, releaseId: string): string {
  return join(contentRoot, ARCHIVE_DIR, releaseId);
}

export function hasArchive(contentRoot: string, releaseId: string): boolean {
  return existsSync(join(archiveDirOf(contentRoot, releaseId), SEAL_FILE));
}

export function readSeal(contentRoot: string, releaseId: string): Seal {
  const file = join(archiveDirOf(contentRoot, releaseId), SEAL_FILE);
  let seal: Seal;
  try {
    seal = JSON.parse(readFileSync(file, 'utf8')) as Seal;
  } catch (e) {
    throw new KilnInputError('archive seal unreadable', { file, value: e instanceof Error ? e.message : String(e), expected: 'the JSON written by kiln publish' });
  }
  if (seal.schema !== 'kiln/seal/1' || seal.release !== releaseId || !Array.isArray(seal.files))
    throw new KilnInputError('archive seal does not describe this release', { file, value: seal.release, expected: `schema kiln/seal/1 for release ${releaseId}` });
  return seal;
}

/**
 * Reads every archived file and checks its size and SHA-256 against the seal. Returns the bytes
 * by archive-relative path. A missing or altered file is an input error naming it.
 */
export function readVerifiedArchive(contentRoot: string, seal: Seal): Map<string, Uint8Array> {
  const dir = archiveDirOf(contentRoot, seal.release);
  const out = new Map<string, Uint8Array>();
  for (const f of seal.files) {
    const file = join(dir, f.path);
    if (!existsSync(file))
      throw new KilnInputError(`archived file of published release ${seal.release} is missing`, { file, expected: `${f.bytes} bytes, SHA-256 ${f.sha256}` });
    const bytes = new Uint8Array(readFileSync(file));
    const sha = sha256Hex(bytes);
    if (bytes.length !== f.bytes || sha !== f.sha256)
      throw new KilnInputError(`archived file of published release ${seal.release} is corrupt or was altered`, {
        file,
        value: `${bytes.length} bytes, SHA-256 ${sha}`,
        expected: `${f.bytes} bytes, SHA-256 ${f.sha256} (published releases are never rewritten: restore the file from version control)`,
      });
    out.set(f.path, bytes);
  }
  return out;
}
