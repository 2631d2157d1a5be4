/**
 * The build's probability accounting (pipeline/validate.ts, "model.rows.accounted" and
 * "model.compression.dropped") on the demo's real products, on both sides of its limits. The law:
 * a photon that reaches the detector is counted once, below the threshold, outside the channels or
 * in the dropped elements, so row + losses = 1 (conservation of probability); DEVELOPERS.md states
 * 1e-6, plus the float32 rounding of the stored elements (2^-24 each, FITS TFORM E).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { buildDetectorProducts, type DetectorProducts } from '../../generators/pipeline/product.ts';
import { validateDetector } from '../../generators/pipeline/validate.ts';
import type { DetectorJob } from '../../generators/pipeline/job.ts';
import { demoJobs } from '../support/demo-jobs.ts';

/** Written out, not imported: loosening the limit in the code must fail here (DEVELOPERS.md "Response model"). */
const ACCOUNTING_TOLERANCE = 1e-6;
const STORAGE_SLACK = 4 * 2 ** -24;
/** The default cut drops at most 1e-5 per row (DEVELOPERS.md "Response model"). */
const DROP_BUDGET = 1e-5;

let job: DetectorJob;
let built: DetectorProducts;

const statusOf = (b: DetectorProducts, id: string) => {
  const c = validateDetector(job, b).find((x) => x.id === id);
  if (!c) throw new Error(`no check ${id}`);
  return c.status;
};

/** A copy of the products whose row `i` has row sum + losses − 1 = `excess` (through its outside loss). */
function withExcess(i: number, excess: number): DetectorProducts {
  const l = built.redistribution.losses;
  const losses = { thresholdLoss: l.thresholdLoss.slice(), outsideLoss: l.outsideLoss.slice(), droppedByCut: l.droppedByCut.slice() };
  let s = 0;
  for (const v of built.redistribution.rmf.rows[i].matrix) s += v;
  losses.outsideLoss[i] = 1 + excess - s - losses.thresholdLoss[i] - losses.droppedByCut[i];
  return { ...built, redistribution: { ...built.redistribution, losses } };
}

describe('build probability accounting on the demo products', () => {
  beforeAll(async () => {
    const jobs = await demoJobs();
    const newest = [...jobs.keys()].sort().at(-1)!;
    job = jobs.get(newest)![0];
    built = buildDetectorProducts(job);
  });

  it('the demo products pass as built', () => {
    expect(statusOf(built, 'model.rows.accounted')).toBe('pass');
    expect(statusOf(built, 'model.compression.dropped')).toBe('pass');
  });

  it('a row off by 0.99 of the limit passes; off by 1.01 of it (either sign) fails', () => {
    const limit = ACCOUNTING_TOLERANCE + STORAGE_SLACK;
    const i = Math.floor(built.redistribution.rmf.rows.length / 2);
    for (const sign of [1, -1]) {
      expect(statusOf(withExcess(i, sign * 0.99 * limit), 'model.rows.accounted')).toBe('pass');
      expect(statusOf(withExcess(i, sign * 1.01 * limit), 'model.rows.accounted')).toBe('fail');
    }
    // The first and last rows count too.
    expect(statusOf(withExcess(0, 1.01 * limit), 'model.rows.accounted')).toBe('fail');
    expect(statusOf(withExcess(built.redistribution.rmf.rows.length - 1, -1.01 * limit), 'model.rows.accounted')).toBe('fail');
  });

  it('a row dropping 0.99 of the cut budget passes, 1.01 of it fails', () => {
    const at = (dropped: number) => {
      const l = built.redistribution.losses;
      const losses = { ...l, droppedByCut: l.droppedByCut.slice() };
      losses.droppedByCut[3] = dropped;
      return { ...built, redistribution: { ...built.redistribution, losses } };
    };
    expect(statusOf(at(0.99 * DROP_BUDGET), 'model.compression.dropped')).toBe('pass');
    expect(statusOf(at(1.01 * DROP_BUDGET), 'model.compression.dropped')).toBe('fail');
  });
});
