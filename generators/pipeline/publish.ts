/**
 * kiln publish: freezes a release. Builds it (and checks it against the releases before it),
 * refuses on any failed check, then writes its products, site data and validation report into
 * <content>/archive/<id>/ with a seal of SHA-256 hashes. An existing archive is never touched.
 * A candidate release's status line in release.yaml becomes "published".
 */
import { cpSync, existsSync, mkdirSync, readFileSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { tmpdir } from 'node:os';
import { mkdtempSync } from 'node:fs';
import { loadContent } from '../content/index.ts';
import { KilnInputError } from '../errors.ts';
import { archiveDirOf, hasArchive, SEAL_FILE, type Seal } from './archive.ts';
import { build, type BuildOptions } from './build.ts';
import { sha256Hex } from './hash.ts';
import { inputFileHashes, inputsSha256 } from './inputs.ts';
import { MODEL_FILE } from '../model/types.ts';

export interface PublishResult {
  release: string;
  archiveDir: string;
  files: number;
  statusChanged: boolean;
}

function listFiles(dir: string, base = dir): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...listFiles(p, base));
    else out.push(relative(base, p).split('\\').join('/'));
  }
  return out;
}

/** Only the status line changes; comments and layout of release.yaml stay as the team wrote them. */
function markPublished(file: string): boolean {
  const text = readFileSync(file, 'utf8');
  const re = /^status:[ \t]*(["']?)candidate\1[ \t]*(#.*)?$/m;
  if (!re.test(text)) return false;
  writeFileSync(file, text.replace(re, (_m, _q, comment) => `status: published${comment ? ' ' + comment : ''}`));
  return true;
}

export async function publish(opts: { contentDir: string; id: string; log?: BuildOptions['log'] }): Promise<PublishResult> {
  const contentDir = resolve(opts.contentDir);
  const content = await loadContent(contentDir);
  const r = content.releases.find((x) => x.release.id === opts.id);
  if (!r) throw new KilnInputError('no such release', { file: contentDir, value: opts.id, expected: `one of ${content.releases.map((x) => x.release.id).join(', ')}` });
  const archiveDir = archiveDirOf(contentDir, opts.id);
  if (hasArchive(contentDir, opts.id) || existsSync(archiveDir))
    throw new KilnInputError(`release ${opts.id} is already published; a published release is never rewritten`, {
      file: archiveDir,
      expected: 'a new release (new id) for any change',
    });
  const status = r.release.status;
  if (status === 'draft' || status === 'withdrawn')
    throw new KilnInputError(`release ${opts.id} is a ${status}; only a candidate is published`, { file: r.release.file, field: 'status', value: status, expected: 'candidate' });

  const tmp = mkdtempSync(join(tmpdir(), 'kiln-publish-'));
  try {
    const out = join(tmp, 'out');
    // Refuses (BuildRefused) when the release fails a check.
    await build({ contentDir, outDir: out, publishing: opts.id, log: opts.log });
    const built = join(out, 'releases', opts.id);
    const staged = join(contentDir, 'archive', `.${opts.id}.staging-${process.pid}`);
    rmSync(staged, { recursive: true, force: true });
    mkdirSync(staged, { recursive: true });
    cpSync(join(built, 'files'), join(staged, 'files'), { recursive: true });
    cpSync(join(built, 'validation.json'), join(staged, 'validation.json'));
    // The model document is sealed with the products (its schema is the code's, written beside it on serving).
    if (existsSync(join(built, MODEL_FILE))) cpSync(join(built, MODEL_FILE), join(staged, MODEL_FILE));
    // The archive records the release as it is from now on: published (a candidate is promoted).
    const archivedStatus = status === 'candidate' ? 'published' : status;
    for (const doc of ['site.json', 'manifest.json']) {
      const value = JSON.parse(readFileSync(join(built, doc), 'utf8')) as { status: string };
      writeFileSync(join(staged, doc), JSON.stringify({ ...value, status: archivedStatus }) + '\n');
    }
    const files = listFiles(staged).map((path) => {
      const bytes = readFileSync(join(staged, path));
      return { path, bytes: bytes.length, sha256: sha256Hex(bytes) };
    });
    const seal: Seal = {
      schema: 'kiln/seal/1',
      release: opts.id,
      date: r.release.date,
      inputsSha256: inputsSha256(r),
      inputFiles: inputFileHashes(r),
      files,
    };
    writeFileSync(join(staged, SEAL_FILE), JSON.stringify(seal, null, 2) + '\n');
    renameSync(staged, archiveDir);
    const statusChanged = status === 'candidate' ? markPublished(r.release.file) : false;
    return { release: opts.id, archiveDir, files: files.length, statusChanged };
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}
