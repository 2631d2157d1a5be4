/**
 * Site data split per product: a small release summary, and per detector a model document (the
 * RMF side), its profiles, matrix picture and checks, and one document per epoch (the ARF side).
 * Pure, browser-safe: the build writes these pieces as each detector job finishes, the archive
 * keeps the whole-release `site.json` it was published with, and `joinRelease` puts the pieces
 * back together where a whole release is wanted (publishing, `kiln compare`, tests).
 */
import { overlayDetector, overlayDocument } from './overlay.ts';
import { areaPath, checksPath, epochPath, matrixPath, modelPath, profilesPath } from './paths.ts';
import type {
  Check,
  DetectorAreaDoc,
  DetectorChecksDoc,
  DetectorEntry,
  DetectorMatrixDoc,
  DetectorModelDoc,
  DetectorProfilesDoc,
  DetectorSupplementDoc,
  OverlayDetector,
  DetectorSite,
  EpochDataDoc,
  ParameterRow,
  ProductSummary,
  ReleaseSite,
  ReleaseSummaryDoc,
} from './types.ts';

export interface SiteDocument {
  /** Release-relative path (see paths.ts). */
  path: string;
  doc: unknown;
}

type Counts = DetectorEntry['checks'];

const sameNumbers = (x: readonly number[], y: readonly number[]) => x.length === y.length && x.every((v, k) => v === y[k]);

export function countChecks(checks: readonly { status: Check['status'] }[]): Counts {
  const c: Counts = { pass: 0, fail: 0, warn: 0, review: 0, accepted: 0 };
  for (const x of checks) c[x.status]++;
  return c;
}

/** The documents of one detector and its summary entry. */
export function splitDetector(
  releaseId: string,
  det: DetectorSite,
  parameters: ParameterRow[],
  products: ProductSummary[],
  checks: Check[],
): { entry: DetectorEntry; documents: SiteDocument[]; overlay: OverlayDetector } {
  const model: DetectorModelDoc = {
    schema: 'kiln/detector-model/1',
    release: releaseId,
    id: det.id,
    name: det.name,
    kind: det.kind,
    epochs: det.epochs.map((e) => ({ id: e.id, date: e.date, validFrom: e.validFrom, validTo: e.validTo })),
    resolution: det.resolution,
    ...(det.efficiency ? { efficiency: det.efficiency } : {}),
    ...(det.regions ? { regions: det.regions } : {}),
    lineFits: det.lineFits,
    fitQuality: det.fitQuality,
    parameters,
    products,
  };
  const profiles: DetectorProfilesDoc = { schema: 'kiln/detector-profiles/1', release: releaseId, detector: det.id, profiles: det.profiles };
  const matrix: DetectorMatrixDoc = { schema: 'kiln/detector-matrix/1', release: releaseId, detector: det.id, matrix: det.matrix };
  const checksDoc: DetectorChecksDoc = { schema: 'kiln/detector-checks/1', release: releaseId, detector: det.id, checks };
  const area: DetectorAreaDoc = {
    schema: 'kiln/detector-area/1',
    release: releaseId,
    detector: det.id,
    energyKeV: det.epochs[0]?.energyKeV ?? [],
    epochs: det.epochs.map((e) => (sameNumbers(e.energyKeV, det.epochs[0].energyKeV) ? { id: e.id, effectiveAreaCm2: e.effectiveAreaCm2 } : { id: e.id, energyKeV: e.energyKeV, effectiveAreaCm2: e.effectiveAreaCm2 })),
  };
  const documents: SiteDocument[] = [
    { path: modelPath(det.id), doc: model },
    { path: profilesPath(det.id), doc: profiles },
    { path: matrixPath(det.id), doc: matrix },
    { path: checksPath(det.id), doc: checksDoc },
    { path: areaPath(det.id), doc: area },
    ...det.epochs.map((epoch) => ({ path: epochPath(det.id, epoch.id), doc: { schema: 'kiln/epoch-data/1', release: releaseId, detector: det.id, epoch } satisfies EpochDataDoc })),
  ];
  const entry: DetectorEntry = {
    id: det.id,
    name: det.name,
    kind: det.kind,
    epochs: model.epochs,
    products: products.length,
    checks: countChecks(checks),
  };
  return { entry, documents, overlay: overlayDetector(det) };
}

/** Which detector each check belongs to (by its product), null for release-level ones. */
export function checksByDetector(checks: Check[], products: ProductSummary[]): Map<string | null, Check[]> {
  const detOf = new Map(products.map((p) => [p.id, p.detector]));
  const out = new Map<string | null, Check[]>();
  for (const c of checks) {
    const d = c.product === null ? null : (detOf.get(c.product) ?? null);
    const list = out.get(d);
    if (list) list.push(c);
    else out.set(d, [c]);
  }
  return out;
}

export function summaryDoc(
  head: Pick<ReleaseSite, 'id' | 'instrument' | 'title' | 'date' | 'status' | 'validFrom' | 'validTo' | 'supersedes' | 'notesMarkdown'>,
  detectors: DetectorEntry[],
  releaseChecks: Check[],
  parameters: ParameterRow[],
): ReleaseSummaryDoc {
  const counts = countChecks(releaseChecks);
  for (const d of detectors) for (const k of Object.keys(counts) as (keyof Counts)[]) counts[k] += d.checks[k];
  return {
    schema: 'kiln/release-summary/1',
    id: head.id,
    instrument: head.instrument,
    title: head.title,
    date: head.date,
    status: head.status,
    validFrom: head.validFrom,
    validTo: head.validTo,
    supersedes: head.supersedes,
    notesMarkdown: head.notesMarkdown,
    parameters,
    checks: releaseChecks,
    counts,
    products: detectors.reduce((s, d) => s + d.products, 0),
    detectors,
  };
}

/** A whole release (an archive's site.json, or a fixture) split into its documents. */
export function splitRelease(site: ReleaseSite, checks: Check[]): SiteDocument[] {
  const byDet = checksByDetector(checks, site.products);
  const entries: DetectorEntry[] = [];
  const docs: SiteDocument[] = [];
  const overlays: OverlayDetector[] = [];
  for (const d of site.detectors) {
    const { entry, documents, overlay } = splitDetector(
      site.id,
      d,
      site.parameters.filter((p) => p.detector === d.id),
      site.products.filter((p) => p.detector === d.id),
      byDet.get(d.id) ?? [],
    );
    entries.push(entry);
    docs.push(...documents);
    overlays.push(overlay);
  }
  const known = new Set(site.detectors.map((d) => d.id));
  const orphanChecks = [...byDet].filter(([d]) => d === null || !known.has(d)).flatMap(([, cs]) => cs);
  const summary = summaryDoc(site, entries, orphanChecks, site.parameters.filter((p) => p.detector === null || !known.has(p.detector)));
  return [{ path: 'summary.json', doc: summary }, overlayDocument(site.id, overlays), ...docs];
}

const EMPTY_PROFILES: DetectorSite['profiles'] = { channelEnergyKeV: [], energiesKeV: [], rows: [] };
const EMPTY_MATRIX: DetectorSite['matrix'] = { path: null, log10: [], energyKeV: [0, 0], channelEnergyKeV: [0, 0], log10Range: [0, 0] };

/** Reads one document by release-relative path (from disk, from a fetch, from a map). */
export type DocReader = <T>(path: string) => T;

export interface JoinedDetector {
  site: DetectorSite;
  parameters: ParameterRow[];
  products: ProductSummary[];
  checks: Check[];
}

export interface JoinParts {
  /** Leave out the line profiles (empty set). */
  profiles?: boolean;
  /** Leave out the matrix picture (empty image): only the build's PNG step reads it. */
  matrix?: boolean;
  checks?: boolean;
  /** Only these epochs (default all). */
  epochs?: string[];
}

/** One detector put back together from its documents. */
export function joinDetector(detector: string, read: DocReader, parts: JoinParts = {}): JoinedDetector {
  const model = read<DetectorModelDoc>(modelPath(detector));
  return joinModel(model, read, parts);
}

export function joinModel(model: DetectorModelDoc, read: DocReader, parts: JoinParts = {}): JoinedDetector {
  const detector = model.id;
  const wanted = parts.epochs ? model.epochs.filter((e) => parts.epochs!.includes(e.id)) : model.epochs;
  const site: DetectorSite = {
    id: model.id,
    name: model.name,
    kind: model.kind,
    epochs: wanted.map((e) => read<EpochDataDoc>(epochPath(detector, e.id)).epoch),
    resolution: model.resolution,
    ...(model.efficiency ? { efficiency: model.efficiency } : {}),
    ...(model.regions ? { regions: model.regions } : {}),
    lineFits: model.lineFits,
    fitQuality: model.fitQuality,
    profiles: parts.profiles === false ? EMPTY_PROFILES : read<DetectorProfilesDoc>(profilesPath(detector)).profiles,
    matrix: parts.matrix === false ? EMPTY_MATRIX : read<DetectorMatrixDoc>(matrixPath(detector)).matrix,
  };
  return { site, parameters: model.parameters, products: model.products, checks: parts.checks === false ? [] : read<DetectorChecksDoc>(checksPath(detector)).checks };
}

/** A detector's site data with an archive's supplement (curves computed at this build) merged in. */
export function withSupplement(site: DetectorSite, sup: DetectorSupplementDoc): DetectorSite {
  const aligned = sup.lineFits.length === site.lineFits.length;
  return {
    ...site,
    resolution: { ...site.resolution, ...sup.resolution },
    ...(sup.efficiency ? { efficiency: sup.efficiency } : {}),
    lineFits: aligned ? site.lineFits.map((l, i) => ({ ...l, ...sup.lineFits[i] })) : site.lineFits,
    supplementedBy: sup.generator,
  };
}

/** The whole release, with its checks in release-then-detector order. */
export function joinRelease(summary: ReleaseSummaryDoc, read: DocReader, parts: JoinParts = {}): { site: ReleaseSite; checks: Check[] } {
  const dets = summary.detectors.map((d) => joinDetector(d.id, read, parts));
  const site: ReleaseSite = {
    schema: 'kiln/release-site/1',
    id: summary.id,
    instrument: summary.instrument,
    title: summary.title,
    date: summary.date,
    status: summary.status,
    validFrom: summary.validFrom,
    validTo: summary.validTo,
    supersedes: summary.supersedes,
    notesMarkdown: summary.notesMarkdown,
    parameters: [...summary.parameters, ...dets.flatMap((d) => d.parameters)],
    detectors: dets.map((d) => d.site),
    products: dets.flatMap((d) => d.products),
  };
  return { site, checks: [...summary.checks, ...dets.flatMap((d) => d.checks)] };
}

/**
 * A detector for comparisons: model curves and every epoch's effective area, without profiles,
 * matrix or efficiency components (their arrays are empty).
 */
export function detectorForCompare(model: DetectorModelDoc, area: DetectorAreaDoc): DetectorSite {
  return {
    id: model.id,
    name: model.name,
    kind: model.kind,
    epochs: model.epochs.map((e) => {
      const a = area.epochs.find((x) => x.id === e.id);
      return { ...e, energyKeV: a ? (a.energyKeV ?? area.energyKeV) : [], mirrorCm2: [], components: [], detectorQE: [], effectiveAreaCm2: a?.effectiveAreaCm2 ?? [] };
    }),
    resolution: model.resolution,
    ...(model.efficiency ? { efficiency: model.efficiency } : {}),
    ...(model.regions ? { regions: model.regions } : {}),
    lineFits: model.lineFits,
    fitQuality: model.fitQuality,
    profiles: EMPTY_PROFILES,
    matrix: EMPTY_MATRIX,
  };
}
