/**
 * A content tree with two instruments written from the README's content layout (invented data,
 * nothing real): the demo's QUILLON TARNCAM (instrument.yaml and mirror table copied, release
 * 1.0.0 in the single-instrument layout) and a second invented camera, OSSEL BRIARCAM: four
 * sensors behind a filter wheel with two positions (thin and thick optical blocking filter),
 * releases 1.0.0 and 1.1.0 in the instrument-qualified layout (`releases/ossel-briarcam~1.0.0/`),
 * so both instruments have a release 1.0.0. Both use a small energy grid (quick builds).
 *
 * BRIARCAM's sensors take the demo's two sensor designs (s0, s1 like Tarn-F; s2, s3 like Tarn-B)
 * with the demo's ground line fits, so closure holds as it does for the demo's 1.0.0.
 */
import { cpSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse, stringify } from 'yaml';

export const SECOND = 'ossel-briarcam';
export const FIRST = 'quillon-tarncam';
/** Small response energy grid of both instruments: few bins, so a release builds in seconds. */
export const FIXTURE_BINS = 120;
/** Coarse channels (keV range of the demo's grid kept): closure is not the point here, so releases are drafts. */
export const FIXTURE_CHANNELS = { count: 256, widthEv: 60 };
export const SENSORS = ['s0', 's1', 's2', 's3'] as const;
/** FITS FILTER of each configuration (invented names). */
export const FILTERS = { thin: 'THIN-OBF', thick: 'THICK-OBF' } as const;
/** Aluminium of the blocking filter per configuration (µm): the thick one blocks more soft X-rays. */
export const ALUMINIUM_UM = { thin: 0.04, thick: 0.16 } as const;
/** 1.1.0 raises the read noise of s0 (a change the review must flag, in both configurations). */
export const S0_READ_NOISE_1_1_0 = 5.5;

const polyimide = { name: 'wheel-polyimide', material: { formula: 'C22H10N2O5', densityGcm3: 1.42 }, thicknessUm: 0.2 };
const aluminium = (um: number) => ({ name: 'wheel-aluminium', material: { formula: 'Al', densityGcm3: 2.7 }, thicknessUm: um });

export function writeTwoInstruments(demoContent: string, root: string): void {
  const demoIns = join(demoContent, 'instruments', FIRST);
  const demoRel = join(demoContent, 'releases', '1.0.0');
  // First instrument: the demo's, on a small grid; no reference sources (not needed here).
  const a = parse(readFileSync(join(demoIns, 'instrument.yaml'), 'utf8'));
  a.energyGrid = { ...a.energyGrid, bins: FIXTURE_BINS };
  a.channels = { ...a.channels, ...FIXTURE_CHANNELS };
  const insA = join(root, 'instruments', FIRST);
  mkdirSync(insA, { recursive: true });
  writeFileSync(join(insA, 'instrument.yaml'), '# Test fixture (invented): the demo instrument on a small grid.\n' + stringify(a));
  cpSync(join(demoIns, 'mirror-area.csv'), join(insA, 'mirror-area.csv'));
  const relA = join(root, 'releases', '1.0.0');
  mkdirSync(join(relA, 'linefits'), { recursive: true });
  const ra = parse(readFileSync(join(demoRel, 'release.yaml'), 'utf8'));
  writeFileSync(join(relA, 'release.yaml'), stringify({ ...ra, status: 'draft' }));
  writeFileSync(join(relA, 'notes.md'), 'Invented test release of the first instrument.\n');
  for (const d of ['fi0', 'bi1']) cpSync(join(demoRel, 'linefits', `${d}.csv`), join(relA, 'linefits', `${d}.csv`));

  // Second instrument: four sensors, two filter positions.
  const byId = new Map<string, Record<string, unknown>>(a.detectors.map((d: { id: string }) => [d.id, d]));
  const sensor = (id: string, like: 'fi0' | 'bi1', n: number) => ({
    ...byId.get(like),
    id,
    name: `Briar-${n}`,
    description: `Invented sensor ${n} of the BRIARCAM test camera.`,
  });
  const b = {
    id: SECOND,
    telescope: 'OSSEL',
    instrument: 'BRIARCAM',
    title: 'OSSEL BRIARCAM, four-sensor test camera (invented)',
    description: 'An invented four-sensor camera behind a two-position filter wheel, for tests.',
    mirrorArea: 'mirror-area.csv',
    channels: a.channels,
    energyGrid: a.energyGrid,
    detectors: [sensor('s0', 'fi0', 0), sensor('s1', 'fi0', 1), sensor('s2', 'bi1', 2), sensor('s3', 'bi1', 3)],
    configurations: (['thin', 'thick'] as const).map((id) => ({ id, title: `${id} optical blocking filter`, filter: FILTERS[id], filters: [polyimide, aluminium(ALUMINIUM_UM[id])] })),
  };
  const insB = join(root, 'instruments', SECOND);
  mkdirSync(insB, { recursive: true });
  writeFileSync(join(insB, 'instrument.yaml'), '# Test fixture (invented): OSSEL BRIARCAM.\n' + stringify(b));
  cpSync(join(demoIns, 'mirror-area.csv'), join(insB, 'mirror-area.csv'));
  const like: Record<string, string> = { s0: 'fi0', s1: 'fi0', s2: 'bi1', s3: 'bi1' };
  const release = (id: string, supersedes: string | null, model: Record<string, unknown>) => {
    const dir = join(root, 'releases', `${SECOND}~${id}`);
    mkdirSync(join(dir, 'linefits'), { recursive: true });
    const doc = {
      id,
      instrument: SECOND,
      title: `BRIARCAM test release ${id}`,
      date: id === '1.0.0' ? '2026-03-20' : '2026-06-01',
      status: 'draft',
      supersedes,
      validFrom: '2026-05-12',
      validTo: null,
      products: ['rmf', 'arf'],
      epochs: [{ id: 'launch', date: '2026-05-12', validFrom: '2026-05-12', validTo: null }],
      detectors: Object.fromEntries(SENSORS.map((s) => [s, { lineFits: `linefits/${s}.csv`, ...(model[s] ? { model: model[s] } : {}) }])),
    };
    writeFileSync(join(dir, 'release.yaml'), '# Test fixture (invented).\n' + stringify(doc));
    writeFileSync(join(dir, 'notes.md'), `Invented test release ${id} of BRIARCAM.\n`);
    for (const s of SENSORS) cpSync(join(demoRel, 'linefits', `${like[s]}.csv`), join(dir, 'linefits', `${s}.csv`));
  };
  release('1.0.0', null, {});
  release('1.1.0', '1.0.0', { s0: { redistribution: { fwhm: { readNoiseE: S0_READ_NOISE_1_1_0 } } } });
}
