/**
 * The release's overlay document: every detector's model curves (and each region's where the
 * release builds per-region products) on one page, thinned for display so the release page can
 * fetch them all whatever the number of detectors. Made from each detector's site data only;
 * pure, browser-safe. The curves keep the detector documents' 4–5 digits; only points a straight
 * line between kept neighbours draws within OVERLAY_THIN_TOLERANCE of the plot are dropped.
 */
import { OVERLAY_FILE } from './paths.ts';
import { pick, thinIndices } from './thin.ts';
import type { DetectorSite, OverlayCurve, OverlayDetector, OverlayRegion, ReleaseOverlayDoc } from './types.ts';
import type { SiteDocument } from './split.ts';

/** A thousandth of the plot's span: half a pixel on the release page's 560-pixel plot frames. */
export const OVERLAY_THIN_TOLERANCE = 1e-3;

function curve(x: readonly number[], y: readonly number[] | undefined, yLog = false): OverlayCurve | undefined {
  if (!y || y.length !== x.length || !x.length) return undefined;
  const keep = thinIndices(x, [y], { tolerance: OVERLAY_THIN_TOLERANCE, yLog });
  return { energyKeV: pick(x, keep), values: pick(y, keep) };
}

/** Line-profile curves on one energy grid (a detector's or a region's): FWHM, centroid, tail and shelf when present. */
function profileCurves(energyKeV: readonly number[], p: { fwhmEv: readonly number[]; centroidOffsetEv: readonly number[]; tailFraction?: readonly number[]; shelfFraction?: readonly number[] }) {
  const tail = curve(energyKeV, p.tailFraction, true);
  const shelf = curve(energyKeV, p.shelfFraction);
  return {
    fwhmEv: curve(energyKeV, p.fwhmEv)!,
    centroidOffsetEv: curve(energyKeV, p.centroidOffsetEv)!,
    ...(tail ? { tailFraction: tail } : {}),
    ...(shelf ? { shelfFraction: shelf } : {}),
  };
}

/** One detector's entry: its model curves, its latest epoch's effective area, its regions' curves. */
export function overlayDetector(d: DetectorSite): OverlayDetector {
  const r = d.resolution;
  const last = d.epochs[d.epochs.length - 1];
  const area = last ? curve(last.energyKeV, last.effectiveAreaCm2, true) : undefined;
  const eff = d.efficiency ? curve(d.efficiency.energyKeV, d.efficiency.detected) : undefined;
  const regions: OverlayRegion[] = (d.regions ?? []).map((g) => {
    const effR = d.efficiency && g.efficiencyDetected ? curve(d.efficiency.energyKeV, g.efficiencyDetected) : undefined;
    return {
      label: g.label,
      node: g.node,
      rowBand: g.rowBand,
      ...profileCurves(r.energyKeV, g),
      ...(effR ? { efficiency: effR } : {}),
    };
  });
  return {
    id: d.id,
    name: d.name,
    kind: d.kind,
    ...profileCurves(r.energyKeV, r),
    ...(r.tailSource ? { tailSource: r.tailSource } : {}),
    ...(eff ? { efficiency: { ...eff, epoch: d.efficiency!.epoch } } : {}),
    ...(area ? { effectiveAreaCm2: { ...area, epoch: last.id } } : {}),
    ...(regions.length ? { regions } : {}),
  };
}

export function overlayDocument(releaseId: string, detectors: OverlayDetector[]): SiteDocument {
  const doc: ReleaseOverlayDoc = { schema: 'kiln/release-overlay/1', release: releaseId, detectors };
  return { path: OVERLAY_FILE, doc };
}
