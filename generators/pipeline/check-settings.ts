/**
 * The settings of one detector's checks that come from its release: whether failures refuse the
 * build (candidates), the tolerances the release states (with their reasons) or Kiln's defaults,
 * and the reasons that accept an extrapolated parameter. Plain data: it travels with the job.
 * Not part of the inputs fingerprint: it changes what is judged, not a product's bytes.
 */
import type { ResolvedRelease } from '../content/types.ts';
import { DEFAULT_CLOSURE_FALSE_ALARM } from '../checks/closure-joint.ts';
import { DEFAULT_EPOCH_TRANSMISSION_CHANGE } from '../checks/epoch-adequacy.ts';
import { DEFAULT_EXTRAPOLATION_FACTOR, type ProfileParameter } from '../checks/extrapolation.ts';

export interface StatedValue {
  value: number;
  /** "Kiln default" or "release: <reason>". */
  source: string;
}

export interface CheckSettings {
  /** A failed check refuses the build (candidate releases). */
  failing: boolean;
  detectors: number;
  closureFalseAlarm: StatedValue;
  epochTransmissionChange: StatedValue;
  extrapolationFactor: StatedValue;
  extrapolationReasons: Partial<Record<ProfileParameter, string>>;
}

const DEFAULT = 'Kiln default';

function pick(s: { value: number; reason: string } | undefined, fallback: number): StatedValue {
  return s ? { value: s.value, source: `stated by the release: ${s.reason}` } : { value: fallback, source: DEFAULT };
}

export function defaultCheckSettings(detectors = 1): CheckSettings {
  return {
    failing: false,
    detectors,
    closureFalseAlarm: { value: DEFAULT_CLOSURE_FALSE_ALARM, source: DEFAULT },
    epochTransmissionChange: { value: DEFAULT_EPOCH_TRANSMISSION_CHANGE, source: DEFAULT },
    extrapolationFactor: { value: DEFAULT_EXTRAPOLATION_FACTOR, source: DEFAULT },
    extrapolationReasons: {},
  };
}

export function checkSettingsOf(r: ResolvedRelease, detectorId: string): CheckSettings {
  const c = r.release.checks;
  // A stated reason names the detector; it holds for each of its configurations.
  const hardware = r.detectors.find((d) => d.id === detectorId)?.configuration?.detector ?? detectorId;
  const reasons: Partial<Record<ProfileParameter, string>> = {};
  for (const x of c?.extrapolation ?? []) {
    if (x.detector !== detectorId && x.detector !== hardware) continue;
    for (const p of x.parameter === 'all' ? (['fwhm', 'centroid', 'tail', 'shelf'] as const) : [x.parameter]) reasons[p] = x.reason;
  }
  return {
    failing: r.release.status === 'candidate',
    detectors: r.detectors.length,
    closureFalseAlarm: pick(c?.closureFalseAlarm, DEFAULT_CLOSURE_FALSE_ALARM),
    epochTransmissionChange: pick(c?.epochTransmissionChange, DEFAULT_EPOCH_TRANSMISSION_CHANGE),
    extrapolationFactor: pick(c?.extrapolationFactor, DEFAULT_EXTRAPOLATION_FACTOR),
    extrapolationReasons: reasons,
  };
}
