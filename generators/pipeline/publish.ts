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
import { build, BuildRefused, type BuildOptions } from './build.ts';
import { formatReleaseReport } from '../checks/index.ts';
import { plural } from '../plural.ts';
import { writeFileDurable } from './atomic.ts';
import { signOffOf, type AcceptAll } from './sign-off.ts';
import { sha256Hex } from './hash.ts';
import { inputFileHashes, inputsSha256 } from './inputs.ts';

export interface PublishResult {
  release: string;
  archiveDir: string;
  files: number;
  statusChanged: boolean;
  /** The published release this one superseded (its status now superseded), if any. */
  superseded: string | null;
  /** Review items recorded as accepted in the seal. */
  accepted: number;
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

/**
 * Only the status line changes, written atomically; comments and layout of release.yaml stay as
 * the team wrote them.
 */
function markStatus(file: string, from: string, to: string): boolean {
  const text = readFileSync(file, 'utf8');
  const re = new RegExp(`^status:[ \\t]*(["']?)${from}\\1[ \\t]*(#.*)?$`, 'm');
  if (!re.test(text)) return false;
  writeFileDurable(file, text.replace(re, (_m, _q, comment) => `status: ${to}${comment ? ' ' + comment : ''}`));
  return true;
}

export interface PublishOptions {
  contentDir: string;
  id: string;
  log?: BuildOptions['log'];
  /** Accept every review item release.yaml does not accept, with this reason and role. */
  acceptAll?: AcceptAll;
}

/** Publishing refused because review items are open (nothing archived). */
export class ReviewOpen extends BuildRefused {}

export async function publish(opts: PublishOptions): Promise<PublishResult> {
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
    const summary = await build({ contentDir, outDir: out, publishing: opts.id, log: opts.log, acceptAll: opts.acceptAll });
    const outcome = summary.releases.find((x) => x.id === opts.id)!;
    if (outcome.reviews.length)
      throw new ReviewOpen(
        `${formatReleaseReport(`release ${opts.id} has ${plural(outcome.reviews.length, 'review item')} nobody accepted:`, outcome.all, { only: ['review'] })}\n` +
          `accept each in release.yaml (accepted: - { check, product, reason, role }) or publish with --accept-all --reason TEXT`,
        summary.releases,
      );
    const built = join(out, 'releases', opts.id);
    const staged = join(contentDir, 'archive', `.${opts.id}.staging-${process.pid}`);
    rmSync(staged, { recursive: true, force: true });
    mkdirSync(staged, { recursive: true });
    cpSync(join(built, 'files'), join(staged, 'files'), { recursive: true });
    cpSync(join(built, 'validation.json'), join(staged, 'validation.json'));
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
      signOff: signOffOf(outcome.all),
    };
    writeFileSync(join(staged, SEAL_FILE), JSON.stringify(seal, null, 2) + '\n');
    renameSync(staged, archiveDir);
    const statusChanged = status === 'candidate' ? markStatus(r.release.file, 'candidate', 'published') : false;
    // The release it supersedes stops being recommended: its status (never its archive) changes.
    const old = r.release.supersedes ? content.releases.find((x) => x.release.id === r.release.supersedes) : undefined;
    const superseded = old && old.release.status === 'published' && markStatus(old.release.file, 'published', 'superseded') ? old.release.id : null;
    return { release: opts.id, archiveDir, files: files.length, statusChanged, superseded, accepted: seal.signOff?.length ?? 0 };
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}
