/**
 * Plans epochs for a contamination law so that each passes the epoch-adequacy check
 * (generators/checks/epoch-adequacy.ts) at a tolerance: from a start date, each epoch is made as
 * long as its reference date (chosen to balance both ends) allows; the last one is open-ended when
 * the law's limit is within the tolerance. Prints YAML for release.yaml `epochs:`.
 *   node --import tsx scripts/plan-epochs.ts --tolerance 0.1 --from 2026-05-12 --instrument content/instruments/quillon-tarncam/instrument.yaml
 * The contamination is the demo's in-flight deposit (content/releases/1.1.0/release.yaml).
 */
import { epochAdequacyChecks } from '../generators/checks/epoch-adequacy.ts';
import { isoDateToDays } from '../generators/physics/index.ts';
import type { ContaminationSpec } from '../generators/physics/types.ts';
import { energyGrid } from '../generators/response/index.ts';
import { binCentresKeV } from '../generators/physics/index.ts';

const DEMO_DEPOSIT: ContaminationSpec = {
  name: 'hydrocarbon-deposit',
  material: { formula: 'C8H8', densityGcm3: 1.05 },
  law: { kind: 'exponential', startDate: '2026-05-12', initialUm: 0, asymptoticUm: 0.45, timescaleDays: 420 },
};
const DEMO_GRID = { minKeV: 0.2, maxKeV: 12, bins: 800, spacing: 'linear' as const };

const iso = (d: number) => new Date(d * 86_400_000).toISOString().slice(0, 10);

export function planEpochs(c: ContaminationSpec, fromIso: string, tolerance: number, energies: Float64Array): { validFrom: string; validTo: string | null; date: string }[] {
  const ok = (from: number, to: number | null, ref: number) =>
    epochAdequacyChecks(c, [{ id: 'x', date: iso(ref), validFrom: iso(from), validTo: to === null ? null : iso(to) }], energies, tolerance, { product: null, failing: true, source: '' })[0].status === 'pass';
  // best reference: the day between from and to where the check passes, found by trying a spread
  const refFor = (from: number, to: number | null): number | null => {
    const end = to ?? from + 36525;
    for (let k = 1; k < 64; k++) {
      const ref = Math.round(from + ((end - from) * k) / 64);
      if (ref < end && ok(from, to, ref)) return ref;
    }
    return null;
  };
  const out: { validFrom: string; validTo: string | null; date: string }[] = [];
  let from = isoDateToDays(fromIso);
  for (let n = 0; n < 100; n++) {
    const open = refFor(from, null);
    if (open !== null) {
      out.push({ validFrom: iso(from), validTo: null, date: iso(open) });
      return out;
    }
    let lo = from + 2;
    let hi = from + 4;
    while (refFor(from, hi) !== null) hi = from + 2 * (hi - from);
    while (hi - lo > 1) {
      const mid = Math.floor((lo + hi) / 2);
      if (refFor(from, mid) !== null) lo = mid;
      else hi = mid;
    }
    out.push({ validFrom: iso(from), validTo: iso(lo), date: iso(refFor(from, lo)!) });
    from = lo;
  }
  throw new Error('no open-ended epoch within 100 epochs');
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string, d: string) => {
    const i = process.argv.indexOf(name);
    return i > 0 ? process.argv[i + 1] : d;
  };
  const bins = energyGrid(DEMO_GRID);
  const epochs = planEpochs(DEMO_DEPOSIT, arg('--from', '2026-05-12'), Number(arg('--tolerance', '0.03')), binCentresKeV(bins.loKeV, bins.hiKeV));
  process.stdout.write('epochs:\n');
  epochs.forEach((e, i) =>
    process.stdout.write(`  - id: e${i + 1}\n    date: ${e.date}\n    validFrom: ${e.validFrom}\n    validTo: ${e.validTo ?? 'null'}\n`),
  );
}
