/**
 * kiln efficiency: layer-by-layer transmission and sensor absorption of one detector of an
 * instrument file, at the energies asked for. A thin shell over efficiencyTable (generators/physics).
 */
import { KilnInputError } from '../errors.ts';
import { TABLE_ENERGY_MAX_KEV, TABLE_ENERGY_MIN_KEV } from '../physics/elements.ts';
import { efficiencyTable, type EfficiencyTable } from '../physics/efficiency.ts';
import { isoDateToDays } from '../physics/contamination.ts';
import type { DetectorStack } from '../physics/types.ts';
import { optFlag, optString, UsageError, type CommandSpec, type ParsedArgs } from './args.ts';

/** What this verb needs of an instrument (a subset of generators/content's Instrument). */
export interface InstrumentDetectors {
  detectors: { id: string; name: string; stack: DetectorStack }[];
}
export type InstrumentLoader = (path: string) => Promise<InstrumentDetectors>;

/**
 * The file loader lives in generators/content (imported lazily so `kiln efficiency --help` stays
 * cheap); its detectors carry the stack as written, turned into a DetectorStack here.
 */
const loadInstrument: InstrumentLoader = async (path) => {
  const content = await import('../content/index.ts');
  const ins = await content.loadInstrumentFile(path);
  return { detectors: ins.detectors.map((d) => ({ id: d.id, name: d.name, stack: content.stackFromInput(d.stack) })) };
};

/** "0.5,1,1.5" (commas and/or spaces) → energies in keV; a bad value → UsageError naming it. */
export function parseEnergyList(text: string): Float64Array {
  const items = text.split(/[\s,]+/).filter((s) => s.length > 0);
  if (items.length === 0) throw new UsageError(`--energies needs at least one energy in keV, e.g. --energies 0.5,1,6 (got "${text}")`);
  return Float64Array.from(items, (s) => {
    const v = /^[+]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(s) ? Number(s) : NaN;
    if (!Number.isFinite(v)) throw new UsageError(`--energies: "${s}" is not a number (energies in keV, separated by commas)`);
    if (v < TABLE_ENERGY_MIN_KEV || v > TABLE_ENERGY_MAX_KEV) {
      throw new UsageError(`--energies: ${s} keV is outside ${TABLE_ENERGY_MIN_KEV}–${TABLE_ENERGY_MAX_KEV} keV, the range of the cross-section table`);
    }
    return v;
  });
}

function fmt(v: number): string {
  return v >= 1e-4 ? v.toFixed(5) : v.toExponential(3);
}

/** Plain-text table: one row per energy, one column per component, then the total. */
export function formatEfficiencyText(t: EfficiencyTable, title: string): string {
  const heads = ['E (keV)', ...t.components.map((c) => (c.kind === 'sensor' ? 'sensor (absorbed)' : c.name)), 'total'];
  const rows = t.energiesKeV.map((e, j) => [e.toPrecision(6).replace(/\.?0+$/, ''), ...t.components.map((c) => fmt(c.values[j])), fmt(t.total[j])]);
  const widths = heads.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padStart(widths[i])).join('  ');
  const layers = t.components.map(
    (c) =>
      `  ${c.kind.padEnd(13)} ${c.name}: ${c.formula}, ${c.densityGcm3} g/cm³, ${+c.thicknessUm.toPrecision(6)} µm` +
      (c.partialUm !== undefined ? ` (+ ${c.partialUm} µm partially collecting, ${c.collectionAtSurface} at surface)` : ''),
  );
  return [title, ...(t.date ? [`date ${t.date}, contamination ${+t.contaminationUm.toPrecision(6)} µm`] : []), ...layers, '', line(heads), ...rows.map(line)].join('\n');
}

/** The verb with its loader and output injectable (tests). */
export async function runEfficiency(args: ParsedArgs, load: InstrumentLoader = loadInstrument, write: (s: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  const file = optString(args, 'instrument');
  const detectorId = optString(args, 'detector');
  const energiesText = optString(args, 'energies');
  if (!file) throw new UsageError('--instrument FILE is required');
  if (!detectorId) throw new UsageError('--detector ID is required');
  if (energiesText === undefined) throw new UsageError('--energies LIST is required (keV, comma-separated)');
  const energies = parseEnergyList(energiesText);
  const date = optString(args, 'date') ?? null;
  if (date !== null) {
    try {
      isoDateToDays(date, '--date');
    } catch {
      throw new UsageError(`--date: "${date}" is not a calendar date YYYY-MM-DD`);
    }
  }
  const instrument = await load(file);
  const det = instrument.detectors.find((d) => d.id === detectorId);
  if (!det) {
    throw new KilnInputError(`no detector "${detectorId}" in the instrument`, {
      file,
      field: 'detectors',
      value: detectorId,
      expected: `one of ${instrument.detectors.map((d) => d.id).join(', ') || '(none)'}`,
    });
  }
  if (det.stack.contamination && date === null) {
    throw new UsageError(`--date YYYY-MM-DD is required: detector "${detectorId}" has contamination layer "${det.stack.contamination.name}"`);
  }
  let table: EfficiencyTable;
  try {
    table = efficiencyTable(det.stack, energies, date);
  } catch (e) {
    if (e instanceof KilnInputError && !e.where.file) throw new KilnInputError(`detector "${detectorId}": ${e.message}`, { ...e.where, file });
    throw e;
  }
  if (optFlag(args, 'json')) {
    write(JSON.stringify({ instrument: file, detector: det.id, name: det.name, ...table }, null, 2) + '\n');
  } else {
    write(formatEfficiencyText(table, `detector ${det.id} (${det.name}) of ${file}`) + '\n');
  }
  return 0;
}

export const command: CommandSpec = {
  name: 'efficiency',
  summary: 'Print the transmission of every layer, the sensor absorption and the total efficiency of a detector',
  usage: 'kiln efficiency --instrument FILE --detector ID --energies LIST [--date YYYY-MM-DD] [--json]',
  options: [
    { name: 'instrument', arg: 'FILE', help: 'instrument description file' },
    { name: 'detector', arg: 'ID', help: 'detector id within the instrument' },
    { name: 'energies', arg: 'LIST', help: `photon energies in keV, comma-separated (${TABLE_ENERGY_MIN_KEV}–${TABLE_ENERGY_MAX_KEV})` },
    { name: 'date', arg: 'YYYY-MM-DD', help: 'observation date (needed when the detector has a contamination layer)' },
    { name: 'json', help: 'print JSON: each layer with formula, density (g/cm³), thickness (µm) and values' },
  ],
  positionals: { min: 0, max: 0, names: '' },
  run: (args) => runEfficiency(args),
};
