/**
 * A release's effective inputs per detector: the instrument's model with the release's overrides
 * merged in, validated again as a whole, and the line fits checked against it. Pure.
 *
 * Merge rules (release.yaml `detectors.<id>.model`):
 * - objects merge field by field; a field absent from the override keeps the instrument's value;
 * - `null` clears a nullable part (contamination, sensor.partial);
 * - an override whose `source` (law | line-fits) or `kind` (contamination law) differs from the
 *   instrument's replaces that part whole, and must then be complete;
 * - layers (stack.filters, stack.surface) are addressed by name; layers cannot be added or removed.
 * The release-wide `overrides.model` is merged first, then `detectors.<id>.model`.
 * An error in the merged model names release.yaml when the offending value came from an
 * override, instrument.yaml otherwise.
 */
import { KilnInputError } from '../errors.ts';
import { fanoLimitFwhmEv } from '../physics/resolution.ts';
import type { RedistributionSpec } from '../response/model-types.ts';
import { formatPath, issueToError } from './issues.ts';
import {
  defaultLineFitsFile,
  detectorModelSchema,
  stackFromInput,
  usesLineFits,
  type DetectorDoc,
  type Epoch,
  type InstrumentDoc,
  type ModelOverride,
  type ReleaseDoc,
} from './schema.ts';
import type { LineFitTable } from './tables.ts';
import type { ResolvedDetector, ResolvedRegions } from './types.ts';
import { fitTransferLoss } from '../fit/transfer-loss.ts';
import { meanTransfers } from '../physics/transfer-loss.ts';
import type { LineFit } from '../response/model-types.ts';
import type { FieldPath, Position } from './yaml.ts';

/** Where a document came from, to point errors at it. */
export interface DocSource {
  file: string;
  locate?: (path: FieldPath) => Position | undefined;
}

const keyOf = (p: FieldPath) => JSON.stringify(p);
const DISCRIMINATORS = ['source', 'kind'];

type Json = Record<string, unknown>;
const isObject = (v: unknown): v is Json => v !== null && typeof v === 'object' && !Array.isArray(v);

export interface MergeResult {
  merged: unknown;
  /** Merged-model path → override path, for every value taken from the override. */
  provenance: Map<string, FieldPath>;
}

/** Merges a release's model override into the instrument's (written-form) model. */
export function mergeModel(base: unknown, override: ModelOverride, release: DocSource, overridePrefix: FieldPath): MergeResult {
  const provenance = new Map<string, FieldPath>();
  const walk = (b: unknown, o: unknown, mp: FieldPath, op: FieldPath): unknown => {
    if (o === undefined) return b;
    const take = () => {
      provenance.set(keyOf(mp), op);
      return o;
    };
    if (Array.isArray(o) && Array.isArray(b)) {
      const out = [...b];
      o.forEach((item, j) => {
        const name = isObject(item) ? item.name : undefined;
        const k = b.findIndex((l) => isObject(l) && l.name === name);
        if (k < 0) {
          const path = [...overridePrefix, ...op, j, 'name'];
          throw new KilnInputError(`no layer named "${String(name)}" in the instrument's ${String(mp[mp.length - 1])}`, {
            file: release.file,
            line: release.locate?.(path)?.line,
            field: formatPath(path),
            value: name,
            expected: b.length ? `one of ${b.map((l) => JSON.stringify((l as Json).name)).join(', ')} (overrides cannot add layers)` : 'no layers: this list is empty in the instrument',
          });
        }
        out[k] = walk(b[k], item, [...mp, k], [...op, j]);
      });
      return out;
    }
    if (!isObject(o) || !isObject(b)) return take();
    if (DISCRIMINATORS.some((d) => d in o && o[d] !== b[d])) return take();
    const out: Json = { ...b };
    for (const [k, v] of Object.entries(o)) out[k] = walk(b[k], v, [...mp, k], [...op, k]);
    return out;
  };
  return { merged: walk(base, override, [], []), provenance };
}

/** The override path that supplied `path` of the merged model, if any. */
function fromOverride(path: FieldPath, provenance: Map<string, FieldPath>): FieldPath | null {
  for (let i = path.length; i >= 0; i--) {
    const hit = provenance.get(keyOf(path.slice(0, i)));
    if (hit) return [...hit, ...path.slice(i)];
  }
  return null;
}

export interface ResolveDetectorInput {
  instrument: InstrumentDoc;
  instrumentSource: DocSource;
  release: ReleaseDoc;
  releaseSource: DocSource;
  detectorId: string;
  lineFits: LineFitTable;
  /** Content-root-relative path of the line-fit file (for ResolvedDetector.lineFitsFile). */
  lineFitsPath: string;
  /** regions.yaml, when the instrument's regions come from it (errors about nodes name it). */
  regionsSource?: DocSource;
}

export function resolveDetector(x: ResolveDetectorInput): ResolvedDetector {
  const { instrument, release, detectorId } = x;
  const releasePrefix: FieldPath = ['detectors', detectorId];
  const index = instrument.detectors.findIndex((d) => d.id === detectorId);
  if (index < 0) {
    throw new KilnInputError(`unknown detector "${detectorId}"`, {
      file: x.releaseSource.file,
      line: x.releaseSource.locate?.(releasePrefix)?.line,
      field: formatPath(releasePrefix),
      value: detectorId,
      expected: `a detector of instrument ${instrument.id}: ${instrument.detectors.map((d) => d.id).join(', ')}`,
    });
  }
  const det: DetectorDoc = instrument.detectors[index];
  const rd = release.detectors[detectorId];
  const overridePrefix = [...releasePrefix, 'model'];
  const base = { stack: det.stack, redistribution: det.redistribution };
  // The release's model for every detector first, then this detector's own; the later one wins.
  const sharedPrefix: FieldPath = ['overrides', 'model'];
  const shared = mergeModel(base, release.overrides.model ?? {}, x.releaseSource, sharedPrefix);
  const { merged, provenance } = mergeModel(shared.merged, rd.model, x.releaseSource, overridePrefix);

  const parsed = detectorModelSchema.safeParse(merged);
  if (!parsed.success) {
    const iss = parsed.error.issues[0];
    const lookup = iss.code === 'unrecognized_keys' ? [...iss.path, iss.keys[0]] : iss.path;
    const own = fromOverride(lookup, provenance);
    const fromShared = own ? null : fromOverride(lookup, shared.provenance);
    let err = issueToError(iss, { file: x.instrumentSource.file, raw: merged, locate: x.instrumentSource.locate, schema: detectorModelSchema }, ['detectors', index]);
    const op = own ? [...overridePrefix, ...own] : fromShared ? [...sharedPrefix, ...fromShared] : null;
    if (op) err = new KilnInputError(err.message, { ...err.where, file: x.releaseSource.file, line: x.releaseSource.locate?.(op)?.line, field: formatPath(op) });
    throw new KilnInputError(`${err.message} (after applying release ${release.id}'s model to detector ${detectorId})`, err.where);
  }
  if (!(parsed.data.redistribution.thresholdKeV < instrument.energyGrid.maxKeV))
    throw new KilnInputError(`threshold of detector ${detectorId} lies above the energy grid of release ${release.id}`, {
      file: x.releaseSource.file,
      value: parsed.data.redistribution.thresholdKeV,
      expected: `< energyGrid.maxKeV = ${instrument.energyGrid.maxKeV}`,
    });
  const wholeFits: LineFitTable = regionless(x.lineFits);
  checkLineFits(wholeFits, parsed.data.redistribution as RedistributionSpec, instrument, detectorId);
  const bandFits = x.lineFits.fits.filter((f) => f.region !== undefined);
  checkBandFits(x.lineFits, det, detectorId);
  const redistribution = resolveTransferLoss(parsed.data.redistribution as RedistributionSpec, det, bandFits, x, index);
  if (release.productsPer !== 'detector' && !det.regions)
    throw new KilnInputError(`detector ${detectorId} has no regions to build per-${release.productsPer} products for`, {
      file: x.releaseSource.file,
      line: x.releaseSource.locate?.(['productsPer'])?.line,
      field: 'productsPer',
      value: release.productsPer,
      expected: `detector (or define regions for ${detectorId} in ${x.instrumentSource.file})`,
    });
  const regions = det.regions ? resolveRegions(det, merged, redistribution, x, index) : undefined;

  const wanted = rd.epochs ? new Set(rd.epochs) : null;
  const epochs: Epoch[] = release.epochs.filter((e) => !wanted || wanted.has(e.id));
  return {
    id: det.id,
    name: det.name,
    kind: det.kind,
    description: det.description,
    stack: stackFromInput(parsed.data.stack),
    redistribution,
    lineFits: wholeFits.fits,
    lineFitsFile: x.lineFitsPath,
    epochs,
    // Present only when defined, so detectors without regions fingerprint as before.
    ...(bandFits.length ? { bandLineFits: bandFits } : {}),
    ...(regions ? { regions } : {}),
  };
}

/** The table without the rows measured in a row band (those feed the transfer-loss fit). */
function regionless(t: LineFitTable): LineFitTable {
  const keep = t.fits.map((f) => f.region === undefined);
  return { file: t.file, fits: t.fits.filter((_f, i) => keep[i]), lines: t.lines.filter((_l, i) => keep[i]) };
}

function checkBandFits(t: LineFitTable, det: DetectorDoc, detectorId: string): void {
  t.fits.forEach((f, i) => {
    if (f.region === undefined) return;
    const bands = det.regions?.rowBands.map((b) => b.id) ?? [];
    if (!bands.includes(f.region))
      throw new KilnInputError(`line ${f.line} names an unknown row band`, {
        file: t.file,
        line: t.lines[i],
        field: 'region',
        value: f.region,
        expected: bands.length ? `empty (whole detector) or a row band of ${detectorId}: ${bands.join(', ')}` : `empty: detector ${detectorId} defines no row bands`,
      });
  });
}

/** A fitted transfer-loss law replaces `source: line-fits` (the model document holds the numbers used). */
function resolveTransferLoss(spec: RedistributionSpec, det: DetectorDoc, bandFits: LineFit[], x: ResolveDetectorInput, index: number): RedistributionSpec {
  const t = spec.transferLoss;
  if (!t) return spec;
  if (!det.regions)
    throw new KilnInputError(`detector ${det.id} has a transfer-loss law but no regions`, {
      file: x.instrumentSource.file,
      line: x.instrumentSource.locate?.(['detectors', index, 'redistribution', 'transferLoss'])?.line,
      field: formatPath(['detectors', index, 'regions']),
      expected: 'regions with transfers, nodes and rowBands (the law needs the transfer counts)',
    });
  if (t.source === 'law') return spec;
  const bands = new Map(det.regions.rowBands.map((b) => [b.id, b]));
  const fit = fitTransferLoss(
    bandFits.map((f) => ({ fit: f, meanTransfers: meanTransfers(bands.get(f.region!)!) })),
    { referenceKeV: t.referenceKeV, energyIndex: t.energyIndex, file: x.lineFits.file },
  );
  return { ...spec, transferLoss: { source: 'law', lossPerTransfer: fit.lossPerTransfer, energyIndex: fit.energyIndex, referenceKeV: fit.referenceKeV } };
}

/** Each node's model: the detector's with the node's read noise, gain error and offset merged in (release override rules). */
function resolveRegions(det: DetectorDoc, mergedModel: unknown, spec: RedistributionSpec, x: ResolveDetectorInput, index: number): ResolvedRegions {
  const g = det.regions!;
  const nodes = g.nodes.map((n, k) => {
    const fwhm = n.readNoiseE !== undefined ? { readNoiseE: n.readNoiseE } : undefined;
    const centroid = n.gainError !== undefined || n.offsetEv !== undefined ? { gainError: n.gainError, offsetEv: n.offsetEv } : undefined;
    const src = x.regionsSource ?? x.instrumentSource;
    const prefix: FieldPath = x.regionsSource ? ['detectors', det.id, 'nodes', k] : ['detectors', index, 'regions', 'nodes', k];
    const { merged } = mergeModel(mergedModel, { redistribution: JSON.parse(JSON.stringify({ fwhm, centroid })) }, src, prefix);
    const parsed = detectorModelSchema.safeParse(merged);
    if (!parsed.success) {
      const iss = parsed.error.issues[0];
      throw new KilnInputError(`node ${n.id} of detector ${det.id}: ${iss.message}`, {
        file: src.file,
        line: src.locate?.(prefix)?.line,
        field: formatPath(prefix),
        value: n.id,
        expected: iss.code === 'unrecognized_keys' ? `no ${iss.keys.join(', ')} override: the detector's centroid comes from line fits` : 'overrides that keep the model valid',
      });
    }
    const r = parsed.data.redistribution as RedistributionSpec;
    return { id: n.id, name: n.name, redistribution: { ...r, transferLoss: spec.transferLoss } };
  });
  return { transfers: g.transfers, nodes, rowBands: g.rowBands.map((b) => ({ ...b })) };
}

/** The line-fit file a release names for a detector (relative to the release directory). */
export function lineFitsFileOf(release: ReleaseDoc, detectorId: string): string {
  return release.detectors[detectorId]?.lineFits ?? defaultLineFitsFile(detectorId);
}

/** Minimum distinct line energies for interpolating a parameter. */
const MIN_LINES_FOR_INTERPOLATION = 2;

function checkLineFits(t: LineFitTable, r: RedistributionSpec, ins: InstrumentDoc, detectorId: string): void {
  const g = ins.energyGrid;
  t.fits.forEach((f, i) => {
    const where = { file: t.file, line: t.lines[i] };
    if (f.energyKeV < g.minKeV || f.energyKeV > g.maxKeV)
      throw new KilnInputError(`line ${f.line} lies outside the response energy grid`, { ...where, field: 'energy_keV', value: f.energyKeV, expected: `in [${g.minKeV}, ${g.maxKeV}] keV` });
    const limit = fanoLimitFwhmEv(f.energyKeV, r.pairEnergyEv, r.fwhm.fano);
    if (!(f.fwhmEv >= limit))
      throw new KilnInputError(`line ${f.line} is narrower than the Fano limit of detector ${detectorId}`, {
        ...where,
        field: 'fwhm_eV',
        value: f.fwhmEv,
        expected: `≥ ${limit.toFixed(1)} eV (2.3548·√(F·w·E) with F = ${r.fwhm.fano}, w = ${r.pairEnergyEv} eV)`,
      });
  });
  if (usesLineFits(r)) {
    const distinct = new Set(t.fits.map((f) => f.energyKeV)).size;
    if (distinct < MIN_LINES_FOR_INTERPOLATION) {
      const params = (['fwhm', 'centroid', 'tail', 'shelf'] as const).filter((k) => r[k].source === 'line-fits');
      throw new KilnInputError(`too few lines to interpolate ${params.join(', ')} of detector ${detectorId}`, {
        file: t.file,
        value: distinct,
        expected: `at least ${MIN_LINES_FOR_INTERPOLATION} lines at distinct energies`,
      });
    }
  }
}
