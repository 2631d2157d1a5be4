/**
 * Writes a large generated content tree for the benchmark: the demo instrument (invented QUILLON
 * TARNCAM) with its two detectors cloned into D detectors, and one draft release with E epochs,
 * on a smaller response grid so that thousands of products build in minutes on 2 cores.
 * EVERYTHING HERE IS INVENTED: the clones are the demo's invented detectors with the read noise
 * nudged per clone so that no two products are identical. Products = D × (1 RMF + E ARFs).
 *
 *   node --import tsx scripts/make-large-instrument.ts OUT_DIR [--detectors D] [--epochs E]
 *        [--channels N] [--bins N]
 */
import { cpSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse, stringify } from 'yaml';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
const DEMO = join(ROOT, 'content');
const INSTRUMENT = 'quillon-tarncam';
/** The demo release whose detector overrides and line fits the clones reuse. */
const SOURCE_RELEASE = '2.0.0';
const START = Date.UTC(2026, 4, 12); // 2026-05-12: the demo instrument's first validity date
const EPOCH_DAYS = 30;
/** Read noise added per clone (electrons, invented): distinct products, same physics regime. */
const READ_NOISE_STEP_E = 0.01;

export interface LargeInstrument {
  detectors: number;
  epochs: number;
  /** Channel count; the channels span the demo's 0–15.36 keV whatever the count. */
  channels: number;
  /** Response energy bins over the demo's 0.2–12 keV. */
  bins: number;
}

export const DEFAULT_LARGE: LargeInstrument = { detectors: 40, epochs: 12, channels: 256, bins: 200 };
/** Channel span of the demo instrument: 1024 channels × 15 eV. */
const CHANNEL_SPAN_EV = 1024 * 15;

const day = (i: number) => new Date(START + i * EPOCH_DAYS * 86_400_000).toISOString().slice(0, 10);

/** Writes the tree to `out` (replaced); returns the number of products a build makes. */
export function makeLargeInstrument(out: string, size: LargeInstrument): number {
  rmSync(out, { recursive: true, force: true });
  const insDir = join(out, 'instruments', INSTRUMENT);
  const relDir = join(out, 'releases', '1.0.0');
  mkdirSync(join(relDir, 'linefits'), { recursive: true });
  mkdirSync(insDir, { recursive: true });
  cpSync(join(DEMO, 'instruments', INSTRUMENT, 'mirror-area.csv'), join(insDir, 'mirror-area.csv'));

  const ins = parse(readFileSync(join(DEMO, 'instruments', INSTRUMENT, 'instrument.yaml'), 'utf8'));
  const rel = parse(readFileSync(join(DEMO, 'releases', SOURCE_RELEASE, 'release.yaml'), 'utf8'));
  const bases: { id: string; name: string }[] = ins.detectors;
  const ids = Array.from({ length: size.detectors }, (_, i) => `c${String(i + 1).padStart(3, '0')}`);
  ins.title = `QUILLON TARNCAM, ${size.detectors}-detector generated bench instrument (invented)`;
  ins.channels = { ...ins.channels, count: size.channels, widthEv: CHANNEL_SPAN_EV / size.channels };
  ins.energyGrid = { ...ins.energyGrid, bins: size.bins };
  ins.detectors = ids.map((id, i) => {
    const base = structuredClone(bases[i % bases.length]) as { id: string; name: string; description: string; redistribution: { fwhm: { readNoiseE?: number } } };
    base.id = id;
    base.name = `${base.name} clone ${i + 1}`;
    if (typeof base.redistribution.fwhm.readNoiseE === 'number') base.redistribution.fwhm.readNoiseE = +(base.redistribution.fwhm.readNoiseE + READ_NOISE_STEP_E * i).toFixed(4);
    return base;
  });
  writeFileSync(join(insDir, 'instrument.yaml'), `# INVENTED generated bench instrument (scripts/make-large-instrument.ts).\n${stringify(ins)}`);

  const detectors: Record<string, unknown> = {};
  ids.forEach((id, i) => {
    const baseId = bases[i % bases.length].id;
    const d = structuredClone(rel.detectors[baseId]) as { lineFits: string; model?: { redistribution?: { fwhm?: { readNoiseE?: number } } } };
    d.lineFits = `linefits/${id}.csv`;
    const fwhm = d.model?.redistribution?.fwhm;
    if (fwhm && typeof fwhm.readNoiseE === 'number') fwhm.readNoiseE = +(fwhm.readNoiseE + READ_NOISE_STEP_E * i).toFixed(4);
    detectors[id] = d;
    cpSync(join(DEMO, 'releases', SOURCE_RELEASE, 'linefits', `${baseId}.csv`), join(relDir, 'linefits', `${id}.csv`));
  });
  // Per-detector check settings (the stated extrapolation reasons) follow their base detector.
  const checks = structuredClone(rel.checks ?? {}) as { extrapolation?: { detector: string }[] };
  if (checks.extrapolation) {
    checks.extrapolation = ids.flatMap((id, i) => checks.extrapolation!.filter((x) => x.detector === bases[i % bases.length].id).map((x) => ({ ...x, detector: id })));
  }
  const epochs = Array.from({ length: size.epochs }, (_, i) => ({ id: `m${String(i + 1).padStart(2, '0')}`, date: day(i), validFrom: day(i), validTo: i === size.epochs - 1 ? null : day(i + 1) }));
  const release = { ...rel, id: '1.0.0', title: 'Generated bench release (invented)', date: day(0), status: 'draft', supersedes: null, validFrom: day(0), validTo: null, epochs, detectors, checks };
  writeFileSync(join(relDir, 'release.yaml'), `# INVENTED generated bench release (scripts/make-large-instrument.ts).\n${stringify(release)}`);
  writeFileSync(join(relDir, 'notes.md'), '# Generated bench release\n\nInvented, generated by scripts/make-large-instrument.ts.\n');
  return size.detectors * (1 + size.epochs);
}

function main(argv: string[]): void {
  const [out, ...rest] = argv;
  if (!out || out.startsWith('--')) throw new Error('usage: make-large-instrument.ts OUT_DIR [--detectors D] [--epochs E] [--channels N] [--bins N]');
  const size = { ...DEFAULT_LARGE };
  for (let i = 0; i < rest.length; i += 2) {
    const key = rest[i].replace(/^--/, '') as keyof LargeInstrument;
    const v = Number(rest[i + 1]);
    if (!(key in size) || !Number.isInteger(v) || v < 1) throw new Error(`bad option ${rest[i]} ${rest[i + 1] ?? ''}: --detectors, --epochs, --channels, --bins take whole numbers ≥ 1`);
    size[key] = v;
  }
  const products = makeLargeInstrument(out, size);
  console.log(`make-large-instrument: ${size.detectors} detectors × ${size.epochs} epochs → ${products} products, written to ${out}`);
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) main(process.argv.slice(2));
