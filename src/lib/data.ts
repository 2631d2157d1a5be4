/**
 * Build-time access to the build's output (the only source of numbers for the pages).
 * DIR = KILN_OUT or .kiln/out, relative to the project root.
 *
 * Small documents (index, summaries, manifests) are kept once read; a detector's documents are
 * read when its page or section is rendered and only the most recent few are kept, so the site
 * build's memory does not grow with the number of detectors.
 */
import { existsSync, readFileSync } from 'node:fs';
import { resolve, join } from 'node:path';
import type { Check, DetectorModelDoc, DetectorSupplementDoc, ReexaminationDoc, ReleaseIndex, ReleaseManifest, ReleaseSite, ReleaseSpectral, ReleaseSummaryDoc, ValidationReport } from '../../generators/site-data/types.ts';
import { modelPath, OVERLAY_FILE, REEXAMINED_FILE, SUMMARY_FILE, supplementPath } from '../../generators/site-data/paths.ts';
import { joinDetector, joinRelease, withSupplement, type JoinedDetector, type JoinParts } from '../../generators/site-data/split.ts';

export const outDir = (): string => resolve(process.env.KILN_OUT ?? '.kiln/out');

const cache = new Map<string, unknown>();
/** Detectors kept joined at once: the pages of one release's detectors are rendered in order. */
const DETECTOR_CACHE = 8;
const detectors = new Map<string, JoinedDetector>();

function readJson<T>(path: string, schema: string | null, keep = true): T {
  const hit = cache.get(path);
  if (hit) return hit as T;
  if (!existsSync(path))
    throw new Error(`site: ${path} not found. Run \`kiln build\` first (or set KILN_OUT to a build output directory).`);
  let v: { schema?: unknown };
  try {
    v = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    throw new Error(`site: ${path} is not valid JSON (${(e as Error).message})`);
  }
  if (schema !== null && v.schema !== schema) throw new Error(`site: ${path}: schema is ${JSON.stringify(v.schema)}, expected "${schema}"`);
  if (keep) cache.set(path, v);
  return v as T;
}

const relDir = (id: string) => join(outDir(), 'releases', id);
const reader = (id: string) => <T,>(p: string): T => readJson<T>(join(relDir(id), p), null, false);

export const loadIndex = (): ReleaseIndex => readJson(join(outDir(), 'index.json'), 'kiln/release-index/1');
export const loadSummary = (id: string): ReleaseSummaryDoc => readJson(join(relDir(id), SUMMARY_FILE), 'kiln/release-summary/1');
export const loadManifest = (id: string): ReleaseManifest => readJson(join(relDir(id), 'manifest.json'), 'kiln/release-manifest/1');
/** An archived release's re-examination with current checks; null for a release built from its inputs. */
export const loadReexamination = (id: string): ReexaminationDoc | null =>
  existsSync(join(relDir(id), REEXAMINED_FILE)) ? readJson(join(relDir(id), REEXAMINED_FILE), 'kiln/reexamination/1') : null;
/** The full report: for whole-release views only (it grows with the number of products). */
/** Every detector's thinned curves for the release page's overlay plots; null for builds made before it existed. */
export const loadOverlay = (id: string): import('../../generators/site-data/types.ts').ReleaseOverlayDoc | null =>
  existsSync(join(relDir(id), OVERLAY_FILE)) ? readJson(join(relDir(id), OVERLAY_FILE), 'kiln/release-overlay/1') : null;

export const loadValidation = (id: string): ValidationReport => readJson(join(relDir(id), 'validation.json'), 'kiln/validation/1');

/** One detector of a release, joined from its documents (model, epochs, profiles, matrix, checks). */
export function loadDetector(id: string, detector: string): JoinedDetector {
  const key = `${id}\u0000${detector}`;
  const hit = detectors.get(key);
  if (hit) return hit;
  const read = reader(id);
  const base = joinDetector(detector, read);
  // An archive's curves computed at this build (supplement.json) beside its published ones.
  const joined = read<DetectorModelDoc>(modelPath(detector)).supplement ? { ...base, site: withSupplement(base.site, read<DetectorSupplementDoc>(supplementPath(detector))) } : base;
  detectors.set(key, joined);
  if (detectors.size > DETECTOR_CACHE) detectors.delete(detectors.keys().next().value!);
  return joined;
}

/** A whole release as one object (pages of few detectors, tests). Not kept. */
export function loadSite(id: string, parts: JoinParts = {}): ReleaseSite {
  return joinRelease(loadSummary(id), reader(id), { ...parts, checks: false }).site;
}

/** Every check of a release from its split documents: release-level first, then per detector. */
export function loadChecks(id: string): Check[] {
  const s = loadSummary(id);
  return [...s.checks, ...s.detectors.flatMap((d) => loadDetector(id, d.id).checks)];
}

/** One split document of a release by its release-relative path (not kept). */
export const loadDoc = <T,>(id: string, path: string): T => reader(id)<T>(path);

/** A release's spectral section (reference sources: predicted rates, impact), when the build wrote one. */
export const loadSpectral = (id: string): ReleaseSpectral | null =>
  existsSync(join(relDir(id), 'spectral.json')) ? readJson(join(relDir(id), 'spectral.json'), 'kiln/release-spectral/1') : null;

/** A release's model document (kiln/model/1), when the build wrote one. */
export const loadModel = (id: string): import('../../generators/model/types.ts').ModelDocument | null =>
  existsSync(join(relDir(id), 'model.json')) ? readJson(join(relDir(id), 'model.json'), 'kiln/model/1') : null;
