/**
 * Share of a detector's events that are Si Kα from its surface layers, at a true energy E:
 * F(E) / (QE(E) + F(E)), F from physics/stack-fluorescence.ts, QE the sensor's count of the same
 * photons. Filters and contamination multiply F and QE alike (the fluorescing layers lie behind
 * them), so the share does not depend on the date and one matrix serves every epoch.
 */
import { efficiencyBreakdown, type EfficiencyOptions } from '../physics/efficiency.ts';
import { stackFluorescence } from '../physics/stack-fluorescence.ts';
import type { DetectorStack } from '../physics/types.ts';

export function fluorescenceShareFn(stack: DetectorStack, opts: EfficiencyOptions = {}): (energyKeV: number) => number {
  const behindFilters: DetectorStack = { ...stack, filters: [], contamination: null };
  return (e) => {
    const at = Float64Array.of(e);
    const f = stackFluorescence(behindFilters, at, null)[0];
    if (f === 0) return 0;
    const qe = efficiencyBreakdown(behindFilters, at, null, opts).detectorQE[0];
    return f / (qe + f);
  };
}

/** Si Kα events per photon arriving at the first filter, for the ARF (zero unless the spec asks for it). */
export function fluorescencePerIncident(stack: DetectorStack, dateIso: string | null): (energiesKeV: Float64Array) => Float64Array {
  return (energies) => stackFluorescence(stack, energies, dateIso);
}
