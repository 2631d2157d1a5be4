/**
 * Writes a synthetic build output directory (default .kiln/fixture) for developing the site before
 * `kiln build` exists. EVERYTHING HERE IS INVENTED PLACEHOLDER DATA for site development only: the
 * instrument, detectors, curves, fits, checks and files describe nothing real and must never be
 * published or used for analysis. Shapes are merely plausible so the plots have something to show.
 *
 * Layout and types follow generators/site-data/types.ts exactly.
 * Usage: node --import tsx scripts/make-site-fixture.ts [DIR]
 */
import { createHash } from 'node:crypto';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { writeSiteDocuments } from '../generators/pipeline/site-files.ts';
import { splitRelease } from '../generators/site-data/split.ts';
import type {
  Check,
  DetectorSite,
  EpochSite,
  InstrumentSummary,
  LineFitSite,
  ParameterRow,
  ProductSummary,
  ReleaseIndex,
  ReleaseManifest,
  ReleaseSite,
  ReleaseStatus,
  ReleaseSummary,
  ValidationReport,
} from '../generators/site-data/types.ts';

const OUT = process.argv[2] ?? '.kiln/fixture';

/** Deterministic PRNG (mulberry32) so the fixture is reproducible. */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const gauss = (r: () => number) => Math.sqrt(-2 * Math.log(r() + 1e-12)) * Math.cos(2 * Math.PI * r());

const logGrid = (lo: number, hi: number, n: number) =>
  Array.from({ length: n }, (_, i) => lo * Math.pow(hi / lo, i / (n - 1)));
const round = (x: number, d = 6) => Number(x.toPrecision(d));

/* ---------------- invented instrument ---------------- */

const instrument: InstrumentSummary = {
  id: 'fxs',
  telescope: 'PLACEHOLDER-1',
  instrument: 'FXS',
  title: 'Fixture X-ray Spectrometer (invented placeholder)',
  description:
    'An invented two-detector imaging spectrometer used only to develop the Kiln site. None of its numbers describe real hardware.',
  channels: 64,
  detectors: [
    { id: 'fx0', name: 'FX0', kind: 'front-illuminated CCD', description: 'Invented front-illuminated CCD, thick gate structure.' },
    { id: 'fx1', name: 'FX1', kind: 'back-illuminated CMOS', description: 'Invented back-illuminated CMOS sensor, thin entrance window.' },
  ],
};

interface ReleaseDef {
  id: string;
  date: string;
  status: ReleaseStatus;
  validFrom: string;
  validTo: string | null;
  supersedes: string | null;
  /** Invented knobs that make releases differ. */
  readNoiseE: number;
  fano: number;
  contamRate: number;
  notes: string;
}

const releases: ReleaseDef[] = [
  {
    id: '1.2.0',
    date: '2025-09-15',
    status: 'candidate',
    validFrom: '2024-01-01',
    validTo: null,
    supersedes: '1.1.0',
    readNoiseE: 3.6,
    fano: 0.118,
    contamRate: 0.09,
    notes: `# Release 1.2.0 (candidate)

*Invented placeholder notes for site development.*

- Contamination growth rate refitted from (invented) in-flight line monitoring.
- Read noise lowered after a (fictional) clocking change.

A raw HTML test follows; the site must show it as text or drop it, never run it:
<script>window.__kilnInjected = true</script> <img src=x onerror="window.__kilnInjected=true">
[a link that must be neutralised](javascript:alert(1))
`,
  },
  {
    id: '1.1.0',
    date: '2025-03-01',
    status: 'published',
    validFrom: '2024-01-01',
    validTo: null,
    supersedes: '1.0.0',
    readNoiseE: 4.0,
    fano: 0.117,
    contamRate: 0.06,
    notes: `# Release 1.1.0

*Invented placeholder notes for site development.*

Second epoch added for the contamination layer. Line fits from the ground calibration campaign
(invented): a ⁵⁵Fe radioactive source for Mn Kα/Kβ and an X-ray generator with fluorescence
targets (Al, Ti, Cu) for the other lines.

| line | energy (keV) |
| ---- | ------------ |
| Al Kα | 1.487 |
| Mn Kα | 5.899 |
`,
  },
  {
    id: '1.0.0',
    date: '2024-06-01',
    status: 'superseded',
    validFrom: '2024-01-01',
    validTo: '2025-01-01',
    supersedes: null,
    readNoiseE: 4.5,
    fano: 0.12,
    contamRate: 0.0,
    notes: `# Release 1.0.0

*Invented placeholder notes for site development.*

First release, from ground calibration only (invented). Superseded by 1.1.0.
`,
  },
];

const EPOCHS = [
  { id: 'e1', date: '2024-01-01', validFrom: '2024-01-01', validTo: '2025-01-01' as string | null, years: 0.5 },
  { id: 'e2', date: '2025-01-01', validFrom: '2025-01-01', validTo: null as string | null, years: 1.5 },
];

const LINES = [
  { line: 'C Kα', energyKeV: 0.277 },
  { line: 'O Kα', energyKeV: 0.525 },
  { line: 'Al Kα', energyKeV: 1.487 },
  { line: 'Ti Kα', energyKeV: 4.511 },
  { line: 'Mn Kα', energyKeV: 5.899 },
  { line: 'Mn Kβ', energyKeV: 6.49 },
  { line: 'Cu Kα', energyKeV: 8.048 },
];

const PAIR_EV = 3.65;
const FWHM_PER_SIGMA = 2.3548;
const E_GRID = logGrid(0.2, 12, 160);
const CHANNELS = instrument.channels;
const CH_WIDTH_KEV = 0.2;
const CH_E = Array.from({ length: CHANNELS }, (_, c) => (c + 0.5) * CH_WIDTH_KEV);

function fwhmEv(eKeV: number, rel: ReleaseDef, det: number): number {
  const noise = rel.readNoiseE * (det === 1 ? 0.8 : 1);
  const s2 = (PAIR_EV * noise) ** 2 * 4 + rel.fano * PAIR_EV * eKeV * 1000 + 10 ** 2;
  return FWHM_PER_SIGMA * Math.sqrt(s2);
}
const centroidOffsetEv = (eKeV: number, det: number) => 2 - (det === 0 ? 25 : 8) * Math.exp(-eKeV / 0.6);

function epochSite(rel: ReleaseDef, det: number, ep: (typeof EPOCHS)[number]): EpochSite {
  const mirror = E_GRID.map((e) => 320 * Math.exp(-((e / 7.5) ** 2)) * (e < 2.1 ? 1 : 0.85) + 5);
  const filter = E_GRID.map((e) => Math.exp(-0.045 / e ** 2.6) * (e > 1.56 ? 0.97 : 1));
  const contam = E_GRID.map((e) => Math.exp(-(0.02 + rel.contamRate * ep.years) / e ** 2.7));
  const surfaceThick = det === 0 ? 0.35 : 0.04;
  const surface = E_GRID.map((e) => Math.exp(-surfaceThick / e ** 2.7) * (e > 1.839 && det === 0 ? 0.93 : 1));
  const depletionScale = det === 0 ? 60 : 25;
  const detector = E_GRID.map((e) => 1 - Math.exp(-depletionScale * (8 / e) ** 2.8 / 100));
  const qe = E_GRID.map((_, i) => filter[i] * contam[i] * surface[i] * detector[i]);
  return {
    id: ep.id,
    date: ep.date,
    validFrom: ep.validFrom,
    validTo: ep.validTo,
    energyKeV: E_GRID.map((e) => round(e)),
    mirrorCm2: mirror.map((v) => round(v)),
    components: [
      { name: 'optical blocking filter', kind: 'filter', values: filter.map((v) => round(v)) },
      { name: 'hydrocarbon contamination', kind: 'contamination', values: contam.map((v) => round(v)) },
      { name: det === 0 ? 'gate structure' : 'entrance window', kind: 'surface', values: surface.map((v) => round(v)) },
      { name: 'depleted silicon', kind: 'detector', values: detector.map((v) => round(v)) },
    ],
    detectorQE: qe.map((v) => round(v)),
    effectiveAreaCm2: qe.map((q, i) => round(q * mirror[i])),
  };
}

/** Gaussian core + flat shelf, integrated over channels (differences of the CDF). */
function profileRow(eKeV: number, rel: ReleaseDef, det: number): number[] {
  const sigmaKeV = fwhmEv(eKeV, rel, det) / FWHM_PER_SIGMA / 1000;
  const mu = eKeV + centroidOffsetEv(eKeV, det) / 1000;
  const erf = (x: number) => {
    // Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7), enough for a placeholder.
    const t = 1 / (1 + 0.3275911 * Math.abs(x));
    const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
    return x >= 0 ? y : -y;
  };
  const cdf = (x: number) => 0.5 * (1 + erf((x - mu) / (Math.SQRT2 * sigmaKeV)));
  const shelf = det === 0 ? 0.02 : 0.008;
  return CH_E.map((c) => {
    const lo = c - CH_WIDTH_KEV / 2;
    const hi = c + CH_WIDTH_KEV / 2;
    const core = (1 - shelf) * (cdf(hi) - cdf(lo));
    const flat = hi <= eKeV ? (shelf * CH_WIDTH_KEV) / eKeV : 0;
    const v = core + flat;
    return v < 1e-9 ? 0 : round(v, 5);
  });
}

function detectorSite(rel: ReleaseDef, det: number, seed: number): DetectorSite {
  const r = rng(seed);
  const d = instrument.detectors[det];
  const lineFits: LineFitSite[] = LINES.map((l) => {
    const model = fwhmEv(l.energyKeV, rel, det);
    const errF = 1.5 + 0.01 * model;
    const meas = model + gauss(r) * errF;
    const off = centroidOffsetEv(l.energyKeV, det);
    const errC = 0.8;
    const measC = off + gauss(r) * errC;
    return {
      line: l.line,
      energyKeV: l.energyKeV,
      centroidKeV: round(l.energyKeV + measC / 1000, 7),
      centroidErrEv: errC,
      fwhmEv: round(meas, 5),
      fwhmErrEv: round(errF, 3),
      modelFwhmEv: round(model, 5),
      fwhmResidualEv: round(meas - model, 4),
      modelCentroidKeV: round(l.energyKeV + off / 1000, 7),
      centroidResidualEv: round(measC - off, 4),
      efficiency: l.energyKeV > 1 ? round(0.9 + 0.05 * r(), 3) : null,
    };
  });
  const resE = logGrid(0.2, 12, 80);
  const profileEnergies = [0.5, 1.5, 3, 5.9, 8];
  // Rows evenly spaced in energy across matrix.energyKeV (linear), columns across channelEnergyKeV.
  const matrixE = Array.from({ length: 40 }, (_, i) => 0.2 + ((12 - 0.2) * (i + 0.5)) / 40);
  const log10 = matrixE.map((e) => profileRow(e, rel, det).map((p) => (p > 0 ? round(Math.log10(p), 4) : null)));
  return {
    id: d.id,
    name: d.name,
    kind: d.kind,
    epochs: EPOCHS.filter((ep) => rel.validTo === null || ep.validFrom < rel.validTo).map((ep) => epochSite(rel, det, ep)),
    resolution: {
      energyKeV: resE.map((e) => round(e)),
      fwhmEv: resE.map((e) => round(fwhmEv(e, rel, det))),
      centroidOffsetEv: resE.map((e) => round(centroidOffsetEv(e, det))),
    },
    lineFits,
    fitQuality: { fwhmChi2: round(5 + 4 * r(), 4), fwhmDof: 4, centroidChi2: round(4 + 4 * r(), 4), centroidDof: 3 },
    profiles: { channelEnergyKeV: CH_E.map((c) => round(c)), energiesKeV: profileEnergies, rows: profileEnergies.map((e) => profileRow(e, rel, det)) },
    matrix: {
      path: null,
      log10,
      energyKeV: [0.2, 12],
      channelEnergyKeV: [0, CHANNELS * CH_WIDTH_KEV],
      log10Range: [-6, 0],
    },
  };
}

/* ---------------- tiny FITS writer (fixture only; the real files come from generators/ogip) ---------------- */

function card(key: string, value?: string | number | boolean, comment?: string): string {
  let s: string;
  if (value === undefined) s = key.padEnd(80);
  else {
    let v: string;
    if (typeof value === 'string') v = `'${value.replace(/'/g, "''").padEnd(8)}'`.padEnd(20);
    else if (typeof value === 'boolean') v = (value ? 'T' : 'F').padStart(20);
    else v = String(value).padStart(20);
    s = `${key.padEnd(8)}= ${v}${comment ? ` / ${comment}` : ''}`;
  }
  return s.slice(0, 80).padEnd(80);
}
const block = (s: string) => s.padEnd(Math.ceil(s.length / 2880) * 2880, ' ');

interface Col {
  name: string;
  form: string;
  unit?: string;
  /** 'E' float32, 'J' int32, 'I' int16; repeat count. */
  type: 'E' | 'J' | 'I';
  repeat: number;
  values: (row: number) => number[];
}

function bintable(extname: string, nrows: number, cols: Col[], keys: [string, string | number | boolean][]): Buffer {
  const width = cols.reduce((s, c) => s + c.repeat * (c.type === 'I' ? 2 : 4), 0);
  const cards = [
    card('XTENSION', 'BINTABLE'),
    card('BITPIX', 8),
    card('NAXIS', 2),
    card('NAXIS1', width),
    card('NAXIS2', nrows),
    card('PCOUNT', 0),
    card('GCOUNT', 1),
    card('TFIELDS', cols.length),
  ];
  cols.forEach((c, i) => {
    cards.push(card(`TTYPE${i + 1}`, c.name), card(`TFORM${i + 1}`, `${c.repeat}${c.type}`));
    if (c.unit) cards.push(card(`TUNIT${i + 1}`, c.unit));
  });
  cards.push(card('EXTNAME', extname));
  for (const [k, v] of keys) cards.push(card(k, v));
  cards.push(card('COMMENT', undefined), card('COMMENT   Invented placeholder data (Kiln site fixture).'), card('END'));
  const header = Buffer.from(block(cards.join('')), 'latin1');
  const data = Buffer.alloc(Math.ceil((width * nrows) / 2880) * 2880);
  let o = 0;
  for (let r = 0; r < nrows; r++)
    for (const c of cols) {
      const vs = c.values(r);
      for (let k = 0; k < c.repeat; k++) {
        if (c.type === 'E') (data.writeFloatBE(vs[k] ?? 0, o), (o += 4));
        else if (c.type === 'J') (data.writeInt32BE(vs[k] ?? 0, o), (o += 4));
        else (data.writeInt16BE(vs[k] ?? 0, o), (o += 2));
      }
    }
  return Buffer.concat([header, data]);
}

const primary = () =>
  Buffer.from(block([card('SIMPLE', true), card('BITPIX', 8), card('NAXIS', 0), card('EXTEND', true), card('END')].join('')), 'latin1');

function ogipKeys(cls2: string, vers: string, det: string, relId: string): [string, string | number | boolean][] {
  return [
    ['HDUCLASS', 'OGIP'],
    ['HDUCLAS1', 'RESPONSE'],
    ['HDUCLAS2', cls2],
    ['HDUVERS', vers],
    ['TELESCOP', instrument.telescope],
    ['INSTRUME', instrument.instrument],
    ['DETNAM', det.toUpperCase()],
    ['FILTER', 'NONE'],
    ['KILNREL', relId],
  ];
}

function rmfFile(rel: ReleaseDef, det: number): Buffer {
  const eb = logGrid(0.2, 12, 41);
  const rows = eb.slice(0, -1).map((lo, i) => profileRow(Math.sqrt(lo * eb[i + 1]), rel, det));
  const id = instrument.detectors[det].id;
  const matrix = bintable(
    'MATRIX',
    rows.length,
    [
      { name: 'ENERG_LO', form: '1E', unit: 'keV', type: 'E', repeat: 1, values: (r) => [eb[r]] },
      { name: 'ENERG_HI', form: '1E', unit: 'keV', type: 'E', repeat: 1, values: (r) => [eb[r + 1]] },
      { name: 'N_GRP', form: '1I', type: 'I', repeat: 1, values: () => [1] },
      { name: 'F_CHAN', form: '1J', type: 'J', repeat: 1, values: () => [0] },
      { name: 'N_CHAN', form: '1J', type: 'J', repeat: 1, values: () => [CHANNELS] },
      { name: 'MATRIX', form: `${CHANNELS}E`, type: 'E', repeat: CHANNELS, values: (r) => rows[r] },
    ],
    [...ogipKeys('RSP_MATRIX', '1.3.0', id, rel.id), ['HDUCLAS3', 'REDIST'], ['CHANTYPE', 'PI'], ['DETCHANS', CHANNELS], ['LO_THRES', 1e-9], ['TLMIN4', 0], ['TLMAX4', CHANNELS - 1]],
  );
  const ebounds = bintable(
    'EBOUNDS',
    CHANNELS,
    [
      { name: 'CHANNEL', form: '1J', type: 'J', repeat: 1, values: (r) => [r] },
      { name: 'E_MIN', form: '1E', unit: 'keV', type: 'E', repeat: 1, values: (r) => [r * CH_WIDTH_KEV] },
      { name: 'E_MAX', form: '1E', unit: 'keV', type: 'E', repeat: 1, values: (r) => [(r + 1) * CH_WIDTH_KEV] },
    ],
    [...ogipKeys('EBOUNDS', '1.2.0', id, rel.id), ['CHANTYPE', 'PI'], ['DETCHANS', CHANNELS]],
  );
  return Buffer.concat([primary(), matrix, ebounds]);
}

function arfFile(rel: ReleaseDef, det: number, ep: EpochSite): Buffer {
  const n = ep.energyKeV.length - 1;
  const id = instrument.detectors[det].id;
  return Buffer.concat([
    primary(),
    bintable(
      'SPECRESP',
      n,
      [
        { name: 'ENERG_LO', form: '1E', unit: 'keV', type: 'E', repeat: 1, values: (r) => [ep.energyKeV[r]] },
        { name: 'ENERG_HI', form: '1E', unit: 'keV', type: 'E', repeat: 1, values: (r) => [ep.energyKeV[r + 1]] },
        { name: 'SPECRESP', form: '1E', unit: 'cm**2', type: 'E', repeat: 1, values: (r) => [ep.effectiveAreaCm2[r]] },
      ],
      ogipKeys('SPECRESP', '1.1.0', id, rel.id),
    ),
  ]);
}

/* ---------------- write everything ---------------- */

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const writeJson = (p: string, v: unknown) => writeFileSync(p, JSON.stringify(v, null, 1) + '\n');

rmSync(OUT, { recursive: true, force: true });
mkdirSync(OUT, { recursive: true });

const summaries: ReleaseSummary[] = [];
releases.forEach((rel, ri) => {
  const dir = join(OUT, 'releases', rel.id);
  mkdirSync(join(dir, 'files'), { recursive: true });
  const detectors = instrument.detectors.map((_, di) => detectorSite(rel, di, 1000 * ri + di + 1));
  const products: ProductSummary[] = [];
  detectors.forEach((ds, di) => {
    const add = (kind: 'rmf' | 'arf', epoch: EpochSite, bytes: Buffer, name: string, validFrom: string, validTo: string | null) => {
      const gz = gzipSync(bytes, { level: 9 });
      writeFileSync(join(dir, 'files', name), gz);
      products.push({ id: `${ds.id}-${epoch.id}-${kind}`, kind, detector: ds.id, epoch: epoch.id, path: `files/${name}`, bytes: gz.length, sha256: sha256(gz), validFrom, validTo });
    };
    for (const ep of ds.epochs) {
      const validTo = ep.validTo && rel.validTo && rel.validTo < ep.validTo ? rel.validTo : (ep.validTo ?? rel.validTo);
      add('rmf', ep, rmfFile(rel, di), `${ds.id}_${ep.id}_v${rel.id}.rmf.gz`, ep.validFrom, validTo);
      add('arf', ep, arfFile(rel, di, ep), `${ds.id}_${ep.id}_v${rel.id}.arf.gz`, ep.validFrom, validTo);
    }
  });

  const parameters: ParameterRow[] = detectors.flatMap((ds, di) => [
    { detector: ds.id, group: 'resolution', name: 'read noise', symbol: 'N_r', unit: 'e⁻ RMS', value: rel.readNoiseE * (di ? 0.8 : 1), uncertainty: 0.2, source: 'fit' as const },
    { detector: ds.id, group: 'resolution', name: 'Fano factor', symbol: 'F', unit: '', value: rel.fano, uncertainty: 0.003, source: 'fit' as const },
    { detector: ds.id, group: 'energy scale', name: 'gain error', symbol: 'g', unit: '', value: round(0.0004 * (di + 1) - ri * 0.0001), uncertainty: 0.0001, source: 'fit' as const },
    { detector: ds.id, group: 'energy scale', name: 'pair energy', symbol: 'w', unit: 'eV', value: PAIR_EV, uncertainty: null, source: 'input' as const },
    { detector: ds.id, group: 'stack', name: 'depletion depth', symbol: 'd', unit: 'µm', value: di ? 25 : 60, uncertainty: null, source: 'input' as const },
    { detector: ds.id, group: 'stack', name: 'contamination rate', symbol: null, unit: 'µm/yr', value: rel.contamRate, uncertainty: rel.contamRate ? 0.01 : null, source: 'fit' as const },
    { detector: ds.id, group: 'resolution', name: 'FWHM at 5.9 keV', symbol: null, unit: 'eV', value: round(fwhmEv(5.899, rel, di), 5), uncertainty: null, source: 'law' as const },
  ]);
  parameters.push({ detector: null, group: 'channels', name: 'channel width', symbol: null, unit: 'eV', value: CH_WIDTH_KEV * 1000, uncertainty: null, source: 'input' });

  const checks: Check[] = [];
  for (const p of products) {
    checks.push({ id: 'fits.checksum', title: 'FITS CHECKSUM/DATASUM', product: p.id, status: 'pass', measured: 'ok', tolerance: null, unit: null, message: 'checksums valid (invented)' });
    if (p.kind === 'rmf') {
      const worst = ri === 0 && p.detector === 'fx0' ? 1.004 : 0.9991;
      checks.push({ id: 'rmf.rows.sum-le-1', title: 'Matrix rows sum to at most 1', product: p.id, status: worst > 1.001 ? 'fail' : 'pass', measured: worst, tolerance: 1.001, unit: null, message: worst > 1.001 ? 'row 12 sums above 1 (invented)' : 'all rows ≤ 1' });
    } else {
      checks.push({ id: 'arf.positive', title: 'Effective area non-negative', product: p.id, status: 'pass', measured: 0, tolerance: 0, unit: 'cm²', message: 'no negative values' });
    }
  }
  detectors.forEach((ds) => {
    const chi = ds.fitQuality.fwhmChi2 / ds.fitQuality.fwhmDof;
    checks.push({ id: 'fit.fwhm.chi2', title: `FWHM law χ²/dof (${ds.name})`, product: null, status: chi > 2 ? 'warn' : 'pass', measured: round(chi, 3), tolerance: 2, unit: null, message: 'reduced χ² of the FWHM law fit' });
    checks.push({ id: 'fit.mnka.fwhm', title: `FWHM at Mn Kα vs Fano limit (${ds.name})`, product: null, status: 'review', measured: ds.lineFits[4].fwhmEv, tolerance: '≥ 117', unit: 'eV', message: 'check against the Fano limit by eye' });
  });
  const counts = { pass: 0, fail: 0, warn: 0, review: 0, accepted: 0 };
  for (const c of checks) counts[c.status]++;

  const site: ReleaseSite = {
    schema: 'kiln/release-site/1',
    id: rel.id,
    instrument: instrument.id,
    title: `FXS responses ${rel.id}`,
    date: rel.date,
    status: rel.status,
    validFrom: rel.validFrom,
    validTo: rel.validTo,
    supersedes: rel.supersedes,
    notesMarkdown: rel.notes,
    parameters,
    detectors,
    products,
  };
  const manifest: ReleaseManifest = {
    schema: 'kiln/release-manifest/1',
    release: rel.id,
    instrument: instrument.id,
    status: rel.status,
    date: rel.date,
    validFrom: rel.validFrom,
    validTo: rel.validTo,
    inputsSha256: sha256(Buffer.from(JSON.stringify(rel))),
    parameters: Object.fromEntries(parameters.map((p) => [`${p.detector ?? 'all'}.${p.name}`, p.value])),
    files: products.map((p) => ({ path: p.path, bytes: p.bytes, sha256: p.sha256, kind: p.kind, detector: p.detector, epoch: p.epoch, validFrom: p.validFrom, validTo: p.validTo })),
  };
  const validation: ValidationReport = { schema: 'kiln/validation/1', release: rel.id, checks };
  writeSiteDocuments(dir, splitRelease(site, checks));
  writeJson(join(dir, 'manifest.json'), manifest);
  writeJson(join(dir, 'validation.json'), validation);
  summaries.push({ id: rel.id, instrument: instrument.id, key: rel.id, supersedesKey: rel.supersedes, title: site.title, date: rel.date, status: rel.status, validFrom: rel.validFrom, validTo: rel.validTo, supersedes: rel.supersedes, checks: counts, products });
});

const index: ReleaseIndex = { schema: 'kiln/release-index/1', instruments: [instrument], releases: summaries };
writeJson(join(OUT, 'index.json'), index);
process.stdout.write(`site fixture (invented placeholder data) written to ${OUT}\n`);
