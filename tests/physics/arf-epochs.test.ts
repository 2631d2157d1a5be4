/**
 * Every epoch's ARF of every demo release recomputed independently with Debian's python3-xraylib
 * (CS_Total_CP, CS_Photo_CP), numpy and scipy at the epoch's reference date, and compared with
 * the SPECRESP the build writes (pipeline/product.ts). The reference follows the stated model
 * (README "What a build produces": mirror area × filters × contamination at the epoch's reference
 * date × surface layers × sensor absorption) from its definitions, not from Kiln's code:
 * - mirror area: log-log interpolation of mirror-area.csv at the bin centres (numpy.interp on logs);
 * - a layer of thickness t: exp(−(μ/ρ)·ρ·t), μ/ρ = xraylib CS_Total_CP (Beer–Lambert);
 * - contamination thickness on a date: the instrument file's law (linear: t_ref + rate·Δt/365.25;
 *   exponential: t0 + (t∞ − t0)(1 − e^(−Δt/τ))), dates by Python's datetime;
 * - sensor: photoabsorbed share CS_Photo/CS_Total × ∫ collection(z) μ e^(−μz) dz over the partially
 *   collecting layer (collection rising linearly from its surface value to 1, scipy.integrate.quad)
 *   plus e^(−μp)(1 − e^(−μd)) for the depleted depth d.
 * Tolerance: 2e-4 of the ln ratio per unit of total optical depth plus 1e-5 (the committed table's
 * log-log interpolation is ≤ 7.4e-5 relative in μ, tests/physics/escape-inputs.test.ts; an error δ in μ
 * moves ln T by δ·τ): thin layers are held tightly, opaque ones proportionally. Measured: the
 * worst bin uses 0.47 of this allowance.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { buildDetectorProducts } from '../../generators/pipeline/product.ts';
import type { DetectorJob } from '../../generators/pipeline/job.ts';
import { demoJobs } from '../support/demo-jobs.ts';
import { runXraylibChecks, runPythonJson } from '../support/python.ts';

const REL_PER_DEPTH = 2e-4;
const REL_FLOOR = 1e-5;

const REFERENCE = String.raw`
import json, sys, math, datetime
import numpy as np
import xraylib as xrl
from scipy.integrate import quad
d = json.load(sys.stdin)
UM = 1e-4
def days(s): return datetime.date.fromisoformat(s).toordinal()
def thickness(law, date):
    if law['kind'] == 'linear':
        return max(0.0, law['thicknessAtReferenceUm'] + law['rateUmPerYear'] * (days(date) - days(law['referenceDate'])) / 365.25)
    dt = days(date) - days(law['startDate'])
    if dt < 0: return law['initialUm']
    return law['initialUm'] + (law['asymptoticUm'] - law['initialUm']) * (1 - math.exp(-dt / law['timescaleDays']))
out = []
for job in d:
    st = job['stack']
    lo = np.array(job['lo']); hi = np.array(job['hi']); e = 0.5 * (lo + hi)
    me = np.array(job['mirrorE']); ma = np.array(job['mirrorA'])
    mirror = np.exp(np.interp(np.log(e), np.log(me), np.log(ma)))
    def layer(m, t):
        mu = np.array([xrl.CS_Total_CP(m['formula'], float(x)) for x in e]) * m['densityGcm3'] * t * UM
        return np.exp(-mu), mu
    fixed = np.ones_like(e); depth = np.zeros_like(e)
    for l in st['filters'] + st['surface']:
        T, tau = layer(l['material'], l['thicknessUm']); fixed *= T; depth += tau
    s = st['sensor']; sm = s['material']
    mut = np.array([xrl.CS_Total_CP(sm['formula'], float(x)) for x in e]) * sm['densityGcm3']
    muph = np.array([xrl.CS_Photo_CP(sm['formula'], float(x)) for x in e]) * sm['densityGcm3']
    dcm = s['depletionUm'] * UM
    sensor = np.empty_like(e)
    for k in range(len(e)):
        mu = mut[k]
        if s['partial']:
            p = s['partial']['thicknessUm'] * UM; c0 = s['partial']['collectionAtSurface']
            part = quad(lambda z: (c0 + (1 - c0) * z / p) * mu * math.exp(-mu * z), 0, p, epsabs=0, epsrel=1e-12)[0]
            coll = part + math.exp(-mu * p) * -math.expm1(-mu * dcm)
        else:
            coll = -math.expm1(-mu * dcm)
        sensor[k] = muph[k] / mut[k] * coll
    depth += mut * dcm
    epochs = []
    for ep in job['epochs']:
        T = np.ones_like(e); tau = np.zeros_like(e); tc = 0.0
        if st['contamination']:
            tc = thickness(st['contamination']['law'], ep['date'])
            T, tau = layer(st['contamination']['material'], tc)
        epochs.append({'id': ep['id'], 'contaminationUm': tc, 'area': (mirror * fixed * T * sensor).tolist(), 'depth': (depth + tau).tolist()})
    out.append(epochs)
print(json.dumps(out))
`;

interface RefEpoch { id: string; contaminationUm: number; area: number[]; depth: number[] }

let jobs: { release: string; job: DetectorJob }[] = [];
let ref: RefEpoch[][];

describe.runIf(runXraylibChecks)('ARF per epoch against an xraylib recomputation at the reference date', () => {
  beforeAll(async () => {
    const all = await demoJobs();
    jobs = [...all].flatMap(([release, js]) => js.map((job) => ({ release, job })));
    const grid = (j: DetectorJob) => {
      const built = buildDetectorProducts({ ...j, release: { ...j.release, products: [] } });
      return built.epochs[0]?.arf;
    };
    ref = runPythonJson<RefEpoch[][]>(
      'xraylib',
      REFERENCE,
      jobs.map(({ job }) => {
        const arf = grid(job)!;
        return {
          stack: job.detector.stack,
          lo: Array.from(arf.energLoKeV),
          hi: Array.from(arf.energHiKeV),
          mirrorE: Array.from(job.instrument.mirror.energyKeV),
          mirrorA: Array.from(job.instrument.mirror.areaCm2),
          epochs: job.detector.epochs.map((e) => ({ id: e.id, date: e.date })),
        };
      }),
    );
  });

  it('covers every release, detector and epoch of the demo, some epochs starting before their reference date', () => {
    expect(jobs.length).toBeGreaterThanOrEqual(6);
    expect(jobs.some(({ job }) => job.detector.epochs.some((e) => e.validFrom !== e.date))).toBe(true);
    expect(ref.flat().some((e) => e.contaminationUm > 0)).toBe(true);
  });

  it('SPECRESP equals the recomputation bin by bin, within 2e-4 × optical depth + 1e-5 in ln', () => {
    jobs.forEach(({ release, job }, j) => {
      const built = buildDetectorProducts(job);
      expect(built.epochs.map((e) => e.epoch)).toEqual(ref[j].map((e) => e.id));
      built.epochs.forEach((ep, k) => {
        const r = ref[j][k];
        const a = ep.arf.specrespCm2;
        for (let i = 0; i < a.length; i++) {
          const d = Math.abs(Math.log(a[i] / r.area[i]));
          expect(d, `${release} ${job.detector.id} ${ep.epoch} bin ${i}: ${a[i]} vs xraylib ${r.area[i]} cm² (optical depth ${r.depth[i].toFixed(2)})`).toBeLessThanOrEqual(REL_PER_DEPTH * r.depth[i] + REL_FLOOR);
        }
      });
    });
  });
});
