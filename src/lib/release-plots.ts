/**
 * The release page's plots, built from one detector's published arrays (no physics recomputed;
 * measured centroid offsets are the published centroid minus the line energy, in eV). Pure and
 * browser-safe: the build renders the static SVG from these specs and the page's script builds
 * the same specs from the detector's documents (/data/releases/<id>/detectors/<det>/) when the reader interacts, so the page does not
 * carry the arrays twice. Series keep every published point; rendering thins them per view.
 */
import type { DetectorSite, OverlayCurve, RegionCurves, ReleaseOverlayDoc, ReleaseSite } from '../../generators/site-data/types.ts';
import { lineSeries as lineSeriesDecimated, pointSeries, roundSig, OKABE_ITO, SERIES_COLOURS, SERIES_DASHES, VIRIDIS_STOPS, type PlotSpec, type SeriesSpec } from './plot/index.ts';
import { interpolateRgbBasis } from 'd3-interpolate';

const viridis = interpolateRgbBasis([...VIRIDIS_STOPS]);

/** Every point kept: the spec is never embedded in the page, and rendering thins per view. */
const lineSeries = (label: string, x: number[], y: (number | null)[], i: number): SeriesSpec => lineSeriesDecimated(label, x, y, i, Infinity);

const W = 640;
const H = 300;
const H_RESID = 170;
const EV_PER_KEV = 1000;
/** Display floor for log probability axes: six decades below the peak. */
const PROFILE_DECADES = 6;
/** Effective area shown over four decades below its peak (the soft end falls steeply). */
const AREA_DECADES = 4;
/** Fraction of the viridis map used for profile colours: its last ~15 % is too pale on white. */
const PROFILE_COLOUR_SPAN = 0.85;
/** Room right of the last channel above the display floor, as a fraction of the shown range. */
const PROFILE_X_MARGIN = 0.04;

/** Common x range of a detector's resolution plots, so main and residual panels line up. */
function resolutionRange(det: DetectorSite): [number, number] {
  const xs = [...det.resolution.energyKeV, ...det.lineFits.map((l) => l.energyKeV)].filter((v) => v > 0);
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  return [lo / 1.05, hi * 1.05];
}

export function effectiveAreaPlot(det: DetectorSite, releaseId: string): PlotSpec {
  const series: SeriesSpec[] = det.epochs.map((ep, i) => lineSeries(`effective area, epoch ${ep.id}`, ep.energyKeV, ep.effectiveAreaCm2, i));
  const last = det.epochs[det.epochs.length - 1];
  if (last) series.push({ ...lineSeries(`mirror (epoch ${last.id})`, last.energyKeV, last.mirrorCm2, 6), dash: '4 3', colour: OKABE_ITO.black });
  return { id: `ea-${det.id}`, title: `${det.name}: effective area (release ${releaseId})`, widthPx: W, heightPx: H, x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true }, y: { label: 'Effective area', unit: 'cm²', scale: 'log', toggle: true, maxDecades: AREA_DECADES }, series };
}

/** Names of the efficiency components whose values differ between the detector's epochs. */
export function epochDependentComponents(det: DetectorSite): string[] {
  const first = det.epochs[0];
  if (!first) return [];
  const names = new Set<string>();
  for (const ep of det.epochs.slice(1))
    for (const c of ep.components) {
      const c0 = first.components.find((x) => x.name === c.name);
      if (!c0 || c0.values.length !== c.values.length || c0.values.some((v, k) => v !== c.values[k])) names.add(c.name);
    }
  return [...names];
}

/** One epoch's efficiency and its components (default: the latest epoch); the page offers the others. */
export function componentsPlot(det: DetectorSite, epochId?: string): PlotSpec {
  const ep = det.epochs.find((e) => e.id === epochId) ?? det.epochs[det.epochs.length - 1];
  const series: SeriesSpec[] = [];
  if (ep) {
    // Components cycle through the palette without black (kept for the product), each with its own
    // dash; past the sixth the dash shifts by one so no two components share colour and dash.
    const colours = SERIES_COLOURS.filter((c) => c !== OKABE_ITO.black);
    const dashes = SERIES_DASHES.filter((d) => d !== '');
    ep.components.forEach((c, i) =>
      series.push({ ...lineSeries(`${c.name} (${c.kind})`, ep.energyKeV, c.values, i), colour: colours[i % colours.length], dash: dashes[(i + Math.floor(i / colours.length)) % dashes.length] }),
    );
    series.push({ ...lineSeries('detector efficiency (product of all)', ep.energyKeV, ep.detectorQE, 0), widthPx: 2.6, dash: undefined, colour: OKABE_ITO.black });
  }
  return {
    id: `qe-${det.id}`,
    title: `${det.name}: detector efficiency and its components${ep ? `, epoch ${ep.id}` : ''}`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true },
    y: { label: 'Transmission or absorption probability', unit: '', scale: 'log', toggle: true, domain: [1e-3, 1.05] },
    series,
  };
}

/** Label of a region's model curve (one per readout node, or node × row band). */
export const regionCurveLabel = (r: RegionCurves): string => `model, node ${r.node}${r.rowBand !== null ? `, rows ${r.rowBand}` : ''}`;

/** Each region's curve after the detector's model and the measured points (colours from index 2 on). */
function regionSeries(det: DetectorSite, pick: (r: RegionCurves) => number[]): SeriesSpec[] {
  return (det.regions ?? []).map((r, i) => ({ ...lineSeries(regionCurveLabel(r), det.resolution.energyKeV, pick(r), i + 2), widthPx: 1.2 }));
}

export function fwhmPlot(det: DetectorSite): PlotSpec {
  const f = det.lineFits;
  return {
    id: `fwhm-${det.id}`,
    title: `${det.name}: FWHM vs energy`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true, domain: resolutionRange(det) },
    y: { label: 'FWHM', unit: 'eV', scale: 'linear', toggle: true },
    series: [
      lineSeries('model', det.resolution.energyKeV, det.resolution.fwhmEv, 0),
      pointSeries('measured line fits (1σ)', f.map((l) => l.energyKeV), f.map((l) => l.fwhmEv), f.map((l) => l.fwhmErrEv), 1),
      ...regionSeries(det, (r) => r.fwhmEv),
    ],
  };
}

export function fwhmResidualPlot(det: DetectorSite): PlotSpec {
  const f = det.lineFits;
  return {
    id: `fwhm-res-${det.id}`,
    title: `${det.name}: FWHM residuals, measured − model`,
    widthPx: W,
    heightPx: H_RESID,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true, domain: resolutionRange(det) },
    y: { label: 'Residual', unit: 'eV', scale: 'linear' },
    yRef: 0,
    series: [pointSeries('measured − model', f.map((l) => l.energyKeV), f.map((l) => l.fwhmResidualEv), f.map((l) => l.fwhmErrEv), 1)],
  };
}

export function centroidPlot(det: DetectorSite): PlotSpec {
  const f = det.lineFits;
  return {
    id: `cen-${det.id}`,
    title: `${det.name}: centroid offset from line energy`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true, domain: resolutionRange(det) },
    y: { label: 'Centroid − line energy', unit: 'eV', scale: 'linear' },
    yRef: 0,
    series: [
      lineSeries('model', det.resolution.energyKeV, det.resolution.centroidOffsetEv, 0),
      pointSeries('measured (1σ)', f.map((l) => l.energyKeV), f.map((l) => roundSig((l.centroidKeV - l.energyKeV) * EV_PER_KEV, 5)), f.map((l) => l.centroidErrEv), 1),
      ...regionSeries(det, (r) => r.centroidOffsetEv),
    ],
  };
}

export function centroidResidualPlot(det: DetectorSite): PlotSpec {
  const f = det.lineFits;
  return {
    id: `cen-res-${det.id}`,
    title: `${det.name}: centroid residuals, measured − model`,
    widthPx: W,
    heightPx: H_RESID,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true, domain: resolutionRange(det) },
    y: { label: 'Residual', unit: 'eV', scale: 'linear' },
    yRef: 0,
    series: [pointSeries('measured − model', f.map((l) => l.energyKeV), f.map((l) => l.centroidResidualEv), f.map((l) => l.centroidErrEv), 1)],
  };
}

/** What the tail curve is, by the model's tail source (the collection model has no tail parameter). */
export function tailModelLabel(source: DetectorSite['resolution']['tailSource']): string {
  return source === 'collection' ? 'model: partial-charge share (collection model)' : source === 'line-fits' ? 'model (interpolated line fits)' : 'model';
}
/** Label of the closure refit markers: the product's row at each line, as a line fit would measure it. */
export const REFIT_LABEL = 'matrix row refitted at the line (closure check)';
/** Log axes of fractions show four decades below the largest value. */
const FRACTION_DECADES = 4;

/** Tail fraction: the model curve, the measured line fits (1σ) and the refitted matrix rows; null for archives without them. */
export function tailPlot(det: DetectorSite): PlotSpec | null {
  const r = det.resolution;
  const f = det.lineFits.filter((l) => l.tailFraction !== undefined);
  if (!r.tailFraction || f.length === 0) return null;
  const refit = det.lineFits.filter((l) => typeof l.refitTailFraction === 'number');
  return {
    id: `tail-${det.id}`,
    title: `${det.name}: low-energy tail fraction vs energy`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true, domain: resolutionRange(det) },
    y: { label: 'Tail fraction of events', unit: '', scale: 'log', toggle: true, maxDecades: FRACTION_DECADES },
    series: [
      lineSeries(tailModelLabel(r.tailSource), r.energyKeV, r.tailFraction.map((v) => (v > 0 ? v : null)), 0),
      pointSeries('measured line fits (1σ)', f.map((l) => l.energyKeV), f.map((l) => l.tailFraction!), f.map((l) => l.tailFractionErr ?? null), 1),
      ...(refit.length ? [pointSeries(REFIT_LABEL, refit.map((l) => l.energyKeV), refit.map((l) => l.refitTailFraction!), undefined, 2)] : []),
      ...(det.regions ?? []).filter((g) => g.tailFraction).map((g, i) => ({ ...lineSeries(regionCurveLabel(g), r.energyKeV, g.tailFraction!, i + 3), widthPx: 1.2 })),
    ],
  };
}

/** Shelf fraction: model curve, measured line fits (1σ where the CSV states it) and refitted rows; null for archives without them. */
export function shelfPlot(det: DetectorSite): PlotSpec | null {
  const r = det.resolution;
  const f = det.lineFits.filter((l) => l.shelfFraction !== undefined);
  if (!r.shelfFraction || f.length === 0) return null;
  const refit = det.lineFits.filter((l) => typeof l.refitShelfFraction === 'number');
  const withErr = f.some((l) => typeof l.shelfFractionErr === 'number');
  return {
    id: `shelf-${det.id}`,
    title: `${det.name}: shelf fraction vs energy`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true, domain: resolutionRange(det) },
    y: { label: 'Shelf fraction of events', unit: '', scale: 'linear', toggle: true },
    series: [
      lineSeries('model', r.energyKeV, r.shelfFraction, 0),
      pointSeries(withErr ? 'measured line fits (1σ)' : 'measured line fits', f.map((l) => l.energyKeV), f.map((l) => l.shelfFraction!), f.map((l) => l.shelfFractionErr ?? null), 1),
      ...(refit.length ? [pointSeries(REFIT_LABEL, refit.map((l) => l.energyKeV), refit.map((l) => l.refitShelfFraction!), undefined, 2)] : []),
      ...(det.regions ?? []).filter((g) => g.shelfFraction).map((g, i) => ({ ...lineSeries(regionCurveLabel(g), r.energyKeV, g.shelfFraction!, i + 3), widthPx: 1.2 })),
    ],
  };
}

/** Label of the model line-efficiency curve (the epoch whose QE it folds). */
export const efficiencyModelLabel = (epoch: string): string => `model: QE (epoch ${epoch}) × row's detected fraction`;

/** Line efficiency: the model QE × detected-fraction curve (and each region's) against the measured efficiencies (1σ); null without a model curve. */
export function efficiencyPlot(det: DetectorSite): PlotSpec | null {
  const m = det.efficiency;
  if (!m) return null;
  const f = det.lineFits.filter((l) => l.efficiency !== null);
  return {
    id: `leff-${det.id}`,
    title: `${det.name}: line efficiency (events above threshold per photon on the detector)`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true },
    y: { label: 'Detected fraction', unit: '', scale: 'linear', toggle: true, domain: [0, 1.05] },
    series: [
      lineSeries(efficiencyModelLabel(m.epoch), m.energyKeV, m.detected, 0),
      ...(f.length ? [pointSeries('measured line efficiencies (1σ)', f.map((l) => l.energyKeV), f.map((l) => l.efficiency), f.map((l) => l.efficiencyErr ?? null), 1)] : []),
      ...(det.regions ?? []).filter((g) => g.efficiencyDetected).map((g, i) => ({ ...lineSeries(regionCurveLabel(g), m.energyKeV, g.efficiencyDetected!, i + 2), widthPx: 1.2 })),
    ],
    note: f.length ? undefined : 'No line of this detector states a measured efficiency.',
  };
}

/** The overlay plots of a release, in page order. */
export const OVERLAY_KINDS = ['fwhm', 'cen', 'tail', 'shelf', 'leff', 'ea'] as const;
export type OverlayKind = (typeof OVERLAY_KINDS)[number];

const OVERLAY_AXES: Record<OverlayKind, { title: string; y: PlotSpec['y']; yRef?: number }> = {
  fwhm: { title: 'FWHM', y: { label: 'FWHM', unit: 'eV', scale: 'linear', toggle: true } },
  cen: { title: 'centroid offset from line energy', y: { label: 'Centroid − line energy', unit: 'eV', scale: 'linear', toggle: true }, yRef: 0 },
  tail: { title: 'low-energy tail fraction', y: { label: 'Tail fraction of events', unit: '', scale: 'log', toggle: true, maxDecades: FRACTION_DECADES } },
  shelf: { title: 'shelf fraction', y: { label: 'Shelf fraction of events', unit: '', scale: 'linear', toggle: true } },
  leff: { title: 'line efficiency (QE × detected fraction)', y: { label: 'Detected fraction', unit: '', scale: 'linear', toggle: true, domain: [0, 1.05] } },
  ea: { title: 'effective area, latest epoch', y: { label: 'Effective area', unit: 'cm²', scale: 'log', toggle: true, maxDecades: AREA_DECADES } },
};

type OverlayDet = ReleaseOverlayDoc['detectors'][number];
type OverlayReg = NonNullable<OverlayDet['regions']>[number];
const DETECTOR_CURVE_PX = 2;
const REGION_CURVE_PX = 1.2;
/** Region curves take their detector's colour with a dash of their own (the first dash is solid). */
const regionDash = (k: number) => SERIES_DASHES.filter((d) => d !== '')[k % (SERIES_DASHES.length - 2)];

function overlayCurveOf(d: OverlayDet, kind: OverlayKind): OverlayCurve | undefined {
  return { fwhm: d.fwhmEv, cen: d.centroidOffsetEv, tail: d.tailFraction, shelf: d.shelfFraction, leff: d.efficiency, ea: d.effectiveAreaCm2 }[kind];
}
function overlayRegionCurveOf(g: OverlayReg, kind: OverlayKind): OverlayCurve | undefined {
  return { fwhm: g.fwhmEv, cen: g.centroidOffsetEv, tail: g.tailFraction, shelf: g.shelfFraction, leff: g.efficiency, ea: undefined }[kind];
}
/** Legend label of a detector's curve: its name, and for the efficiency and area the epoch. */
export function overlayLabel(d: OverlayDet, kind: OverlayKind): string {
  if (kind === 'ea' && d.effectiveAreaCm2) return `${d.name} (epoch ${d.effectiveAreaCm2.epoch})`;
  if (kind === 'tail' && d.tailSource === 'collection') return `${d.name} (partial-charge share)`;
  // Beside its nodes' curves, the detector's own is the whole-detector model (its matrix may not be shipped).
  if ((d.regions ?? []).some((g) => overlayRegionCurveOf(g, kind))) return `${d.name} (whole detector)`;
  return d.name;
}

/**
 * Detectors drawn in the overlay at most: three per palette colour (solid, then two dashes); more
 * curves are hard to tell apart (Kiln's choice), and the static SVG (~0.5 KB per curve and plot)
 * would outgrow the page budget.
 */
export const OVERLAY_MAX_DETECTORS = 21;
export const overlayRegionLabel = (d: OverlayDet, g: OverlayReg): string => `${d.name}, node ${g.node}${g.rowBand !== null ? `, rows ${g.rowBand}` : ''}`;

/**
 * Region curves drawn in one overlay plot at most: beyond this (e.g. four sensors of eight nodes)
 * each detector's own page shows its nodes, and the overlay keeps one curve per detector, so the
 * release page's static SVG stays within its budget and the plot stays readable.
 */
export const OVERLAY_MAX_REGION_CURVES = 16;

/**
 * One overlay plot: a curve per detector in its own colour, each region's curve in its detector's colour, dashed. Null when no detector has the curve.
 * `release` names the release in the title as the page addresses it (its key, `<instrument>~<id>` where two instruments share the id); default the document's id.
 */
export function overlayPlot(doc: ReleaseOverlayDoc, kind: OverlayKind, release: string = doc.release): PlotSpec | null {
  const a = OVERLAY_AXES[kind];
  const series: SeriesSpec[] = [];
  const regionCurves = doc.detectors.reduce((n, d) => n + (d.regions ?? []).filter((g) => overlayRegionCurveOf(g, kind)).length, 0);
  const withRegions = regionCurves <= OVERLAY_MAX_REGION_CURVES;
  const colours = SERIES_COLOURS.length;
  doc.detectors.forEach((d, i) => {
    const c = overlayCurveOf(d, kind);
    const colour = SERIES_COLOURS[i % colours];
    // Past the palette, detectors repeat a colour with a dash of their own.
    const dash = i < colours ? undefined : regionDash(Math.floor(i / colours) - 1);
    const positive = (v: number) => (a.y.scale === 'log' && v <= 0 ? null : v);
    if (c) series.push({ ...lineSeries(overlayLabel(d, kind), c.energyKeV, c.values.map(positive), i), colour, dash, widthPx: DETECTOR_CURVE_PX });
    if (withRegions)
      (d.regions ?? []).forEach((g, k) => {
        const rc = overlayRegionCurveOf(g, kind);
        if (rc) series.push({ ...lineSeries(overlayRegionLabel(d, g), rc.energyKeV, rc.values.map(positive), i), colour, dash: regionDash(k), widthPx: REGION_CURVE_PX });
      });
  });
  if (!series.length) return null;
  return {
    id: `ov-${kind}`,
    title: `All detectors: ${a.title} (release ${release})`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true },
    y: a.y,
    ...(a.yRef !== undefined ? { yRef: a.yRef } : {}),
    series,
    ...(withRegions ? {} : { note: `${regionCurves} readout-node curves are left out here (at most ${OVERLAY_MAX_REGION_CURVES} are drawn); each detector's page shows its nodes.` }),
  };
}

/** Every overlay plot the document has data for, by figure id. */
export function overlayPlots(doc: ReleaseOverlayDoc, release: string = doc.release): Map<string, PlotSpec> {
  const out = new Map<string, PlotSpec>();
  for (const k of OVERLAY_KINDS) {
    const p = overlayPlot(doc, k, release);
    if (p) out.set(p.id, p);
  }
  return out;
}

/** Indices of the profiles shown before the reader picks: lowest, middle and highest energy. */
export function defaultProfileIndices(n: number): number[] {
  return [...new Set([0, Math.floor((n - 1) / 2), n - 1])].filter((i) => i >= 0 && i < n);
}

/**
 * Default channel range of the profile plot: from the lowest channel any row reaches (the event
 * threshold cuts the rest) to a little above the highest channel any row reaches above the display
 * floor. The channel grid usually runs well past the highest photon energy; zoom out shows it all.
 */
export function profileRange(p: DetectorSite['profiles'], floor: number): [number, number] | undefined {
  const ch = p.channelEnergyKeV;
  let lo = Infinity;
  let hi = -Infinity;
  for (const row of p.rows)
    row.forEach((v, c) => {
      if (v > 0 && c < lo) lo = c;
      if (v >= floor && c > hi) hi = c;
    });
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || hi <= lo) return undefined;
  const halfBin = (ch[Math.min(lo + 1, ch.length - 1)] - ch[lo]) / 2;
  const span = ch[hi] - ch[lo];
  return [roundSig(Math.max(0, ch[lo] - halfBin), 4) as number, roundSig(ch[hi] + PROFILE_X_MARGIN * span, 4) as number];
}

/**
 * Colour of a profile at energyKeV among the published profile energies (ascending): viridis by
 * position in that list, stopped before its pale yellow end for contrast on white. Energies between
 * two published ones interpolate linearly; outside, the end colours.
 */
export function profileColour(energiesKeV: number[], energyKeV: number): string {
  const n = energiesKeV.length;
  let pos = 0;
  if (n > 1) {
    if (energyKeV >= energiesKeV[n - 1]) pos = n - 1;
    else if (energyKeV > energiesKeV[0]) {
      let k = 0;
      while (energiesKeV[k + 1] <= energyKeV) k++;
      pos = k + (energyKeV - energiesKeV[k]) / (energiesKeV[k + 1] - energiesKeV[k]);
    }
  }
  return viridis((PROFILE_COLOUR_SPAN * pos) / Math.max(1, n - 1));
}

/** Dash of the rows the reader adds from the published RMF, so they stand apart from the profiles of site.json. */
export const PICKED_PROFILE_DASH = '6 2';

export function profilePlot(det: DetectorSite): PlotSpec {
  const p = det.profiles;
  const shown = new Set(defaultProfileIndices(p.energiesKeV.length));
  let peak = 0;
  for (const row of p.rows) for (const v of row) if (v > peak) peak = v;
  const floor = peak / 10 ** PROFILE_DECADES;
  const xRange = profileRange(p, floor);
  const lastCh = p.channelEnergyKeV[p.channelEnergyKeV.length - 1];
  const series = p.rows.map((row, i) => ({
    ...lineSeries(`${roundSig(p.energiesKeV[i], 4)} keV`, p.channelEnergyKeV, row.map((v) => (v > 0 ? v : null)), i),
    step: true,
    colour: profileColour(p.energiesKeV, p.energiesKeV[i]),
    dash: undefined,
    hidden: !shown.has(i),
  }));
  return {
    id: `prof-${det.id}`,
    title: `${det.name}: line profiles (probability per channel)`,
    widthPx: W,
    heightPx: H,
    x: { label: 'Channel energy', unit: 'keV', scale: 'linear', toggle: true, domain: xRange },
    y: { label: 'Probability per channel', unit: '', scale: 'log', toggle: true, domain: peak > 0 ? [roundSig(floor, 2) as number, roundSig(peak * 1.5, 2) as number] : undefined },
    series,
    note: xRange && lastCh > xRange[1] ? `Channels ${roundSig(xRange[0], 3)}–${roundSig(xRange[1], 3)} keV shown, where the profiles lie; the channel grid runs to ${roundSig(lastCh, 4)} keV (zoom out to see it).` : undefined,
  };
}

/** Every plot of one detector's section by figure id, as the build renders them (the client rebuilds these). */
export function detectorPlots(d: DetectorSite, releaseId: string): Map<string, PlotSpec> {
  const out = new Map<string, PlotSpec>();
  for (const spec of [effectiveAreaPlot(d, releaseId), componentsPlot(d), fwhmPlot(d), fwhmResidualPlot(d), centroidPlot(d), centroidResidualPlot(d), tailPlot(d), shelfPlot(d), efficiencyPlot(d), profilePlot(d)]) if (spec) out.set(spec.id, spec);
  return out;
}

/** Every plot of a release's detectors by figure id. */
export function releasePlots(site: ReleaseSite): Map<string, PlotSpec> {
  const out = new Map<string, PlotSpec>();
  for (const d of site.detectors) for (const [k, v] of detectorPlots(d, site.id)) out.set(k, v);
  return out;
}
