/** instrument.yaml and release.yaml from text: YAML with positions → schema → KilnInputError. Pure. */
import { KilnInputError } from '../errors.ts';
import { parseWith } from './issues.ts';
import { instrumentSchema, regionsFileSchema, releaseSchema, spectralSchema, type InstrumentDoc, type RegionsFileDoc, type ReleaseDoc, type SpectralDoc } from './schema.ts';
import type { MirrorArea } from './tables.ts';
import { parseYaml, type YamlText } from './yaml.ts';

export interface Parsed<T> {
  doc: T;
  yaml: YamlText;
}

export function parseInstrumentText(text: string, file: string): Parsed<InstrumentDoc> {
  const yaml = parseYaml(text, file);
  return { doc: parseWith(instrumentSchema, yaml.value, { file, locate: yaml.locate }), yaml };
}

export function parseReleaseText(text: string, file: string): Parsed<ReleaseDoc> {
  const yaml = parseYaml(text, file);
  return { doc: parseWith(releaseSchema, yaml.value, { file, locate: yaml.locate }), yaml };
}

export function parseSpectralText(text: string, file: string): Parsed<SpectralDoc> {
  const yaml = parseYaml(text, file);
  return { doc: parseWith(spectralSchema, yaml.value, { file, locate: yaml.locate }), yaml };
}

export function parseRegionsText(text: string, file: string): Parsed<RegionsFileDoc> {
  const yaml = parseYaml(text, file);
  return { doc: parseWith(regionsFileSchema, yaml.value, { file, locate: yaml.locate }), yaml };
}

/** The mirror table must span the response energy grid: Kiln interpolates, never extrapolates. */
export function checkMirrorCoversGrid(m: MirrorArea, ins: InstrumentDoc): void {
  const lo = m.energyKeV[0];
  const hi = m.energyKeV[m.energyKeV.length - 1];
  const g = ins.energyGrid;
  if (lo > g.minKeV || hi < g.maxKeV)
    throw new KilnInputError('mirror effective-area table does not span the response energy grid', {
      file: m.file,
      value: `${lo}..${hi} keV`,
      expected: `rows from ≤ ${g.minKeV} keV to ≥ ${g.maxKeV} keV (energyGrid of ${ins.id})`,
    });
}
