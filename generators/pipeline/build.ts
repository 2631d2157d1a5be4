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
import { mkdirSync, writeFileSync } from 'node:fs';
import { isForwardOf, type ReleaseStatus } from '../content/status-line.ts';
import { basename, dirname, join } from 'node:path';
import { loadContent } from '../content/index.ts';
import { findReleaseByName } from '../content/release-key.ts';
import type { ContentTree, ResolvedRelease } from '../content/types.ts';
import { inTermsOf, KilnInputError } from '../errors.ts';
import type {
  Check,
  DetectorModelDoc,
  DetectorSupplementDoc,
  InstrumentSummary,
  ManifestFile,
  ProductSummary,
  ReleaseIndex,
  ReleaseManifest,
  ReleaseSite,
  ReexaminedCounts,
  ReleaseSummary,
  ValidationReport,
  ReleaseSpectral,
} from '../site-data/types.ts';
import { countStatuses, formatReleaseReport } from '../checks/index.ts';
import { plural } from '../plural.ts';
import { applySignOff, type AcceptAll } from './sign-off.ts';
import { archiveDirOf, hasArchive, readSeal, verifyArchive, type Seal, type VerifiedArchive } from './archive.ts';
import { recoverInterruptedSwap, removeStaleStaging, stagingDir, swapInto } from './atomic.ts';
import { withLock } from './lock.ts';
import { reached } from './phase.ts';
import { crossReleaseChecks } from './cross-release.ts';
import { impactChecks, releaseSpectral, spectralElements, type ReleaseProducts } from './impact.ts';
import { pruneSpectralEntries, readSpectralEntry, spectralKey, writeSpectralEntry, SPECTRAL_DIR } from './spectral-cache.ts';
import { sha256Hex } from './hash.ts';
import { writeJson, writeSiteDocuments } from './site-files.ts';
import { finderDocuments } from '../site-data/finder.ts';
import { splitRelease, withSupplement } from '../site-data/split.ts';
import { changedInputFiles, inputsSha256, jobsOf } from './inputs.ts';
import { JobPool, defaultWorkerCount } from './pool.ts';
import { generatorVersion } from './generator-version.ts';
import { jobFingerprint, jobIdOf, type JobOutput } from './job-output.ts';
import { pruneJobEntries, readJobEntry, writeJobEntry } from './job-store.ts';
import { checksByDetector, countChecks, splitDetector, summaryDoc } from '../site-data/split.ts';
import { checksPath, OVERLAY_FILE, REEXAMINED_FILE, supplementPath } from '../site-data/paths.ts';
import { overlayDetector, overlayDocument } from '../site-data/overlay.ts';
import { cachedReexamination, REEXAMINED_DIR } from './reexamine-cache.ts';
import { pruneDocEntries } from './doc-cache.ts';
import { buildKey, outputIsCurrent, readBuildStamp, writeBuildStamp, type TreeDigest, treeDigest } from './build-stamp.ts';
export { gzipProduct } from './job-output.ts';
import { modelJobs } from './model-jobs.ts';
export { modelJobs } from './model-jobs.ts';
import { MODEL_FILE, MODEL_SCHEMA_FILE } from '../model/types.ts';
import { MODEL_JSON_SCHEMA } from '../model/model-schema.ts';
import type { DetectorJob } from './job.ts';
/** Statuses whose products are frozen in the archive. */
const FROZEN_STATUSES = new Set(['published', 'superseded']);

export interface BuildOptions {
  contentDir: string;
  outDir: string;
  workers?: number;
  /** Progress lines (to the terminal). */
  log?: (line: string) => void;
  /**
   * Publishing: build releases up to and including this one only (its key), and build this one from its
   * inputs even if its status is already published (it has no archive yet).
   */
  publishing?: string;
  /**
   * Job cache: outputs of unchanged jobs (same fingerprint) are reused from here. Default
   * `cache/` beside the output directory (`.kiln/cache` for `.kiln/out`); null: no cache.
   */
  cacheDir?: string | null;
  /** Rebuild every job; the cache is refreshed with the new outputs. */
  noCache?: boolean;
  /**
   * Gathering shards: every job's output comes from here (verified); none is built. The
   * callback throws a KilnInputError for a job it cannot serve.
   */
  prebuilt?: (jobId: string, fingerprint: string) => JobOutput;
  /** Lines that must be seen even with --quiet (a cache entry rejected and rebuilt). */
  warn?: (line: string) => void;
  /** Build releases up to and including this one only (`kiln report`): a key, instrument~id, or a bare id one instrument uses. */
  upTo?: string;
  /** Publishing with `--accept-all`: every open review item of the published release is accepted so. */
  acceptAll?: AcceptAll;
}

/**
 * Default job cache of an output directory: `.kiln/cache` for an output inside `.kiln/` (the
 * default `.kiln/out`), else `DIR.cache` beside `--out DIR`, so unrelated outputs never share one.
 */
export const defaultCacheDir = (outDir: string): string => (basename(dirname(outDir)) === '.kiln' ? join(dirname(outDir), 'cache') : `${outDir}.cache`);
const JOBS_DIR = 'jobs';

export interface ReleaseOutcome {
  /** The release's key (its folder name: the id, or `<instrument>~<id>`). */
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
  /** Jobs run, reused from the cache, taken from shards. */
  jobs: { built: number; cached: number; gathered: number };
  /** Set when nothing changed since the last whole build into outDir: its files were verified and left in place (pipeline/build-stamp.ts). */
  unchanged?: TreeDigest;
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


function instrumentSummaries(content: ContentTree): InstrumentSummary[] {
  return content.instruments.map((i) => ({
    id: i.id,
    telescope: i.telescope,
    instrument: i.instrument,
    title: i.title,
    description: i.description,
    channels: i.channels.count,
    detectors: i.detectors.map((d) => ({ id: d.id, name: d.name, kind: d.kind, description: d.description })),
    ...(i.configurations ? { configurations: i.configurations.map((c) => ({ id: c.id, title: c.title ?? c.id, filter: c.filter })) } : {}),
  }));
}

/** Checks that the frozen release still has the inputs it was published from. */
export function verifyFrozenInputs(r: ResolvedRelease, seal: Seal): void {
  const now = inputsSha256(r);
  if (now === seal.inputsSha256) return;
  const changed = changedInputFiles(r, seal);
  throw new KilnInputError(`inputs of ${r.release.status} release ${r.release.key} changed since it was published`, {
    file: r.release.file,
    value: changed.length ? `changed files: ${changed.join(', ')}` : `fingerprint ${now}`,
    expected: `the inputs with fingerprint ${seal.inputsSha256}; published releases are never rewritten — keep these inputs and restate the corrected ones in a new release (release.yaml overrides:, README "How to correct a published release")`,
  });
}

/** The release's model document in its output directory. */
interface ModelRef {
  path: string;
  bytes: number;
  sha256: string;
}

interface ReleaseWork {
  model: ModelRef | null;
  r: ResolvedRelease;
  dir: string;
  outcome: ReleaseOutcome;
  products: ProductSummary[];
  /** Archived releases: findings of today's checks (reexamined.json). */
  reexamined?: ReexaminedCounts;
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
    key: w.r.release.key,
    supersedesKey: w.r.release.supersedesKey,
    checks: { pass: c.pass, fail: c.fail, warn: c.warn, review: c.review, accepted: c.accepted },
    products: w.products,
    ...(w.reexamined ? { reexamined: w.reexamined } : {}),
    ...(w.model ? { model: w.model } : {}),
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
    ...(p.filter !== undefined ? { filter: p.filter } : {}),
    ...(p.node !== undefined ? { node: p.node } : {}),
    ...(p.rowBand !== undefined ? { rowBand: p.rowBand } : {}),
    epoch: p.epoch,
    validFrom: p.validFrom,
    validTo: p.validTo,
    ...(p.validEnergyKeV ? { validEnergyKeV: p.validEnergyKeV } : {}),
    ...(p.validChannels ? { validChannels: p.validChannels } : {}),
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
  const seal = readSeal(root, rel.key);
  const archive = verifyArchive(root, seal, rel);
  if (!isForwardOf(archive.sealedStatus as ReleaseStatus, rel.status as ReleaseStatus)) {
    const finish = rel.status === 'candidate' && archive.sealedStatus === 'published';
    throw new KilnInputError(`release ${rel.key} is archived as ${archive.sealedStatus}; its status may only move forward (published → superseded → withdrawn)`, {
      file: rel.file,
      field: 'status',
      value: rel.status,
      expected: `${archive.sealedStatus}${archive.sealedStatus === 'withdrawn' ? '' : ' or a later status'}`,
      todo: finish ? `if a publish was interrupted, \`kiln publish ${rel.key}\` finishes it` : `set status back to ${archive.sealedStatus}; to change the calibration make a new release`,
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
  supplements: Map<string, DetectorSupplementDoc> = new Map(),
): { products: ProductSummary[]; checks: Check[]; site: ReleaseSite; parameters: Record<string, unknown>; model: ModelRef | null } {
  const { bytes, site, report } = archive;
  mkdirSync(join(dir, 'files'), { recursive: true });
  for (const [path, b] of bytes) if (path.startsWith('files/')) writeFileSync(join(dir, path), b);
  // Status, title and notes may change after publishing; the products and numbers may not.
  const rel = r.release;
  const current: ReleaseSite = { ...site, status: rel.status, title: rel.title, notesMarkdown: rel.notesMarkdown, supersedes: rel.supersedes };
  // The served documents join back into the archived site data; curves it predates go beside
  // them (supplement.json, flagged in the model document) and into the overlay.
  const docs = splitRelease(current, report.checks).map((d) => {
    const m = d.doc as DetectorModelDoc;
    return m.schema === 'kiln/detector-model/1' && supplements.has(m.id) ? { ...d, doc: { ...m, supplement: true } } : d;
  });
  if (supplements.size) {
    const merged = current.detectors.map((d) => (supplements.has(d.id) ? withSupplement(d, supplements.get(d.id)!) : d));
    const i = docs.findIndex((d) => d.path === OVERLAY_FILE);
    docs[i] = overlayDocument(current.id, merged.map(overlayDetector));
    for (const [det, doc] of supplements) docs.push({ path: supplementPath(det), doc });
  }
  writeSiteDocuments(dir, docs);
  writeJson(join(dir, 'validation.json'), report);
  // Archives sealed since model documents exist carry theirs; older ones have none.
  const modelBytes = bytes.get(MODEL_FILE);
  let model: ModelRef | null = null;
  if (modelBytes) {
    writeFileSync(join(dir, MODEL_FILE), modelBytes);
    writeJson(join(dir, MODEL_SCHEMA_FILE), MODEL_JSON_SCHEMA);
    model = { path: MODEL_FILE, bytes: modelBytes.length, sha256: sha256Hex(modelBytes) };
  }
  const manifest = archive.manifest;
  return { products: site.products, checks: report.checks, site, parameters: manifest ? manifest.parameters : { rows: site.parameters }, model };
}

/** What a release keeps of one job once its output is on disk: summaries only. */
interface JobSlot {
  detectorId: string;
  products: ProductSummary[];
  checks: Check[];
  parameters: ReleaseSite['parameters'];
  fits: JobOutput['meta']['fits'];
  nnz: number;
  entry: ReturnType<typeof splitDetector>['entry'];
  overlay: ReturnType<typeof splitDetector>['overlay'];
}

/** Writes one job's products and site documents (all but its checks) into the release directory. */
function writeJobOutput(dir: string, releaseId: string, out: JobOutput): JobSlot {
  const m = out.meta;
  mkdirSync(join(dir, 'files'), { recursive: true });
  const products: ProductSummary[] = m.files.map((f, i) => {
    const path = `files/${f.name}`;
    writeFileSync(join(dir, path), out.gz[i]);
    return {
      id: f.id, kind: f.kind, detector: f.detector, ...(f.node !== undefined ? { node: f.node } : {}), ...(f.rowBand !== undefined ? { rowBand: f.rowBand } : {}), epoch: f.epoch, path, bytes: f.bytes, sha256: f.sha256, validFrom: f.validFrom, validTo: f.validTo,
      ...(f.validEnergyKeV ? { validEnergyKeV: f.validEnergyKeV } : {}),
      ...(f.validChannels ? { validChannels: f.validChannels } : {}),
    };
  });
  const { entry, documents, overlay } = splitDetector(releaseId, m.site, m.parameters, products, []);
  const checksDoc = checksPath(m.site.id);
  writeSiteDocuments(dir, documents.filter((d) => d.path !== checksDoc));
  return { detectorId: m.site.id, products, checks: m.checks, parameters: m.parameters, fits: m.fits, nnz: m.nnz, entry, overlay };
}

/** A release's spectral section, from the cache when its key (sources, product hashes, generator) is unchanged. */
function cachedSpectral(ctx: JobContext, root: string | null, used: Set<string>, ins: ResolvedRelease['instrument'], newer: ReleaseProducts, older: ReleaseProducts | null): ReleaseSpectral | null {
  if (!ins.spectral) return null;
  const key = spectralKey(ins, newer, older, ctx.generator);
  used.add(key);
  if (root && !ctx.noCache) {
    const e = readSpectralEntry(root, key);
    if (e.ok) {
      ctx.log(`release ${newer.id}: spectral predictions and impact from cache`);
      return e.doc;
    }
    if (!e.missing) ctx.warn(`cache entry of the spectral section of release ${newer.id} (${key.slice(0, 12)}) rejected: ${e.reason}; recomputing it`);
  }
  const doc = releaseSpectral(ins, newer, older, ctx.log);
  if (doc && root) {
    const copy = structuredClone(doc);
    ctx.later.push(() => writeSpectralEntry(root, key, copy));
  }
  return doc;
}

/**
 * Which releases are frozen (served from their archive) and their verified archives. An archive
 * wins over any status: a release with one is always served from it. Every frozen release is
 * checked before any work: changed inputs, a status moved backwards, a missing, extra or altered
 * archived file stop the build at once, before anything is written. `kiln plan` uses the same
 * rule, so a plan lists exactly the jobs a build runs.
 */
export function verifyFrozenReleases(
  content: ContentTree,
  publishing?: string,
): { archives: Map<string, VerifiedArchive>; isFrozen: (r: ResolvedRelease) => boolean } {
  const isFrozen = (r: ResolvedRelease) => r.release.key !== publishing && hasArchive(content.root, r.release.key);
  const archives = new Map<string, VerifiedArchive>();
  for (const r of content.releases) {
    if (r.release.key === publishing) continue;
    if (FROZEN_STATUSES.has(r.release.status) && !hasArchive(content.root, r.release.key))
      throw new KilnInputError(`release ${r.release.key} has status ${r.release.status} but no archive`, {
        file: r.release.file,
        field: 'status',
        value: r.release.status,
        expected: `draft or candidate until \`kiln publish ${r.release.key}\` has frozen it`,
      });
    if (isFrozen(r)) archives.set(r.release.key, verifyFrozen(content.root, r));
  }
  return { archives, isFrozen };
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
  const last = opts.publishing ?? opts.upTo;
  const cacheDir = opts.prebuilt ? null : opts.cacheDir === undefined ? defaultCacheDir(opts.outDir) : opts.cacheDir;
  // A whole build from the cache: when nothing changed since the last one into this output, its
  // verified files are what this build would write, so they stay (publishing always builds).
  const recorded = cacheDir !== null && last === undefined;
  const key = recorded ? buildKey(opts.contentDir, generatorVersion()) : null;
  if (recorded && !opts.noCache) {
    const stamp = readBuildStamp<BuildSummary>(cacheDir, opts.outDir);
    if (outputIsCurrent(stamp, key, opts.outDir)) {
      const s = stamp.summary;
      log(`nothing changed since the last build into ${opts.outDir}: its ${plural(stamp.output.files, 'file')} (${(stamp.output.bytes / 1e6).toFixed(1)} MB) verified and left in place`);
      return { ...s, outDir: opts.outDir, jobs: { built: 0, cached: s.jobs.built + s.jobs.cached, gathered: 0 }, unchanged: stamp.output };
    }
  }
  const content = await loadContent(opts.contentDir);
  if (last !== undefined) {
    // `publishing` is a key (publish resolved the name); `upTo` is the name the user gave.
    const target =
      (opts.publishing !== undefined ? content.releases.find((r) => r.release.key === opts.publishing)?.release : undefined) ??
      findReleaseByName(content.releases.map((r) => r.release), last, { file: opts.contentDir });
    const at = content.releases.findIndex((r) => r.release === target);
    content.releases.splice(at + 1);
  }
  const { archives, isFrozen } = verifyFrozenReleases(content, opts.publishing);
  reached('build:verified');

  removeStaleStaging(opts.outDir);
  const staging = stagingDir(opts.outDir);
  const pool = new JobPool(opts.workers ?? defaultWorkerCount());
  const works: ReleaseWork[] = [];
  let nnz = 0;
  const ctx: JobContext = {
    generator: generatorVersion(),
    cacheRoot: cacheDir === null ? null : join(cacheDir, JOBS_DIR),
    noCache: opts.noCache === true,
    prebuilt: opts.prebuilt,
    log,
    warn: opts.warn ?? log,
    used: new Set(),
    counts: { built: 0, cached: 0, gathered: 0 },
    later: [],
  };
  const spectralRoot = cacheDir === null ? null : join(cacheDir, SPECTRAL_DIR);
  const spectralUsed = new Set<string>();
  const reexamine = { root: cacheDir === null ? null : join(cacheDir, REEXAMINED_DIR), noCache: ctx.noCache, generator: ctx.generator, used: new Set<string>(), warn: ctx.warn, later: ctx.later };
  try {
    for (const r of content.releases) {
      const rel = r.release;
      const dir = join(staging, 'releases', rel.key);
      mkdirSync(dir, { recursive: true });
      const inputs = inputsSha256(r);
      const frozen = isFrozen(r);
      let products: ProductSummary[];
      let checks: Check[];
      let parameters: Record<string, unknown> = {};
      let reexamined: ReexaminedCounts | undefined;
      let modelRef: ModelRef | null = null;
      // Predicted rates of the reference sources and the impact of the change from the superseded release.
      const older = works.find((w) => w.r.release.key === rel.supersedesKey) ?? null;
      const spectralOf = (ps: ProductSummary[]) => {
        const newerP = { id: rel.key, dir, products: ps };
        const olderP = older ? { id: older.r.release.key, dir: older.dir, products: older.products } : null;
        const s = cachedSpectral(ctx, spectralRoot, spectralUsed, r.instrument, newerP, olderP);
        if (s) {
          writeJson(join(dir, 'spectral.json'), s);
          writeJson(join(dir, 'spectral-elements.json'), spectralElements(s));
        }
        return s;
      };
      if (frozen) {
        // Today's checks on the archived bytes, read-only: shown beside the published report.
        const { doc: re, supplements, fromCache } = cachedReexamination(reexamine, r, archives.get(rel.key)!);
        const served = serveArchive(r, archives.get(rel.key)!, dir, supplements);
        ({ products, checks } = served);
        parameters = served.parameters;
        modelRef = served.model;
        log(`release ${rel.key} (${rel.status}): ${products.length} archived products verified`);
        writeJson(join(dir, REEXAMINED_FILE), re);
        reexamined = re.counts;
        log(`release ${rel.key} (${rel.status}): re-examined with current checks${fromCache ? ' (from cache)' : ''}: ${re.counts.fail} failed, ${re.counts.warn} warnings not in the published report (${re.counts.checks} checks)`);
        // A frozen release's validation report stays as archived; its impact is in spectral.json only.
        spectralOf(products);
      } else {
        const { jobs, model } = modelJobs(r);
        writeFileSync(join(dir, MODEL_FILE), model.text);
        writeJson(join(dir, MODEL_SCHEMA_FILE), MODEL_JSON_SCHEMA);
        modelRef = { path: MODEL_FILE, bytes: model.bytes, sha256: model.sha256 };
        const slots = await runReleaseJobs(r, jobs, dir, pool, ctx);
        // Each product of a configured entry states its configuration (the finder and index select by it).
        const confOf = new Map(r.detectors.map((d) => [d.id, d.configuration?.id]));
        products = slots.flatMap((x) => x.products.map((p) => (confOf.get(p.detector) ? { ...p, filter: confOf.get(p.detector) } : p)));
        checks = slots.flatMap((x) => x.checks);
        nnz += slots.reduce((s, x) => s + x.nnz, 0);
        // The review pairs a release with the one before it of the same instrument (ids are scoped by instrument).
        const prev = [...works].reverse().find((w) => w.r.release.instrument === rel.instrument) ?? null;
        if (prev) checks.push(...crossReleaseChecks(prev.dir, prev.products, prev.r.release.id, dir, products, rel.id));
        const spectral = spectralOf(products);
        if (spectral) checks.push(...impactChecks(spectral, products));
        checks = applySignOff(checks, rel.accepted, rel.key === opts.publishing ? (opts.acceptAll ?? null) : null);
        parameters = Object.fromEntries(slots.map((x) => [x.detectorId, { fits: x.fits, model: r.detectors.find((d) => d.id === x.detectorId)?.redistribution }]));
        // Checks go to their detector's document once the cross-release review has added its own.
        const byDet = checksByDetector(checks, products);
        const known = new Set(slots.map((x) => x.detectorId));
        const entries = slots.map((x) => {
          const own = byDet.get(x.detectorId) ?? [];
          writeSiteDocuments(dir, [{ path: checksPath(x.detectorId), doc: { schema: 'kiln/detector-checks/1', release: rel.id, detector: x.detectorId, checks: own } }]);
          return { ...x.entry, checks: countChecks(own) };
        });
        const orphans = [...byDet].filter(([d]) => d === null || !known.has(d)).flatMap(([, cs]) => cs);
        const allParameters = slots.flatMap((x) => x.parameters);
        writeSiteDocuments(dir, [overlayDocument(rel.id, slots.map((x) => x.overlay))]);
        writeSiteDocuments(dir, [{ path: 'summary.json', doc: summaryDoc({ ...releaseHead(rel), notesMarkdown: rel.notesMarkdown }, entries, orphans, allParameters.filter((p) => p.detector === null || !known.has(p.detector))) }]);
        const report: ValidationReport = { schema: 'kiln/validation/1', release: rel.id, checks };
        writeJson(join(dir, 'validation.json'), report);
      }
      const counts = countStatuses(checks);
      const work: ReleaseWork = {
        r,
        dir,
        products,
        model: modelRef,
        reexamined,
        outcome: {
          id: rel.key,
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
      log(`release ${rel.key} (${rel.status}): ${counts.pass} passed, ${counts.fail} failed, ${counts.warn} warnings, ${counts.review} for review${counts.accepted ? `, ${counts.accepted} accepted` : ''}`);
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
  writeSiteDocuments(staging, finderDocuments(index));
  reached('build:staged');
  swapInto(staging, opts.outDir, 'build:swap');
  // The output is in place; a cache entry that cannot be written now is only a slower next build.
  for (const write of ctx.later) {
    try {
      write();
    } catch (e) {
      ctx.warn(`cache entry not written (${(e as Error).message}); the next build recomputes it`);
    }
  }
  // The cache keeps the entries of the last successful whole build: bounded, and safe to delete.
  // A build up to one release (publish) leaves the later releases' entries where they are.
  if (last === undefined) {
    if (ctx.cacheRoot) pruneJobEntries(ctx.cacheRoot, ctx.used);
    if (spectralRoot) pruneSpectralEntries(spectralRoot, spectralUsed);
    if (reexamine.root) pruneDocEntries(reexamine.root, reexamine.used);
  }
  const summary: BuildSummary = { outDir: opts.outDir, releases: works.map((w) => w.outcome), products: works.reduce((s, w) => s + w.products.length, 0), nnz, jobs: ctx.counts };
  if (recorded && key !== null) recordBuild(cacheDir, key, opts, summary, ctx.warn);
  return summary;
}

/**
 * Records a whole build for the next one (pipeline/build-stamp.ts), if the content tree is the
 * one it started from (keyed again now: an edit during the build must not be recorded as built).
 */
function recordBuild(cacheDir: string, keyAtStart: string, opts: BuildOptions, summary: BuildSummary, warn: (line: string) => void): void {
  try {
    const output = treeDigest(opts.outDir);
    // Edited meanwhile: the record says "nothing known" (an empty key matches no build).
    const key = buildKey(opts.contentDir, generatorVersion()) === keyAtStart ? keyAtStart : '';
    if (output !== null) writeBuildStamp(cacheDir, { outDir: opts.outDir, key, output, summary });
  } catch (e) {
    warn(`record of this build not written (${(e as Error).message}); the next build rebuilds from the job cache`);
  }
}

interface JobContext {
  generator: string;
  cacheRoot: string | null;
  noCache: boolean;
  prebuilt?: BuildOptions['prebuilt'];
  log: (line: string) => void;
  warn: (line: string) => void;
  /** Fingerprints of this build's jobs (what the cache keeps). */
  used: Set<string>;
  counts: BuildSummary['jobs'];
  /**
   * Cache writes of derived documents (spectral sections, re-examinations), run once the output
   * is in place: a build that fails (a full disk, say) leaves no cache of its own behind.
   */
  later: (() => void)[];
}

/**
 * A release's detector jobs: each taken from the shards when gathering, else from the cache when
 * its verified entry is there, else run on the pool (and cached). Every output is written to disk
 * as it arrives and only its summary kept, in job order.
 */
async function runReleaseJobs(r: ResolvedRelease, jobs: DetectorJob[], dir: string, pool: JobPool, ctx: JobContext): Promise<JobSlot[]> {
  const rel = r.release;
  const tasks = jobs.map((job) => ({ job, fingerprint: jobFingerprint(job, ctx.generator), generator: ctx.generator }));
  const slots: JobSlot[] = new Array(tasks.length);
  const t0 = performance.now();
  let done = 0;
  const take = (out: JobOutput, i: number, how: string) => {
    slots[i] = writeJobOutput(dir, rel.id, out);
    done++;
    ctx.log(`release ${rel.key} (${rel.status}): detector ${slots[i].detectorId} ${how}, ${out.meta.files.length} products, ${out.meta.nnz} matrix elements [${done}/${tasks.length}, ${((performance.now() - t0) / 1000).toFixed(1)} s]`);
  };
  const toRun: number[] = [];
  tasks.forEach((t, i) => {
    const id = jobIdOf(t.job);
    ctx.used.add(t.fingerprint);
    if (ctx.prebuilt) {
      take(ctx.prebuilt(id, t.fingerprint), i, 'gathered');
      ctx.counts.gathered++;
      return;
    }
    if (ctx.cacheRoot && !ctx.noCache) {
      const e = readJobEntry(ctx.cacheRoot, t.fingerprint, { job: id, generator: ctx.generator });
      if (e.ok) {
        take(e.output, i, 'from cache');
        ctx.counts.cached++;
        return;
      }
      if (!e.missing) ctx.warn(`cache entry of job ${id} (${t.fingerprint.slice(0, 12)}) rejected: ${e.reason}; rebuilding it`);
    }
    toRun.push(i);
  });
  await pool.run(
    toRun.map((i) => tasks[i]),
    (out, k) => {
      if (ctx.cacheRoot) writeJobEntry(ctx.cacheRoot, out);
      take(out, toRun[k], 'built');
      ctx.counts.built++;
    },
  );
  return slots;
}
