/** A simulated spectrum: seeded Poisson draws of the folded model, as an OGIP PHA (SPECTRUM) document. */
import type { PhaData } from '../response/types.ts';
import { poissonDraws } from './random.ts';
import type { FoldingResponse } from './response.ts';

export interface SimulatedSpectrum {
  counts: Float64Array;
  pha: PhaData;
}

export interface SimulateOptions {
  expected: Float64Array;
  exposureS: number;
  seed: number;
  respfile: string;
  ancrfile: string;
  /** DATE written into the file (from the inputs, never the clock: same inputs, same bytes). */
  date: string;
  history?: string[];
}

export function simulateSpectrum(r: FoldingResponse, o: SimulateOptions): SimulatedSpectrum {
  const counts = poissonDraws(o.expected, o.seed);
  const pha: PhaData = {
    meta: {
      telescop: r.telescop,
      instrume: r.instrume,
      ...(r.detnam !== null ? { detnam: r.detnam } : {}),
      filter: r.filter,
      chantype: r.chantype,
      date: o.date,
      history: o.history,
    },
    detchans: r.detchans,
    firstChannel: r.firstChannel,
    channel: Int32Array.from({ length: r.detchans }, (_, i) => r.firstChannel + i),
    counts,
    rate: null,
    exposureS: o.exposureS,
    backscal: 1,
    areascal: 1,
    respfile: o.respfile,
    ancrfile: o.ancrfile,
    poisserr: true,
    hduclas2: 'TOTAL',
    hduclas3: 'COUNT',
  };
  return { counts, pha };
}
