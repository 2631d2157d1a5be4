/**
 * kiln build: content → validated inputs → products → checks → site data, written atomically.
 *
 *   1. load and validate the content tree (any input error stops the build, nothing written);
 *   2. for each release, oldest first: serve a published release from its archive after checking
 *      its inputs and every archived byte; build every other release on worker threads;
 *   3. compare each built release with the one before it (differences flagged for review);
 *   4. refuse the whole build when a candidate release fails a check; a draft shows its failures;
 *   5. swap the complete output tree into place.
 */
import { gzipSync } from 'node:zlib';
import { mkdirSync, writeFileSync } from 'node:fs';
import { isForwardOf, type ReleaseStatus } from '../content/status-line.ts';
import { basename, dirname, join } from 'node:path';
import { loadContent } from '../content/index.ts';
import type { ContentTree, ResolvedRelease } from '../content/types.ts';
import { inTermsOf, KilnInputError } from '../errors.ts';
import type {
  Check,
  InstrumentSummary,
  ManifestFile,
  ProductSummary,
  ReleaseIndex,
  ReleaseManifest,
  ReleaseSite,
  ReleaseSummary,
  ValidationReport,
} from '../site-data/types.ts';
import { countStatuses, formatReleaseReport } from '../checks/index.ts';
import { plural } from '../plural.ts';
import { applySignOff, type AcceptAll } from './sign-off.ts';
import { archiveDirOf, hasArchive, readSeal, verifyArchive, type Seal, type VerifiedArchive } from './archive.ts';
import { recoverInterruptedSwap, removeStaleStaging, stagingDir, swapInto } from './atomic.ts';
import { withLock } from './lock.ts';
import { reached } from './phase.ts';
import { crossReleaseChecks } from './cross-release.ts';
import { sha256Hex } from './hash.ts';
import { changedInputFiles, inputsSha256, jobsOf } from './inputs.ts';
import { JobPool, defaultWorkerCount } from './pool.ts';
import type { DetectorJobResult } from './run-job.ts';

/** gzip level of product files: the smallest files; speed matters little next to the model (zlib's 9). */
const GZIP_LEVEL = 9;
/** Statuses whose products are frozen in the archive. */
const FROZEN_STATUSES = new Set(['published', 'superseded']);

export interface BuildOptions {
  contentDir: string;
  outDir: string;
  workers?: number;
  /** Progress lines (to the terminal). */
  log?: (line: string) => void;
  /**
   * Publishing: build releases up to and including this id only, and build this one from its
   * inputs even if its status is already published (it has no archive yet).
   */
  publishing?: string;
  /** Build releases up to and including this id only (`kiln report`). */
  upTo?: string;
  /** Publishing with `--accept-all`: every open review item of the published release is accepted so. */
  acceptAll?: AcceptAll;
}

export interface ReleaseOutcome {
  id: string;
  status: string;
  source: 'built' | 'archive';
  files: number;
  checks: ReturnType<typeof countStatuses>;
  failures: Check[];
  /** Review items nobody accepted yet (publishing needs none). */
  reviews: Check[];
  /** Every check of the release, in the build's order. */
  all: Check[];
}

export interface BuildSummary {
  outDir: string;
  releases: ReleaseOutcome[];
  products: number;
  nnz: number;
}

/** A candidate (or published) release failed checks: the build is refused, nothing is written. */
export class BuildRefused extends Error {
  readonly outcomes: ReleaseOutcome[];
  constructor(message: string, outcomes: ReleaseOutcome[]) {
    super(message);
    this.name = 'BuildRefused';
    this.outcomes = outcomes;
  }
}

function json(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 0) + '\n';
}

function writeJson(path: string, value: unknown): void {
  writeFileSync(path, json(value));
}

export function gzipProduct(fits: Uint8Array): Uint8Array {
  // Node's gzip writes MTIME 0 and a fixed OS byte: identical input gives identical bytes.
  return new Uint8Array(gzipSync(fits, { level: GZIP_LEVEL }));
}

function instrumentSummaries(content: ContentTree): InstrumentSummary[] {
  return content.instruments.map((i) => ({
    id: i.id,
    telescope: i.telescope,
    instrument: i.instrument,
    title: i.title,
    description: i.description,
    channels: i.channels.count,
    detectors: i.detectors.map((d) => ({ id: d.id, name: d.name, kind: d.kind, description: d.description })),
  }));
}

/** Checks that the frozen release still has the inputs it was published from. */
export function verifyFrozenInputs(r: ResolvedRelease, seal: Seal): void {
  const now = inputsSha256(r);
  if (now === seal.inputsSha256) return;
  const changed = changedInputFiles(r, seal);
  throw new KilnInputError(`inputs of ${r.release.status} release ${r.release.id} changed since it was published`, {
    file: r.release.file,
    value: changed.length ? `changed files: ${changed.join(', ')}` : `fingerprint ${now}`,
    expected: `the inputs with fingerprint ${seal.inputsSha256}; published releases are never rewritten — keep these inputs and restate the corrected ones in a new release (release.yaml overrides:, README "How to correct a published release")`,
  });
}

interface ReleaseWork {
  r: ResolvedRelease;
  dir: string;
  outcome: ReleaseOutcome;
  products: ProductSummary[];
}

/** The fields every document about a release starts with. */
function releaseHead(rel: ResolvedRelease['release']): Pick<ReleaseSummary, 'id' | 'instrument' | 'title' | 'date' | 'status' | 'validFrom' | 'validTo' | 'supersedes'> {
  return {
    id: rel.id,
    instrument: rel.instrument,
    title: rel.title,
    date: rel.date,
    status: rel.status,
    validFrom: rel.validFrom,
    validTo: rel.validTo,
    supersedes: rel.supersedes,
  };
}

function releaseSummary(w: ReleaseWork): ReleaseSummary {
  const c = w.outcome.checks;
  return {
    ...releaseHead(w.r.release),
    checks: { pass: c.pass, fail: c.fail, warn: c.warn, review: c.review, accepted: c.accepted },
    products: w.products,
  };
}

function manifestOf(w: ReleaseWork, inputs: string, parameters: Record<string, unknown>): ReleaseManifest {
  const rel = w.r.release;
  const files: ManifestFile[] = w.products.map((p) => ({
    path: p.path,
    bytes: p.bytes,
    sha256: p.sha256,
    kind: p.kind,
    detector: p.detector,
    epoch: p.epoch,
    validFrom: p.validFrom,
    validTo: p.validTo,
  }));
  return {
    schema: 'kiln/release-manifest/1',
    release: rel.id,
    instrument: rel.instrument,
    status: rel.status,
    date: rel.date,
    validFrom: rel.validFrom,
    validTo: rel.validTo,
    inputsSha256: inputs,
    parameters,
    files,
  };
}

/**
 * An archive wins over any status edit: the release's status may only have moved forward from
 * the one it was sealed with (published → superseded → withdrawn). Then its inputs and every
 * archived byte are checked. Returns the verified archive.
 */
export function verifyFrozen(root: string, r: ResolvedRelease): VerifiedArchive {
  const rel = r.release;
  const seal = readSeal(root, rel.id);
  const archive = verifyArchive(root, seal, rel);
  if (!isForwardOf(archive.sealedStatus as ReleaseStatus, rel.status as ReleaseStatus)) {
    const finish = rel.status === 'candidate' && archive.sealedStatus === 'published';
    throw new KilnInputError(`release ${rel.id} is archived as ${archive.sealedStatus}; its status may only move forward (published → superseded → withdrawn)`, {
      file: rel.file,
      field: 'status',
      value: rel.status,
      expected: `${archive.sealedStatus}${archive.sealedStatus === 'withdrawn' ? '' : ' or a later status'}`,
      todo: finish ? `if a publish was interrupted, \`kiln publish ${rel.id}\` finishes it` : `set status back to ${archive.sealedStatus}; to change the calibration make a new release`,
    });
  }
  verifyFrozenInputs(r, seal);
  return archive;
}

/** Serves a frozen release from its verified archive into `dir`. */
function serveArchive(
  r: ResolvedRelease,
  archive: VerifiedArchive,
  dir: string,
): { products: ProductSummary[]; checks: Check[]; site: ReleaseSite; parameters: Record<string, unknown> } {
  const { bytes, site, report } = archive;
  mkdirSync(join(dir, 'files'), { recursive: true });
  for (const [path, b] of bytes) if (path.startsWith('files/')) writeFileSync(join(dir, path), b);
  // Status, title and notes may change after publishing; the products and numbers may not.
  const rel = r.release;
  const current: ReleaseSite = { ...site, status: rel.status, title: rel.title, notesMarkdown: rel.notesMarkdown, supersedes: rel.supersedes };
  writeJson(join(dir, 'site.json'), current);
  writeJson(join(dir, 'validation.json'), report);
  const manifest = archive.manifest;
  return { products: site.products, checks: report.checks, site, parameters: manifest ? manifest.parameters : { rows: site.parameters } };
}

function writeBuiltFiles(dir: string, results: DetectorJobResult[]): ProductSummary[] {
  mkdirSync(join(dir, 'files'), { recursive: true });
  const products: ProductSummary[] = [];
  for (const res of results)
    for (const f of res.files) {
      const gz = gzipProduct(f.fits);
      const path = `files/${f.name}`;
      writeFileSync(join(dir, path), gz);
      products.push({ id: f.id, kind: f.kind, detector: f.detector, epoch: f.epoch, path, bytes: gz.length, sha256: sha256Hex(gz), validFrom: f.validFrom, validTo: f.validTo });
    }
  return products;
}

/** One build at a time into one --out: a second refuses with one line (exit 4) while the first runs. */
export async function build(opts: BuildOptions): Promise<BuildSummary> {
  mkdirSync(dirname(opts.outDir), { recursive: true });
  try {
    return await withLock(opts.outDir, 'kiln build', () => buildLocked(opts));
  } catch (e) {
    // A disk full in the staging directory is reported as a disk full at --out.
    throw inTermsOf(e, opts.outDir, [join(dirname(opts.outDir), `.${basename(opts.outDir)}.staging-${process.pid}`)]);
  }
}

async function buildLocked(opts: BuildOptions): Promise<BuildSummary> {
  const log = opts.log ?? (() => {});
  // First of all: an earlier swap cut off between its two renames is repaired, whatever follows.
  recoverInterruptedSwap(opts.outDir);
  const content = await loadContent(opts.contentDir);
  const last = opts.publishing ?? opts.upTo;
  if (last !== undefined) {
    const at = content.releases.findIndex((r) => r.release.id === last);
    if (at < 0)
      throw new KilnInputError('no such release', { file: opts.contentDir, value: last, expected: `one of ${content.releases.map((r) => r.release.id).join(', ')}` });
    content.releases.splice(at + 1);
  }
  // An archive wins over any status: a release with one is always served from it.
  const isFrozen = (r: ResolvedRelease) => r.release.id !== opts.publishing && hasArchive(content.root, r.release.id);
  // Check every frozen release before any work: changed inputs, a status moved backwards, a
  // missing, extra or altered archived file stop the build at once, before anything is written.
  const archives = new Map<string, VerifiedArchive>();
  for (const r of content.releases) {
    if (r.release.id === opts.publishing) continue;
    if (FROZEN_STATUSES.has(r.release.status) && !hasArchive(content.root, r.release.id))
      throw new KilnInputError(`release ${r.release.id} has status ${r.release.status} but no archive`, {
        file: r.release.file,
        field: 'status',
        value: r.release.status,
        expected: `draft or candidate until \`kiln publish ${r.release.id}\` has frozen it`,
      });
    if (isFrozen(r)) archives.set(r.release.id, verifyFrozen(content.root, r));
  }
  reached('build:verified');

  removeStaleStaging(opts.outDir);
  const staging = stagingDir(opts.outDir);
  const pool = new JobPool(opts.workers ?? defaultWorkerCount());
  const works: ReleaseWork[] = [];
  let nnz = 0;
  try {
    for (const r of content.releases) {
      const rel = r.release;
      const dir = join(staging, 'releases', rel.id);
      mkdirSync(dir, { recursive: true });
      const inputs = inputsSha256(r);
      const frozen = isFrozen(r);
      let products: ProductSummary[];
      let checks: Check[];
      let parameters: Record<string, unknown> = {};
      if (frozen) {
        const served = serveArchive(r, archives.get(rel.id)!, dir);
        ({ products, checks } = served);
        parameters = served.parameters;
        log(`release ${rel.id} (${rel.status}): ${products.length} archived products verified`);
      } else {
        const jobs = jobsOf(r);
        const t0 = performance.now();
        let done = 0;
        const results = await pool.run(jobs, (res) => {
          done++;
          log(`release ${rel.id} (${rel.status}): detector ${res.detectorId} built, ${res.files.length} products, ${res.nnz} matrix elements [${done}/${jobs.length}, ${((performance.now() - t0) / 1000).toFixed(1)} s]`);
        });
        products = writeBuiltFiles(dir, results);
        checks = results.flatMap((x) => x.checks);
        nnz += results.reduce((s, x) => s + x.nnz, 0);
        const prev = works.length ? works[works.length - 1] : null;
        if (prev) checks.push(...crossReleaseChecks(prev.dir, prev.products, prev.r.release.id, dir, products, rel.id));
        checks = applySignOff(checks, rel.accepted, rel.id === opts.publishing ? (opts.acceptAll ?? null) : null);
        const site: ReleaseSite = {
          schema: 'kiln/release-site/1',
          ...releaseHead(rel),
          notesMarkdown: rel.notesMarkdown,
          parameters: results.flatMap((x) => x.parameters),
          detectors: results.map((x) => x.site),
          products,
        };
        parameters = Object.fromEntries(results.map((x) => [x.detectorId, { fits: x.fits, model: r.detectors.find((d) => d.id === x.detectorId)?.redistribution }]));
        writeJson(join(dir, 'site.json'), site);
        const report: ValidationReport = { schema: 'kiln/validation/1', release: rel.id, checks };
        writeJson(join(dir, 'validation.json'), report);
      }
      const counts = countStatuses(checks);
      const work: ReleaseWork = {
        r,
        dir,
        products,
        outcome: {
          id: rel.id,
          status: rel.status,
          source: frozen ? 'archive' : 'built',
          files: products.length,
          checks: counts,
          failures: checks.filter((c) => c.status === 'fail'),
          reviews: checks.filter((c) => c.status === 'review'),
          all: checks,
        },
      };
      writeJson(join(dir, 'manifest.json'), manifestOf(work, inputs, parameters));
      works.push(work);
      log(`release ${rel.id} (${rel.status}): ${counts.pass} passed, ${counts.fail} failed, ${counts.warn} warnings, ${counts.review} for review${counts.accepted ? `, ${counts.accepted} accepted` : ''}`);
    }
  } catch (e) {
    await pool.close();
    removeStaleStaging(opts.outDir);
    throw e;
  }
  await pool.close();

  const refused = works.filter((w) => w.outcome.failures.length > 0 && w.r.release.status !== 'draft' && w.outcome.source === 'built');
  if (refused.length) {
    removeStaleStaging(opts.outDir);
    const lines = refused.map((w) => formatReleaseReport(`release ${w.outcome.id} (${w.outcome.status}) fails ${plural(w.outcome.failures.length, 'check')}:`, w.outcome.all, { only: ['fail'] }));
    throw new BuildRefused(`${lines.join('\n')}\na candidate release must pass every check (set status: draft to build it with its failures shown; kiln report ID lists every check)`, works.map((w) => w.outcome));
  }

  const index: ReleaseIndex = {
    schema: 'kiln/release-index/1',
    instruments: instrumentSummaries(content),
    releases: works.map(releaseSummary).reverse(),
  };
  writeJson(join(staging, 'index.json'), index);
  reached('build:staged');
  swapInto(staging, opts.outDir, 'build:swap');
  return { outDir: opts.outDir, releases: works.map((w) => w.outcome), products: works.reduce((s, w) => s + w.products.length, 0), nnz };
}
