/**
 * kiln publish: freezes a release. Builds it (and checks it against the releases before it),
 * refuses on any failed check, then writes its products, site data and validation report into
 * <content>/archive/<id>/ with a seal (kiln/seal/2), and sets `status: published` in
 * release.yaml. An existing archive is never touched.
 *
 * Every phase can be cut off (kill, full disk) and `kiln publish ID` run again:
 *   built / staged     nothing is in place yet: the next run removes the litter and starts over;
 *   archived           the archive is complete, release.yaml still says candidate: the next run
 *                      verifies the archive and only sets the status (it "finishes" the publish);
 *   status-temp        release.yaml is the old or the new file (atomic rename), never partial.
 * One publish at a time per content tree (a lock beside content/archive).
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmSync, statSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { tmpdir } from 'node:os';
import { loadContent } from '../content/index.ts';
import { findReleaseByName } from '../content/release-key.ts';
import { withStatus } from '../content/status-line.ts';
import type { ResolvedRelease } from '../content/types.ts';
import { inTermsOf, KilnInputError } from '../errors.ts';
import { ARCHIVE_DIR, archiveDirOf, hasArchive, SEAL_FILE, SEAL_V2, sealHash, type SealV2 } from './archive.ts';
import { fsyncDir, writeFileSynced } from '../node/files.ts';
import { removeStale, removeStaleTemps, writeContentFile } from './atomic.ts';
import { build, BuildRefused, verifyFrozen, type BuildOptions } from './build.ts';
import { formatReleaseReport } from '../checks/index.ts';
import { plural } from '../plural.ts';
import { signOffOf, type AcceptAll } from './sign-off.ts';
import { sha256Hex } from './hash.ts';
import { inputFileHashes, inputsSha256 } from './inputs.ts';
import { readReleaseSite } from './site-files.ts';
import { MODEL_FILE } from '../model/types.ts';
import { withLock } from './lock.ts';
import { reached } from './phase.ts';

export interface PublishResult {
  release: string;
  archiveDir: string;
  files: number;
  statusChanged: boolean;
  /** The archive was already complete: this run only finished an interrupted publish. */
  resumed: boolean;
  /** The published release this one superseded (its status now superseded), if any. */
  superseded: string | null;
  /** Review items recorded as accepted in the seal. */
  accepted: number;
}

export interface PublishOptions {
  contentDir: string;
  id: string;
  log?: BuildOptions['log'];
  /** Accept every review item release.yaml does not accept, with this reason and role. */
  acceptAll?: AcceptAll;
  /** Job cache to build from (entries verified as in any build); none: every job is built. */
  cacheDir?: string;
}

/** Publishing refused because review items are open (nothing archived). */
export class ReviewOpen extends BuildRefused {}

/** Prefix of the temporary build folders of publish in the system temp directory. */
const TEMP_PREFIX = 'kiln-publish-';

function listFiles(dir: string, base = dir): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...listFiles(p, base));
    else out.push(relative(base, p).split('\\').join('/'));
  }
  return out;
}

/** Sets status: published in release.yaml: only that line changes, written atomically. */
function markPublished(root: string, r: ResolvedRelease): void {
  const file = r.release.file;
  const next = withStatus(readFileSync(file, 'utf8'), 'published');
  if (next === null) throw noStatusLine(r);
  writeContentFile(root, file, next, 'publish:status-temp');
}

/**
 * The published release `r` supersedes stops being recommended: its release.yaml status becomes
 * superseded (atomic write; its archive is never touched). Returns its id when it changed.
 */
function markSuperseded(root: string, releases: ResolvedRelease[], r: ResolvedRelease): string | null {
  const old = r.release.supersedesKey ? releases.find((x) => x.release.key === r.release.supersedesKey) : undefined;
  if (!old || old.release.status !== 'published') return null;
  const next = withStatus(readFileSync(old.release.file, 'utf8'), 'superseded');
  if (next === null) throw noStatusLine(old);
  writeContentFile(root, old.release.file, next, 'publish:supersede-temp');
  return old.release.key;
}

function noStatusLine(r: ResolvedRelease): KilnInputError {
  return new KilnInputError('release.yaml has no plain `status:` line that kiln publish can change', {
    file: r.release.file,
    field: 'status',
    expected: 'a line `status: candidate` of its own at the top level (no flow style, no anchors)',
  });
}

export async function publish(opts: PublishOptions): Promise<PublishResult> {
  const contentDir = resolve(opts.contentDir);
  const archiveRoot = join(contentDir, ARCHIVE_DIR);
  mkdirSync(archiveRoot, { recursive: true });
  try {
    return await withLock(archiveRoot, 'kiln publish', () => publishLocked(contentDir, opts));
  } catch (e) {
    const archiveDir = archiveDirOf(contentDir, opts.id);
    throw inTermsOf(e, archiveDir, [join(archiveRoot, `.${opts.id}.staging-${process.pid}`)]);
  }
}

async function publishLocked(contentDir: string, opts: PublishOptions): Promise<PublishResult> {
  // Litter of killed publishes: staging copies in the archive, temp build folders, release.yaml temps.
  removeStale(tmpdir(), TEMP_PREFIX, (p) => rmSync(p, { recursive: true, force: true }));
  const content = await loadContent(contentDir);
  const target = findReleaseByName(content.releases.map((x) => x.release), opts.id, { file: contentDir });
  const r = content.releases.find((x) => x.release === target)!;
  // From here on the release is named by its key (its folder: the id, or instrument~id).
  const key = r.release.key;
  removeStale(join(contentDir, ARCHIVE_DIR), `.${key}.staging-`, (p) => rmSync(p, { recursive: true, force: true }));
  removeStaleTemps(r.release.file);
  const archiveDir = archiveDirOf(contentDir, key);
  const status = r.release.status;

  if (hasArchive(contentDir, key)) {
    // Verifies the seal, every byte and the inputs; a status moved backwards is refused there,
    // except candidate over a published archive: the one state an interrupted publish leaves.
    if (status === 'candidate') {
      verifyFrozen(contentDir, { ...r, release: { ...r.release, status: 'published' } });
      const superseded = markSuperseded(contentDir, content.releases, r);
      markPublished(contentDir, r);
      opts.log?.(`release ${key}: archive complete and verified; finished the interrupted publish`);
      return { release: key, archiveDir, files: readdirSync(join(archiveDir, 'files')).length, statusChanged: true, resumed: true, superseded, accepted: 0 };
    }
    verifyFrozen(contentDir, r);
    throw new KilnInputError(`release ${key} is already published; a published release is never rewritten`, {
      file: archiveDir,
      expected: 'a new release (new id) for any change',
    });
  }
  if (status !== 'candidate' && status !== 'published')
    throw new KilnInputError(`release ${key} is a ${status}; only a candidate is published`, { file: r.release.file, field: 'status', value: status, expected: 'candidate' });
  if (status === 'candidate' && withStatus(readFileSync(r.release.file, 'utf8'), 'published') === null) throw noStatusLine(r);

  const tmp = mkdtempSync(join(tmpdir(), `${TEMP_PREFIX}${process.pid}-`));
  const staged = join(contentDir, ARCHIVE_DIR, `.${key}.staging-${process.pid}`);
  try {
    const out = join(tmp, 'out');
    // Refuses (BuildRefused) when the release fails a check.
    const summary = await build({ contentDir, outDir: out, publishing: key, log: opts.log, acceptAll: opts.acceptAll, cacheDir: opts.cacheDir ?? null });
    const outcome = summary.releases.find((x) => x.id === key)!;
    if (outcome.reviews.length)
      throw new ReviewOpen(
        `${formatReleaseReport(`release ${key} has ${plural(outcome.reviews.length, 'review item')} nobody accepted:`, outcome.all, { only: ['review'] })}\n` +
          'accept each in release.yaml (accepted: - { check, product, reason, role }) or publish with --accept-all --reason TEXT',
        summary.releases,
      );
    reached('publish:built');
    const built = join(out, 'releases', key);
    rmSync(staged, { recursive: true, force: true });
    mkdirSync(join(staged, 'files'), { recursive: true });
    for (const name of readdirSync(join(built, 'files')).sort()) writeFileSynced(join(staged, 'files', name), readFileSync(join(built, 'files', name)));
    fsyncDir(join(staged, 'files'));
    writeFileSynced(join(staged, 'validation.json'), readFileSync(join(built, 'validation.json')));
    // The model document is sealed with the products (its schema is the code's, written beside it on serving).
    if (existsSync(join(built, MODEL_FILE))) writeFileSynced(join(staged, MODEL_FILE), readFileSync(join(built, MODEL_FILE)));
    // The archive records the release as it is from now on: published.
    // The build writes the site data split per detector; the archive keeps the whole release.
    const docs: Record<string, { status: string }> = {
      'site.json': readReleaseSite(built).site,
      'manifest.json': JSON.parse(readFileSync(join(built, 'manifest.json'), 'utf8')) as { status: string },
    };
    for (const [doc, value] of Object.entries(docs)) writeFileSynced(join(staged, doc), JSON.stringify({ ...value, status: 'published' }) + '\n');
    const files = listFiles(staged).map((path) => {
      const bytes = readFileSync(join(staged, path));
      return { path, bytes: bytes.length, sha256: sha256Hex(bytes) };
    });
    const unsigned: Omit<SealV2, 'sealSha256'> = {
      schema: SEAL_V2,
      release: r.release.id,
      date: r.release.date,
      status: 'published',
      inputsSha256: inputsSha256(r),
      inputFiles: inputFileHashes(r),
      files,
      signOff: signOffOf(outcome.all),
    };
    const seal: SealV2 = { ...unsigned, sealSha256: sealHash(unsigned) };
    writeFileSynced(join(staged, SEAL_FILE), JSON.stringify(seal, null, 2) + '\n');
    fsyncDir(staged);
    reached('publish:staged');
    renameSync(staged, archiveDir);
    fsyncDir(join(contentDir, ARCHIVE_DIR));
    reached('publish:archived');
    // The old release first: a publish cut off in between resumes (candidate over its archive).
    const superseded = markSuperseded(contentDir, content.releases, r);
    if (status === 'candidate') markPublished(contentDir, r);
    return { release: key, archiveDir, files: files.length, statusChanged: status === 'candidate', resumed: false, superseded, accepted: unsigned.signOff?.length ?? 0 };
  } finally {
    rmSync(staged, { recursive: true, force: true });
    rmSync(tmp, { recursive: true, force: true });
  }
}
