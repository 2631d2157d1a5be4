/**
 * Reference sources (content/instruments/<id>/sources/*.yaml): a list of spectral components
 * times absorption in a cold-gas column, for `kiln fold|simulate|fit` and the build's impact
 * section. Units are in every field name. Pure: zod and the spectral engine's types only.
 */
import { z } from 'zod';
import { KilnInputError } from '../errors.ts';
import { ABUNDANCE_TABLES } from '../spectrum/data/abundances.ts';
import { powerLawPhotonFlux, type Component } from '../spectrum/components.ts';
import { MAX_COLUMN_CM2, MAX_KT_KEV, MAX_LINE_SIGMA_KEV, MAX_PHOTON_INDEX, MIN_KT_KEV, MIN_PHOTON_INDEX, modelParameters, type SourceModel } from '../spectrum/model.ts';
import type { Band } from '../spectrum/fold.ts';
import { parseWith } from './issues.ts';
import { safeId } from './schema.ts';
import { parseYaml, type YamlText } from './yaml.ts';

export const SOURCES_DIR = 'sources';
export const SOURCE_SCHEMA = 'kiln/source/1';
/** An exposure beyond ten years is a units slip (common practice, no source). */
const MAX_EXPOSURE_S = 3.2e8;

const finite = z.number().finite();
const positive = finite.gt(0);
const nonNegative = finite.gte(0);
const text = z.string().trim().min(1);

const kT = finite.gte(MIN_KT_KEV).lte(MAX_KT_KEV);
const bandKeV = z
  .tuple([positive, positive])
  .superRefine((b, ctx) => {
    if (!(b[1] > b[0])) ctx.addIssue({ code: z.ZodIssueCode.custom, message: 'band is empty or reversed', params: { expected: '[loKeV, hiKeV] with hiKeV > loKeV' } });
  });

const powerLaw = z
  .object({
    kind: z.literal('power-law'),
    name: safeId,
    photonIndex: finite.gte(MIN_PHOTON_INDEX).lte(MAX_PHOTON_INDEX),
    normAt1KeV: nonNegative.optional(),
    photonFluxCm2s: nonNegative.optional(),
    fluxBandKeV: bandKeV.optional(),
  })
  .strict();

const component = z.discriminatedUnion('kind', [
  powerLaw,
  z.object({ kind: z.literal('blackbody'), name: safeId, kTKeV: kT, photonFluxCm2s: nonNegative }).strict(),
  z.object({ kind: z.literal('bremsstrahlung'), name: safeId, kTKeV: kT, normAt1KeV: nonNegative }).strict(),
  z.object({ kind: z.literal('gaussian-line'), name: safeId, energyKeV: positive, sigmaKeV: nonNegative.lte(MAX_LINE_SIGMA_KEV), photonFluxCm2s: nonNegative }).strict(),
]);

export const sourceSchema = z
  .object({
    schema: z.literal(SOURCE_SCHEMA).default(SOURCE_SCHEMA),
    id: safeId,
    title: text,
    description: text,
    /** Exposure of the reference observation, s. */
    exposureS: positive.lte(MAX_EXPOSURE_S),
    /** Seed of the simulated spectra of this source. */
    seed: z.number().int().gte(0).lte(0xffffffff).default(1),
    absorption: z
      .object({
        columnCm2: nonNegative.lte(MAX_COLUMN_CM2),
        abundances: z.enum(ABUNDANCE_TABLES.map((t) => t.name) as [string, ...string[]]).default(ABUNDANCE_TABLES[0].name),
      })
      .strict()
      .default({ columnCm2: 0 }),
    components: z.array(component).min(1),
    /** Parameters a fit frees (the others stay at the stated values), with optional tighter bounds. */
    fit: z
      .object({ free: z.array(z.string()).min(1), bounds: z.record(z.string(), z.tuple([finite, finite])).default({}) })
      .strict(),
  })
  .strict()
  .superRefine((s, ctx) => {
    const names = new Map<string, number>();
    s.components.forEach((c, i) => {
      if (c.kind === 'power-law') {
        const byNorm = c.normAt1KeV !== undefined;
        const byFlux = c.photonFluxCm2s !== undefined && c.fluxBandKeV !== undefined;
        if (byNorm === byFlux || (!byFlux && (c.photonFluxCm2s !== undefined || c.fluxBandKeV !== undefined)))
          ctx.addIssue({ code: z.ZodIssueCode.custom, message: 'give either normAt1KeV or photonFluxCm2s with fluxBandKeV', path: ['components', i, 'normAt1KeV'], params: { expected: 'normAt1KeV (photons/cm²/s/keV at 1 keV), or photonFluxCm2s and fluxBandKeV: [lo, hi]' } });
      }
      if (names.has(c.name)) ctx.addIssue({ code: z.ZodIssueCode.custom, message: `component name "${c.name}" is used twice (also components[${names.get(c.name)}])`, path: ['components', i, 'name'], params: { expected: 'unique component names (parameters are named <component>.<field>)' } });
      names.set(c.name, i);
    });
  });

export type SourceDoc = z.output<typeof sourceSchema>;

export interface SourceSpec {
  doc: SourceDoc;
  file: string;
  model: SourceModel;
  free: string[];
  bounds: Record<string, [number, number]>;
}

function toComponent(c: SourceDoc['components'][number]): Component {
  if (c.kind === 'power-law') {
    const norm = c.normAt1KeV ?? c.photonFluxCm2s! / powerLawPhotonFlux(c.photonIndex, 1, c.fluxBandKeV![0], c.fluxBandKeV![1]);
    return { kind: 'power-law', name: c.name, photonIndex: c.photonIndex, normAt1KeV: norm };
  }
  return { ...c };
}

/** The model of a validated source document; free and bound names are checked against it. */
export function sourceSpecOf(doc: SourceDoc, file: string, yaml?: YamlText): SourceSpec {
  const table = ABUNDANCE_TABLES.find((t) => t.name === doc.absorption.abundances)!;
  const model: SourceModel = { columnCm2: doc.absorption.columnCm2, abundances: table, components: doc.components.map(toComponent) };
  const params = modelParameters(model);
  const names = params.map((p) => p.name);
  const where = (path: (string | number)[], value: unknown, expected: string) => ({ file, line: yaml?.locate(path)?.line, field: path.map((x) => (typeof x === 'number' ? `[${x}]` : x)).join('.').replace(/\.\[/g, '['), value, expected });
  doc.fit.free.forEach((f, i) => {
    if (!names.includes(f)) throw new KilnInputError('unknown parameter', where(['fit', 'free', i], f, `one of ${names.join(', ')}`));
  });
  for (const [name, [lo, hi]] of Object.entries(doc.fit.bounds)) {
    const p = params.find((x) => x.name === name);
    if (!p) throw new KilnInputError('unknown parameter', where(['fit', 'bounds', name], name, `one of ${names.join(', ')}`));
    if (!(hi > lo) || !(p.value >= lo && p.value <= hi)) throw new KilnInputError('bounds are reversed or exclude the stated value', where(['fit', 'bounds', name], [lo, hi], `[lo, hi] with lo ≤ ${p.value} ≤ hi`));
  }
  return { doc, file, model, free: [...doc.fit.free], bounds: Object.fromEntries(Object.entries(doc.fit.bounds).map(([k, v]) => [k, [v[0], v[1]]])) };
}

export function parseSourceText(text: string, file: string): SourceSpec {
  const yaml = parseYaml(text, file);
  const doc = parseWith(sourceSchema, yaml.value, { file, locate: yaml.locate });
  return sourceSpecOf(doc, file, yaml);
}

/** Lines must fall inside the response's energy range (outside it the fold would lose them silently). */
export function checkSourceInRange(s: SourceSpec, energyMinKeV: number, energyMaxKeV: number): void {
  s.doc.components.forEach((c, i) => {
    if (c.kind === 'gaussian-line' && !(c.energyKeV >= energyMinKeV && c.energyKeV <= energyMaxKeV))
      throw new KilnInputError('line outside the response energy range', { file: s.file, field: `components[${i}].energyKeV`, value: c.energyKeV, expected: `${+energyMinKeV.toPrecision(6)}–${+energyMaxKeV.toPrecision(6)} keV (ENERG_LO..ENERG_HI of the RMF)` });
  });
}

export type { Band };
