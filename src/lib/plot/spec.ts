/**
 * The serialisable description of a plot: rendered to SVG at build time and embedded as JSON so
 * the client script can re-render it (zoom, log/linear) with the same code.
 */
export type ScaleKind = 'linear' | 'log';

export interface AxisSpec {
  /** Quantity name, e.g. "Energy". */
  label: string;
  /** Unit shown in brackets, e.g. "keV"; '' for dimensionless. */
  unit: string;
  scale: ScaleKind;
  /** Fixed domain; computed from the data when absent. */
  domain?: [number, number];
  /** On a log axis computed from the data, show at most this many decades below the maximum. */
  maxDecades?: number;
  /** Whether the reader may switch this axis to the other scale. */
  toggle?: boolean;
}

export interface SeriesSpec {
  label: string;
  colour: string;
  /** "line" joins points; "points" draws markers (with optional error bars). */
  kind: 'line' | 'points';
  x: number[];
  /** null = no value (a gap). */
  y: (number | null)[];
  /** Symmetric 1σ error on y, same units. */
  yErr?: (number | null)[];
  dash?: string;
  widthPx?: number;
  /** Draw as steps centred on x (channel histograms). */
  step?: boolean;
  /** Not drawn (the reader can switch it on, e.g. line profiles). */
  hidden?: boolean;
}

export interface PlotSpec {
  id: string;
  title: string;
  widthPx: number;
  heightPx: number;
  x: AxisSpec;
  y: AxisSpec;
  series: SeriesSpec[];
  /** Horizontal reference line (e.g. 0 for residuals, 1 for ratios). */
  yRef?: number;
  /** Short text under the plot, e.g. how the data were reduced for display. */
  note?: string;
}

/** What the reader changed: scales and zoom window. */
export interface PlotView {
  xScale: ScaleKind;
  yScale: ScaleKind;
  xDomain: [number, number] | null;
  yDomain: [number, number] | null;
}

export const defaultView = (spec: PlotSpec): PlotView => ({
  xScale: spec.x.scale,
  yScale: spec.y.scale,
  xDomain: null,
  yDomain: null,
});
