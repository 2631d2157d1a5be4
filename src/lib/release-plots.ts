/**
 * The release page's plots, built from one detector's published arrays (no physics recomputed;
 * measured centroid offsets are the published centroid minus the line energy, in eV). Pure and
 * browser-safe: the build renders the static SVG from these specs and the page's script builds
 * the same specs from the detector's documents (/data/releases/<id>/detectors/<det>/) when the reader interacts, so the page does not
 * carry the arrays twice. Series keep every published point; rendering thins them per view.
 */
import type { DetectorSite, RegionCurves, ReleaseSite } from '../../generators/site-data/types.ts';
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
  for (const spec of [effectiveAreaPlot(d, releaseId), componentsPlot(d), fwhmPlot(d), fwhmResidualPlot(d), centroidPlot(d), centroidResidualPlot(d), profilePlot(d)]) out.set(spec.id, spec);
  return out;
}

/** Every plot of a release's detectors by figure id. */
export function releasePlots(site: ReleaseSite): Map<string, PlotSpec> {
  const out = new Map<string, PlotSpec>();
  for (const d of site.detectors) for (const [k, v] of detectorPlots(d, site.id)) out.set(k, v);
  return out;
}
