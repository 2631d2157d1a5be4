/**
 * Plans epochs for a contamination law so that each passes the epoch-adequacy check
 * (generators/checks/epoch-adequacy.ts) at a tolerance: from a start date, each epoch is made as
 * long as a reference date inside it allows; with --to the last epoch ends on that date (a release
 * valid to then), otherwise the last one is open-ended once the law's limit is within the
 * tolerance. Prints YAML for release.yaml `epochs:`.
 *   node --import tsx scripts/plan-epochs.ts --tolerance 0.15 --from 2026-05-12 [--to 2028-11-01]
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

export function planEpochs(c: ContaminationSpec, fromIso: string, tolerance: number, energies: Float64Array, toIso: string | null = null): { validFrom: string; validTo: string | null; date: string }[] {
  const ok = (from: number, to: number | null, ref: number) =>
    epochAdequacyChecks(c, [{ id: 'x', date: iso(ref), validFrom: iso(from), validTo: to === null ? null : iso(to) }], energies, tolerance, { product: null, failing: true, source: '' })[0].status === 'pass';
  // reference date: of 63 days spread across the epoch, the passing one nearest its middle
  const SPREAD = 64;
  const order = Array.from({ length: SPREAD - 1 }, (_, i) => i + 1).sort((a, b) => Math.abs(a - SPREAD / 2) - Math.abs(b - SPREAD / 2));
  const refFor = (from: number, to: number | null): number | null => {
    const end = to ?? from + 36525;
    for (const k of order) {
      const ref = Math.round(from + ((end - from) * k) / SPREAD);
      if (ref < end && ok(from, to, ref)) return ref;
    }
    return null;
  };
  const out: { validFrom: string; validTo: string | null; date: string }[] = [];
  let from = isoDateToDays(fromIso);
  const end = toIso === null ? null : isoDateToDays(toIso);
  for (let n = 0; n < 100; n++) {
    // a release valid to a date: the last epoch ends there as soon as one epoch can reach it
    if (end !== null) {
      const last = refFor(from, end);
      if (last !== null) {
        out.push({ validFrom: iso(from), validTo: iso(end), date: iso(last) });
        return out;
      }
    }
    const open = end === null ? refFor(from, null) : null;
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
  throw new Error('no plan within 100 epochs');
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string, d: string) => {
    const i = process.argv.indexOf(name);
    return i > 0 ? process.argv[i + 1] : d;
  };
  const bins = energyGrid(DEMO_GRID);
  const to = arg('--to', '');
  const epochs = planEpochs(DEMO_DEPOSIT, arg('--from', '2026-05-12'), Number(arg('--tolerance', '0.03')), binCentresKeV(bins.loKeV, bins.hiKeV), to === '' ? null : to);
  process.stdout.write('epochs:\n');
  epochs.forEach((e, i) =>
    process.stdout.write(`  - id: e${i + 1}\n    date: ${e.date}\n    validFrom: ${e.validFrom}\n    validTo: ${e.validTo ?? 'null'}\n`),
  );
}
