/**
 * The content model: zod schemas of instrument.yaml and release.yaml, shared by the build
 * (generators/content/load.ts) and by the site's content collections (src/content.config.ts).
 * Pure: no Node, no Astro. Field-level physics sanity sits on the fields; checks that need two
 * fields sit in superRefine with `params.expected` so that the error translator can say what was
 * expected. Unknown keys are rejected everywhere (.strict()).
 *
 * Dates are ISO calendar dates "YYYY-MM-DD". Our YAML reader keeps them as strings (YAML 1.2
 * core schema); Astro's reader turns unquoted dates into Date objects, so both are accepted and
 * normalised to the string form.
 */
import { z } from 'zod';
import { parseFormula } from '../physics/compound.ts';
import { TABLE_ENERGY_MAX_KEV, TABLE_ENERGY_MIN_KEV } from '../physics/elements.ts';
import type { ContaminationSpec, DetectorStack, LayerSpec } from '../physics/types.ts';
import type { RedistributionSpec } from '../response/model-types.ts';
import { isSemver } from './semver.ts';

// ---------------------------------------------------------------------------------------------
// Names of the content tree (reserved: `archive/` is written by `kiln publish`, never an input).

export const CONTENT_DIRS = { instruments: 'instruments', releases: 'releases', archive: 'archive' } as const;
export const INSTRUMENT_FILE = 'instrument.yaml';
/** Optional, beside instrument.yaml: readout nodes and row bands per detector (see regionsFileSchema). */
export const REGIONS_FILE = 'regions.yaml';
export const DEFAULT_MIRROR_AREA_FILE = 'mirror-area.csv';
export const RELEASE_FILE = 'release.yaml';
export const NOTES_FILE = 'notes.md';
export const LINEFITS_DIR = 'linefits';
export const defaultLineFitsFile = (detectorId: string): string => `${LINEFITS_DIR}/${detectorId}.csv`;

/** Ids that become path components and URL segments: lower-case, no "..", no separators. */
export const SAFE_ID_RE = /^[a-z0-9][a-z0-9._-]*$/;
export const MAX_ID_LENGTH = 64;
const SAFE_ID_EXPECTED = `an id of lower-case letters, digits, ".", "_" or "-", starting with a letter or digit, no "..", at most ${MAX_ID_LENGTH} characters`;

/** FITS header strings (TELESCOP, INSTRUME, DETNAM) must be printable ASCII (FITS 4.0 §4.2.1), ≤ 68 chars. */
const FITS_STRING_RE = /^[\x20-\x7e]{1,68}$/;

/** Upper bounds that only catch typos (a stray digit), not physics. */
const MAX_CHANNELS = 65536;
const MAX_ENERGY_BINS = 100000;
/** |gain error| beyond 50 % is a units slip, not a gain drift. */
const MAX_ABS_GAIN_ERROR = 0.5;

export const PRODUCT_KINDS = ['rmf', 'arf', 'rsp'] as const;
export const RELEASE_STATUSES = ['draft', 'candidate', 'published', 'superseded', 'withdrawn'] as const;

// ---------------------------------------------------------------------------------------------
// Building blocks.

type Ctx = z.RefinementCtx;
function issue(ctx: Ctx, message: string, expected: string, path: (string | number)[] = []): void {
  ctx.addIssue({ code: z.ZodIssueCode.custom, message, path, params: { expected } });
}

export function isSafeId(s: string): boolean {
  return s.length <= MAX_ID_LENGTH && SAFE_ID_RE.test(s) && !s.includes('..');
}

const text = z.string().trim().min(1);
export const safeId = z.string().superRefine((s, ctx) => {
  if (!isSafeId(s)) issue(ctx, 'not a safe id', SAFE_ID_EXPECTED);
});
/**
 * Longest release id: it is written as the FITS string value of KILNREL, at most 68 characters
 * (FITS Standard 4.0 §4.2.1.1), and into product file names.
 */
export const MAX_RELEASE_ID_CHARS = 68;
export const releaseId = z.string().superRefine((s, ctx) => {
  if (s.length > MAX_RELEASE_ID_CHARS)
    issue(ctx, `release id is longer than ${MAX_RELEASE_ID_CHARS} characters (${s.length})`, `at most ${MAX_RELEASE_ID_CHARS} characters: it becomes the FITS keyword value KILNREL and part of every file name`);
  else if (!isSemver(s))
    issue(ctx, 'release id is not a strict semantic version', 'MAJOR.MINOR.PATCH with optional lower-case pre-release, e.g. 1.2.0 or 2.0.0-rc.1 (no "+build")');
});
const fitsString = z.string().superRefine((s, ctx) => {
  if (!FITS_STRING_RE.test(s)) issue(ctx, 'not a FITS header string', '1 to 68 printable ASCII characters');
});

/** A file name relative to the entry's directory, inside it. */
const relativeFile = (extension: string) =>
  z.string().superRefine((s, ctx) => {
    const parts = s.split('/');
    const ok = !s.startsWith('/') && !s.includes('\\') && parts.every((p) => p !== '' && p !== '.' && p !== '..' && /^[A-Za-z0-9._-]+$/.test(p));
    if (!ok || !s.endsWith(extension))
      issue(ctx, 'not a relative file name inside this directory', `a relative path of [A-Za-z0-9._-] segments, no "..", ending in ${extension}`);
  });

const ISO_DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;
export function isIsoDate(s: string): boolean {
  const m = ISO_DATE_RE.exec(s);
  if (!m) return false;
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  return d.toISOString().slice(0, 10) === s;
}
export const isoDate = z.preprocess(
  (v) => (v instanceof Date && !Number.isNaN(v.getTime()) ? v.toISOString().replace(/T00:00:00\.000Z$/, '') : v),
  z.string().superRefine((s, ctx) => {
    if (!isIsoDate(s)) issue(ctx, 'not a calendar date', 'an ISO date YYYY-MM-DD');
  }),
);

const finite = z.number().finite();
const positive = finite.gt(0);
const nonNegative = finite.gte(0);
/** [0, 1): fractions of events. */
const fractionBelowOne = finite.gte(0).lt(1);
const unitInterval = finite.gte(0).lte(1);

// ---------------------------------------------------------------------------------------------
// Detector stack (→ physics DetectorStack).

export const materialSchema = z
  .object({
    formula: z.string().superRefine((f, ctx) => {
      try {
        parseFormula(f);
      } catch (e) {
        issue(ctx, e instanceof Error ? e.message : 'bad chemical formula', 'a chemical formula of elements H..Zn with counts, e.g. C22H10N2O5');
      }
    }),
    densityGcm3: positive,
  })
  .strict();

export const layerSchema = z.object({ name: text, material: materialSchema, thicknessUm: positive }).strict();

export const contaminationLawSchema = z.discriminatedUnion('kind', [
  z
    .object({ kind: z.literal('linear'), referenceDate: isoDate, thicknessAtReferenceUm: nonNegative, rateUmPerYear: finite })
    .strict(),
  z
    .object({ kind: z.literal('exponential'), startDate: isoDate, initialUm: nonNegative, asymptoticUm: nonNegative, timescaleDays: positive })
    .strict(),
]);

export const contaminationSchema = z.object({ name: text, material: materialSchema, law: contaminationLawSchema }).strict();

export const partialLayerSchema = z.object({ thicknessUm: positive, collectionAtSurface: unitInterval }).strict();

export const sensorSchema = z
  .object({ material: materialSchema, depletionUm: positive, partial: partialLayerSchema.nullable().default(null) })
  .strict();

/** The stack as written: layer kinds follow from the list a layer sits in. */
export const stackInputSchema = z
  .object({
    filters: z.array(layerSchema).default([]),
    contamination: contaminationSchema.nullable().default(null),
    surface: z.array(layerSchema).default([]),
    sensor: sensorSchema,
  })
  .strict();
export type StackInput = z.output<typeof stackInputSchema>;

export function stackFromInput(s: StackInput): DetectorStack {
  const tag = (kind: LayerSpec['kind']) => (l: z.output<typeof layerSchema>): LayerSpec => ({ ...l, kind });
  return {
    filters: s.filters.map(tag('filter')),
    contamination: s.contamination as ContaminationSpec | null,
    surface: s.surface.map(tag('surface')),
    sensor: s.sensor,
  };
}

/** Inverse of stackFromInput (for merging overrides on the written form). */
export function stackToInput(s: DetectorStack): StackInput {
  const strip = ({ name, material, thicknessUm }: LayerSpec) => ({ name, material, thicknessUm });
  return { filters: s.filters.map(strip), contamination: s.contamination, surface: s.surface.map(strip), sensor: s.sensor };
}

// ---------------------------------------------------------------------------------------------
// Redistribution (→ RedistributionSpec).

const pixelsPerEventSchema = z.object({ a: finite.gte(1), bPerKeV: nonNegative }).strict();
const fanoSchema = finite.gt(0).lt(1);

export const fwhmSchema = z
  .object({
    source: z.enum(['law', 'line-fits']),
    readNoiseE: nonNegative,
    fano: fanoSchema,
    sigma0Ev: nonNegative,
    pixelsPerEvent: pixelsPerEventSchema,
  })
  .strict();

const lineFitsSource = z.object({ source: z.literal('line-fits') }).strict();
const centroidLaw = z
  .object({
    source: z.literal('law'),
    gainError: finite.gt(-MAX_ABS_GAIN_ERROR).lt(MAX_ABS_GAIN_ERROR),
    offsetEv: finite,
    chargeLossEv: nonNegative,
    chargeLossScaleKeV: positive,
  })
  .strict();
const tailLaw = z.object({ source: z.literal('law'), fractionAtZero: fractionBelowOne, fractionScaleKeV: positive, tailScaleEv: positive }).strict();
const shelfLaw = z.object({ source: z.literal('law'), fraction: fractionBelowOne }).strict();

export const centroidSchema = z.discriminatedUnion('source', [centroidLaw, lineFitsSource]);
/** Partial-charge events from the sensor's partially collecting layer (generators/physics/partial-charge.ts). */
const collectionSource = z.object({ source: z.literal('collection') }).strict();
export const tailSchema = z.discriminatedUnion('source', [tailLaw, lineFitsSource, collectionSource]);
export const shelfSchema = z.discriminatedUnion('source', [shelfLaw, lineFitsSource]);

/**
 * Charge lost in transfer (physics/transfer-loss.ts): f(E) = lossPerTransfer·(E/referenceKeV)^(−energyIndex),
 * stated, or fitted to line fits measured in several row bands (`source: line-fits`; energyIndex
 * fitted too unless given).
 */
/** A per-transfer loss beyond 1e-2 loses a third of the charge in 40 transfers: a units slip, not a detector. */
const MAX_LOSS_PER_TRANSFER = 1e-2;
/** |α| beyond 3 is not a packet-size dependence anyone has measured (common practice, no source). */
const MAX_ABS_ENERGY_INDEX = 3;
const energyIndexSchema = finite.gte(-MAX_ABS_ENERGY_INDEX).lte(MAX_ABS_ENERGY_INDEX);
export const transferLossSchema = z.discriminatedUnion('source', [
  z
    .object({ source: z.literal('law'), lossPerTransfer: finite.gte(0).lt(MAX_LOSS_PER_TRANSFER), energyIndex: energyIndexSchema.default(0), referenceKeV: positive })
    .strict(),
  z.object({ source: z.literal('line-fits'), energyIndex: energyIndexSchema.optional(), referenceKeV: positive }).strict(),
]);
export type TransferLossInput = z.output<typeof transferLossSchema>;

export const redistributionSchema = z
  .object({
    pairEnergyEv: positive,
    thresholdKeV: nonNegative,
    fwhm: fwhmSchema,
    centroid: centroidSchema,
    tail: tailSchema,
    shelf: shelfSchema,
    escape: z.boolean(),
    siFluorescenceFraction: fractionBelowOne.default(0),
    /** 'stack': the Si Kα share from the surface layers (generators/physics/stack-fluorescence.ts). */
    siFluorescenceSource: z.literal('stack').optional(),
    /** Absent: no loss in transfer (every release before regions existed). */
    transferLoss: transferLossSchema.optional(),
  })
  .strict();

/** Does any profile parameter interpolate the line fits? */
export function usesLineFits(r: RedistributionSpec): boolean {
  return [r.fwhm, r.centroid, r.tail, r.shelf].some((p) => p.source === 'line-fits');
}

/** Checks across the fields of one detector's model (stack + redistribution), on the written form. */
export function checkDetectorModel(m: { stack: StackInput; redistribution: z.output<typeof redistributionSchema> }, ctx: Ctx): void {
  const { sensor } = m.stack;
  if (sensor.partial && !(sensor.partial.thicknessUm < sensor.depletionUm))
    issue(ctx, 'partially collecting layer is not thinner than the depletion depth', `< depletionUm = ${sensor.depletionUm}`, ['stack', 'sensor', 'partial', 'thicknessUm']);
  const seen = new Map<string, string>();
  for (const list of ['filters', 'surface'] as const)
    m.stack[list].forEach((l, i) => {
      const prev = seen.get(l.name);
      if (prev) issue(ctx, `layer name "${l.name}" is used twice (also ${prev})`, 'unique layer names (overrides address layers by name)', ['stack', list, i, 'name']);
      seen.set(l.name, `${list}[${i}]`);
    });
  const { tail, shelf } = m.redistribution;
  if (tail.source === 'collection' && !sensor.partial)
    issue(ctx, "tail source 'collection' needs a partially collecting layer", 'stack.sensor.partial: { thicknessUm, collectionAtSurface }', ['redistribution', 'tail', 'source']);
  if (m.redistribution.siFluorescenceSource === 'stack' && m.redistribution.siFluorescenceFraction !== 0)
    issue(ctx, "siFluorescenceFraction must be 0 when siFluorescenceSource is 'stack'", "0 (the stack's layers give the share)", ['redistribution', 'siFluorescenceFraction']);
  if (tail.source === 'law' && shelf.source === 'law' && !(tail.fractionAtZero + shelf.fraction < 1))
    issue(ctx, 'tail and shelf fractions leave no events in the peak', `fractionAtZero + shelf.fraction < 1 (shelf.fraction = ${shelf.fraction})`, ['redistribution', 'tail', 'fractionAtZero']);
}

export const detectorModelSchema = z
  .object({ stack: stackInputSchema, redistribution: redistributionSchema })
  .strict()
  .superRefine(checkDetectorModel);

// ---------------------------------------------------------------------------------------------
// Regions of a detector: readout nodes (named regions with their own noise and gain) and row
// bands (ranges of transfer count: row r of a frame makes r parallel transfers to the register).

/** A readout node: overrides of read noise, gain error and offset, merged as release overrides are. */
export const nodeSchema = z
  .object({
    id: safeId,
    name: text,
    readNoiseE: nonNegative.optional(),
    gainError: finite.gt(-MAX_ABS_GAIN_ERROR).lt(MAX_ABS_GAIN_ERROR).optional(),
    offsetEv: finite.optional(),
  })
  .strict();
export type NodeDoc = z.output<typeof nodeSchema>;

const transferCount = z.number().int().gte(0);
export const rowBandSchema = z.object({ id: safeId, firstTransfer: transferCount, lastTransfer: transferCount }).strict();

/** Upper bound on rows (transfers) of a frame: catches a stray digit. */
const MAX_TRANSFERS = 100000;

export const regionsSchema = z
  .object({
    /** Rows of a frame = the largest transfer count + 1; rows are numbered 0 … transfers − 1 from the register. */
    transfers: z.number().int().gte(1).lte(MAX_TRANSFERS),
    nodes: z.array(nodeSchema).min(1),
    rowBands: z.array(rowBandSchema).min(1),
  })
  .strict()
  .superRefine((g, ctx) => {
    const unique = (list: { id: string }[], what: string) => {
      const seen = new Map<string, number>();
      list.forEach((x, i) => {
        if (seen.has(x.id)) issue(ctx, `${what} id "${x.id}" is used twice (also ${what}s[${seen.get(x.id)}])`, `unique ${what} ids`, [`${what}s`, i, 'id']);
        seen.set(x.id, i);
      });
    };
    unique(g.nodes, 'node');
    unique(g.rowBands, 'rowBand');
    g.rowBands.forEach((b, i) => {
      if (!(b.lastTransfer >= b.firstTransfer)) issue(ctx, 'row band is reversed', `lastTransfer ≥ firstTransfer = ${b.firstTransfer}`, ['rowBands', i, 'lastTransfer']);
      if (!(b.lastTransfer < g.transfers)) issue(ctx, 'row band leaves the detector', `lastTransfer ≤ transfers − 1 = ${g.transfers - 1}`, ['rowBands', i, 'lastTransfer']);
      const prev = g.rowBands[i - 1];
      if (prev && !(b.firstTransfer > prev.lastTransfer))
        issue(ctx, `row band overlaps the previous one (${prev.id}, to ${prev.lastTransfer})`, `bands in row order without overlap: firstTransfer > ${prev.lastTransfer}`, ['rowBands', i, 'firstTransfer']);
    });
  });
export type RegionsDoc = z.output<typeof regionsSchema>;

/**
 * regions.yaml: the regions of each detector, kept beside instrument.yaml so that an instrument
 * whose releases are already published gains regions without touching the file those releases
 * were sealed with. A detector's regions are given here or in instrument.yaml, not both.
 */
export const regionsFileSchema = z.object({ detectors: z.record(safeId, regionsSchema) }).strict();
export type RegionsFileDoc = z.output<typeof regionsFileSchema>;

/** Which products a release builds for each detector: one per detector, per node, or per node × row band. */
export const PRODUCTS_PER = ['detector', 'node', 'node-row'] as const;
export type ProductsPer = (typeof PRODUCTS_PER)[number];

// ---------------------------------------------------------------------------------------------
// Grids.

export const channelGridSchema = z
  .object({
    count: z.number().int().gte(1).lte(MAX_CHANNELS),
    firstChannel: z
      .number()
      .int()
      .superRefine((v, ctx) => {
        if (v !== 0 && v !== 1) issue(ctx, 'first channel must be 0 or 1', '0 or 1 (TLMIN of F_CHAN, OGIP CAL/GEN/92-002)');
      }),
    widthEv: positive,
    originEv: nonNegative,
  })
  .strict();

const energyGridFields = z
  .object({
    minKeV: finite.gte(TABLE_ENERGY_MIN_KEV),
    maxKeV: finite.lte(TABLE_ENERGY_MAX_KEV),
    bins: z.number().int().gte(1).lte(MAX_ENERGY_BINS),
    spacing: z.enum(['linear', 'log']),
  })
  .strict();
export const energyGridSchema = energyGridFields
  .superRefine((g, ctx) => {
    if (!(g.maxKeV > g.minKeV)) issue(ctx, 'energy grid is not increasing', `maxKeV > minKeV = ${g.minKeV}`, ['maxKeV']);
  });

// ---------------------------------------------------------------------------------------------
// spectral.yaml beside instrument.yaml (optional): bands for rates, pile-up inputs, impact
// tolerances of the reference sources. A file of its own, like regions.yaml, so that adding it
// leaves the instrument file that published releases sealed byte for byte as it was.
export const SPECTRAL_FILE = 'spectral.yaml';

export const spectralSchema = z
  .object({
    bands: z.array(z.object({ name: safeId, loKeV: positive, hiKeV: positive }).strict().superRefine((b, ctx) => {
      if (!(b.hiKeV > b.loKeV)) issue(ctx, 'band is empty or reversed', `> loKeV = ${b.loKeV}`, ['hiKeV']);
    })).min(1),
    pileup: z
      .object({
        frameTimeS: positive,
        /** Fraction of a point source's image in its brightest event cell (e.g. 3×3 pixels). */
        brightestCellFraction: finite.gt(0).lte(1),
      })
      .strict(),
    /** Impact of a change of release beyond these is flagged for review. */
    impact: z
      .object({ shiftSigma: positive, rateRatio: positive.lt(1), reason: text })
      .strict(),
  })
  .strict();

export type SpectralDoc = z.output<typeof spectralSchema>;

// ---------------------------------------------------------------------------------------------
// instrument.yaml

export const detectorSchema = z
  .object({
    id: safeId.pipe(fitsString),
    name: text,
    /** e.g. "front-illuminated CCD" */
    kind: text,
    description: text,
    stack: stackInputSchema,
    redistribution: redistributionSchema,
    /** Absent: the detector is one region. */
    regions: regionsSchema.optional(),
  })
  .strict()
  .superRefine(checkDetectorModel);

/**
 * A named configuration of the instrument, e.g. one position of a filter wheel: its filter
 * layers replace every detector's `stack.filters`, and its products state `filter` as their FITS
 * FILTER value. A release builds products for each configuration it lists (default: all).
 */
export const configurationSchema = z
  .object({
    id: safeId,
    /** Shown on the site, e.g. "thin optical blocking filter". */
    title: text.optional(),
    /** FITS FILTER of its products (OGIP CAL/GEN/92-002). */
    filter: fitsString,
    filters: z.array(layerSchema).min(1),
  })
  .strict();
export type ConfigurationDoc = z.output<typeof configurationSchema>;

export const instrumentSchema = z
  .object({
    id: safeId,
    /** FITS TELESCOP */
    telescope: fitsString,
    /** FITS INSTRUME */
    instrument: fitsString,
    title: text,
    description: text,
    /** CSV `energy_keV,area_cm2` beside instrument.yaml. */
    mirrorArea: relativeFile('.csv').default(DEFAULT_MIRROR_AREA_FILE),
    channels: channelGridSchema,
    energyGrid: energyGridSchema,
    detectors: z.array(detectorSchema).min(1),
    /** Absent: one configuration, the detectors' own filters (FILTER their layer names). */
    configurations: z.array(configurationSchema).min(1).optional(),
  })
  .strict()
  .superRefine((ins, ctx) => {
    const confs = new Map<string, number>();
    (ins.configurations ?? []).forEach((c, i) => {
      if (confs.has(c.id)) issue(ctx, `configuration id "${c.id}" is used twice (also configurations[${confs.get(c.id)}])`, 'unique configuration ids', ['configurations', i, 'id']);
      confs.set(c.id, i);
    });
    const ids = new Map<string, number>();
    ins.detectors.forEach((d, i) => {
      if (ids.has(d.id)) issue(ctx, `detector id "${d.id}" is used twice (also detectors[${ids.get(d.id)}])`, 'unique detector ids', ['detectors', i, 'id']);
      ids.set(d.id, i);
      if (!(d.redistribution.thresholdKeV < ins.energyGrid.maxKeV))
        issue(ctx, 'threshold above the energy grid', `< energyGrid.maxKeV = ${ins.energyGrid.maxKeV}`, ['detectors', i, 'redistribution', 'thresholdKeV']);
    });
  });

export type InstrumentDoc = z.output<typeof instrumentSchema>;
export type DetectorDoc = z.output<typeof detectorSchema>;

// ---------------------------------------------------------------------------------------------
// release.yaml: overrides of the instrument's model, per detector.

const materialOverride = materialSchema.partial().strict();
const layerOverride = z.object({ name: text, material: materialOverride.optional(), thicknessUm: positive.optional() }).strict();
export const stackOverrideSchema = z
  .object({
    filters: z.array(layerOverride).optional(),
    contamination: z
      .object({ name: text.optional(), material: materialOverride.optional(), law: contaminationLawSchema.optional() })
      .strict()
      .nullable()
      .optional(),
    surface: z.array(layerOverride).optional(),
    sensor: z
      .object({
        material: materialOverride.optional(),
        depletionUm: positive.optional(),
        partial: partialLayerSchema.partial().strict().nullable().optional(),
      })
      .strict()
      .optional(),
  })
  .strict();

const sourceEnum = z.enum(['law', 'line-fits']);
export const redistributionOverrideSchema = z
  .object({
    pairEnergyEv: positive.optional(),
    thresholdKeV: nonNegative.optional(),
    fwhm: fwhmSchema.partial().strict().extend({ pixelsPerEvent: pixelsPerEventSchema.partial().strict().optional() }).optional(),
    centroid: z
      .object({
        source: sourceEnum.optional(),
        gainError: finite.gt(-MAX_ABS_GAIN_ERROR).lt(MAX_ABS_GAIN_ERROR).optional(),
        offsetEv: finite.optional(),
        chargeLossEv: nonNegative.optional(),
        chargeLossScaleKeV: positive.optional(),
      })
      .strict()
      .optional(),
    tail: z
      .object({ source: z.enum(['law', 'line-fits', 'collection']).optional(), fractionAtZero: fractionBelowOne.optional(), fractionScaleKeV: positive.optional(), tailScaleEv: positive.optional() })
      .strict()
      .optional(),
    shelf: z.object({ source: sourceEnum.optional(), fraction: fractionBelowOne.optional() }).strict().optional(),
    escape: z.boolean().optional(),
    siFluorescenceFraction: fractionBelowOne.optional(),
    siFluorescenceSource: z.literal('stack').optional(),
    transferLoss: z
      .object({
        source: sourceEnum.optional(),
        lossPerTransfer: finite.gte(0).lt(MAX_LOSS_PER_TRANSFER).optional(),
        energyIndex: energyIndexSchema.optional(),
        referenceKeV: positive.optional(),
      })
      .strict()
      .optional(),
  })
  .strict();

export const modelOverrideSchema = z
  .object({ stack: stackOverrideSchema.optional(), redistribution: redistributionOverrideSchema.optional() })
  .strict();
export type ModelOverride = z.output<typeof modelOverrideSchema>;

export const epochSchema = z
  .object({
    id: safeId,
    /** Reference date: contamination and other time-dependent laws are evaluated here. */
    date: isoDate,
    validFrom: isoDate,
    validTo: isoDate.nullable(),
    description: text.optional(),
  })
  .strict();
export type Epoch = z.output<typeof epochSchema>;

export const releaseDetectorSchema = z
  .object({
    /** Epochs to build for this detector; all of the release's epochs when absent. */
    epochs: z.array(safeId).min(1).optional(),
    /** Line-fit CSV relative to the release directory; default linefits/<detector>.csv. */
    lineFits: relativeFile('.csv').optional(),
    model: modelOverrideSchema.default({}),
  })
  .strict();

/** A tolerance a release states for itself, with the reason (shown beside the check). */
const stated = <T extends z.ZodTypeAny>(value: T) => z.object({ value, reason: text }).strict();
/**
 * Checks a release tunes for itself (README, "Tolerances a release states"): the closure
 * false-alarm probability, the epoch transmission tolerance, the extrapolation margin, and reasons
 * that accept an extrapolated parameter of a detector.
 */
export const releaseChecksSchema = z
  .object({
    closureFalseAlarm: stated(finite.gt(0).lt(0.5)).optional(),
    epochTransmissionChange: stated(finite.gt(0).lt(1)).optional(),
    extrapolationFactor: stated(finite.gt(1)).optional(),
    extrapolation: z.array(z.object({ detector: safeId, parameter: z.enum(['fwhm', 'centroid', 'tail', 'shelf', 'all']), reason: text }).strict()).optional(),
  })
  .strict();
export type ReleaseChecksDoc = z.output<typeof releaseChecksSchema>;
/**
 * Instrument-level inputs a release restates (`overrides:` in release.yaml), so that a correction
 * of anything — mirror table, grids, the base model of every detector — is a new release. Same
 * merge rules as the per-detector `model`; the release's own `detectors.<id>.model` applies last.
 */
export const releaseOverridesSchema = z
  .object({
    /** Mirror table (`energy_keV,area_cm2`) relative to the release directory, replacing the instrument's. */
    mirrorArea: relativeFile('.csv').optional(),
    channels: channelGridSchema.partial().strict().optional(),
    energyGrid: energyGridFields.partial().strict().optional(),
    /** Applied to every detector of the release before its own override. */
    model: modelOverrideSchema.optional(),
  })
  .strict();
export type ReleaseOverrides = z.output<typeof releaseOverridesSchema>;

/** A review item signed off: the check id and product it is about, why, and who (by role). */
export const acceptedItemSchema = z
  .object({
    /** Check id as in the validation report, e.g. review.rmf.fwhm. */
    check: text,
    /** Product id as in the validation report (e.g. fi0-rmf), or null for a release-level check. */
    product: text.nullable(),
    reason: text,
    role: text,
  })
  .strict();
export type AcceptedItem = z.output<typeof acceptedItemSchema>;

export const releaseSchema = z
  .object({
    id: releaseId,
    instrument: safeId,
    title: text,
    date: isoDate,
    status: z.enum(RELEASE_STATUSES),
    supersedes: releaseId.nullable().default(null),
    validFrom: isoDate,
    validTo: isoDate.nullable(),
    products: z.array(z.enum(PRODUCT_KINDS)).min(1).default(['rmf', 'arf']),
    /** Products per detector (as before regions existed), per readout node, or per node × row band. */
    productsPer: z.enum(PRODUCTS_PER).default('detector'),
    epochs: z.array(epochSchema).min(1),
    overrides: releaseOverridesSchema.default({}),
    /** Review items accepted for this release (shown as accepted; `kiln publish` requires all). */
    accepted: z.array(acceptedItemSchema).default([]),
    detectors: z.record(safeId, releaseDetectorSchema),
    /** Configurations of the instrument to build (ids of its `configurations`); default all of them. */
    configurations: z.array(safeId).min(1).optional(),
    checks: releaseChecksSchema.optional(),
  })
  .strict()
  .superRefine((r, ctx) => {
    if (r.supersedes === r.id) issue(ctx, 'a release cannot supersede itself', 'an earlier release id or null', ['supersedes']);
    if (r.validTo !== null && !(r.validTo > r.validFrom)) issue(ctx, 'validity interval is empty or reversed', `a date after validFrom = ${r.validFrom}, or null`, ['validTo']);
    if (new Set(r.products).size !== r.products.length) issue(ctx, 'a product kind is listed twice', `each of ${PRODUCT_KINDS.join(', ')} at most once`, ['products']);
    if (Object.keys(r.detectors).length === 0) issue(ctx, 'no detector to build', 'at least one detector id of the instrument', ['detectors']);
    const ids = new Map<string, number>();
    r.epochs.forEach((e, i) => {
      const at = (f: string) => ['epochs', i, f];
      if (ids.has(e.id)) issue(ctx, `epoch id "${e.id}" is used twice (also epochs[${ids.get(e.id)}])`, 'unique epoch ids', at('id'));
      ids.set(e.id, i);
      if (e.validTo !== null && !(e.validTo > e.validFrom)) issue(ctx, 'epoch validity interval is empty or reversed', `a date after validFrom = ${e.validFrom}, or null`, at('validTo'));
      if (e.validFrom < r.validFrom) issue(ctx, 'epoch starts before the release is valid', `≥ release validFrom = ${r.validFrom}`, at('validFrom'));
      if (r.validTo !== null && (e.validTo === null || e.validTo > r.validTo))
        issue(ctx, 'epoch ends after the release validity', `≤ release validTo = ${r.validTo}`, at('validTo'));
      if (e.date < e.validFrom || (e.validTo !== null && !(e.date < e.validTo)))
        issue(ctx, 'epoch reference date outside its validity interval', `in [${e.validFrom}, ${e.validTo ?? 'open'})`, at('date'));
      const prev = r.epochs[i - 1];
      if (prev && (prev.validTo === null || prev.validTo > e.validFrom))
        issue(ctx, `epoch overlaps the previous one (${prev.id}, valid to ${prev.validTo ?? 'open'})`, `epochs in time order without overlap: validFrom ≥ ${prev.validTo ?? 'a closed previous epoch'}`, at('validFrom'));
    });
    (r.checks?.extrapolation ?? []).forEach((x, i) => {
      if (!(x.detector in r.detectors)) issue(ctx, `unknown detector "${x.detector}"`, `one of ${Object.keys(r.detectors).join(', ')}`, ['checks', 'extrapolation', i, 'detector']);
    });
    for (const [det, d] of Object.entries(r.detectors))
      (d.epochs ?? []).forEach((e, j) => {
        if (!ids.has(e)) issue(ctx, `unknown epoch "${e}"`, `one of ${[...ids.keys()].join(', ')}`, ['detectors', det, 'epochs', j]);
      });
  });

export type ReleaseDoc = z.output<typeof releaseSchema>;
export type ReleaseDetectorDoc = z.output<typeof releaseDetectorSchema>;
