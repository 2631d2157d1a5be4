/**
 * The generator the response page's worker loads on demand: a case from the model document
 * (generators/model/case.ts, the code `kiln response` runs), then every product check on the
 * bytes it made, and the curves the page plots. Runs inside the Web Worker only.
 */
import { buildCase, type CaseRequest } from '../../../generators/model/case.ts';
import { parseModelDocument } from '../../../generators/model/parse.ts';
import { checkFile } from '../../../generators/checks/check-file.ts';
import type { ModelDocument } from '../../../generators/model/types.ts';
import { parseEnergyEdges, parseEnergyRange, parseWhole } from '../../../generators/model/request.ts';
import type { Check } from '../../../generators/site-data/types.ts';

export interface GeneratedFile {
  kind: 'rmf' | 'arf' | 'rsp';
  name: string;
  bytes: Uint8Array;
  sha256: string;
}

export interface Generated {
  files: GeneratedFile[];
  region: string;
  epoch: string;
  checks: Check[];
  /** ARF: bin centres (keV) and effective area (cm²). */
  area: { energyKeV: number[]; areaCm2: number[] };
  /** A few matrix rows: true energy, channel energies (keV) and probability per channel. */
  rows: { energyKeV: number; channelKeV: number[]; probability: number[] }[];
  channels: number;
  energyBins: number;
}

export { parseModelDocument };

/** The page's controls as text, exactly as the reader typed them. */
export interface FormChoice {
  detector: string;
  /** '' = the whole detector. */
  node: string;
  /** '' = all rows. */
  row: string;
  date: string;
  energies: 'model' | 'range' | 'edges';
  rangeText: string;
  edgesText: string;
  group: string;
  rsp: boolean;
}

/** The case request from the controls (the same text rules as `kiln response`). */
export function requestFrom(f: FormChoice): CaseRequest {
  return {
    detector: f.detector,
    node: f.node === '' ? null : f.node,
    row: f.row.trim() === '' ? null : parseWhole(f.row, 'row', 0, 'a row number'),
    date: f.date,
    energies: f.energies === 'model' ? { kind: 'model' } : f.energies === 'range' ? parseEnergyRange(f.rangeText) : parseEnergyEdges(f.edgesText),
    group: parseWhole(f.group, 'group', 1, 'a channel grouping'),
    rsp: f.rsp,
  };
}

/** Fractions of the energy grid at which rows are drawn. */
const ROW_FRACTIONS = [0.1, 0.35, 0.7];

export async function generate(doc: ModelDocument, sha: string, req: CaseRequest, onProgress: (done: number, total: number) => void, digest: (b: Uint8Array) => Promise<string>): Promise<Generated> {
  const c0 = buildCase(doc, sha, req, onProgress);
  const c = { ...c0, rmf: c0.rmf! };
  const checks: Check[] = [];
  for (const f of c.files) checks.push(...checkFile(f.fits, f.name, { product: f.name, rmf: f.kind === 'arf' ? c.rmf : undefined }).checks);
  const lo = c.arf.energLoKeV;
  const hi = c.arf.energHiKeV;
  const eb = c.rmf.ebounds;
  const rows = ROW_FRACTIONS.map((q) => {
    const i = Math.min(lo.length - 1, Math.floor(q * lo.length));
    const row = c.rmf.rows[i];
    const p = new Float64Array(c.rmf.detchans);
    let k = 0;
    for (let g = 0; g < row.fChan.length; g++) for (let j = 0; j < row.nChan[g]; j++) p[row.fChan[g] - c.rmf.firstChannel + j] = row.matrix[k++];
    return { energyKeV: (lo[i] + hi[i]) / 2, channelKeV: Array.from(eb.eMinKeV, (x, j) => (x + eb.eMaxKeV[j]) / 2), probability: Array.from(p) };
  });
  const files: GeneratedFile[] = [];
  for (const f of c.files) files.push({ kind: f.kind, name: f.name, bytes: f.fits, sha256: await digest(f.fits) });
  return {
    files,
    region: c.region.label,
    epoch: c.epoch,
    checks,
    area: { energyKeV: Array.from(lo, (x, i) => (x + hi[i]) / 2), areaCm2: Array.from(c.arf.specrespCm2) },
    rows,
    channels: c.rmf.detchans,
    energyBins: lo.length,
  };
}
