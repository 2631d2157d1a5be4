/**
 * Client side of the plots: hover readouts, drag-to-zoom (double-click resets), log/linear toggles.
 * The spec comes from JSON embedded beside the SVG, or (release pages, to keep them light) from a
 * loader that builds it from the site's own data document on the first interaction; either way
 * it is re-rendered with the same code the build used, so a reset gives back the static picture.
 */
import { defaultView, fmt4, legendHtml, renderPlot, unpackSpec, type PlotSpec, type PlotView, type Rendered } from '../lib/plot/index.ts';

interface State {
  spec: PlotSpec;
  view: PlotView;
  rendered: Rendered;
  area: HTMLElement;
  readout: HTMLElement;
  legend: HTMLElement | null;
  buttons: Map<string, HTMLButtonElement>;
}

/** Builds a figure's spec on demand (e.g. from /data/releases/<id>/site.json); null = not available. */
export type SpecLoader = (fig: HTMLElement) => Promise<PlotSpec | null>;

const states = new WeakMap<HTMLElement, State>();
const pending = new WeakMap<HTMLElement, Promise<State | null>>();
const MIN_DRAG_PX = 6;
const ZOOM_FACTOR = 0.5;
const HINT = 'Hover for values; drag to zoom; double-click to reset.';

export function initPlots(root: ParentNode, loader?: SpecLoader): void {
  root.querySelectorAll<HTMLElement>('figure.kplot').forEach((fig) => {
    if (states.has(fig) || pending.has(fig) || fig.dataset.kplotInit) return;
    const json = fig.querySelector('script.kplot-spec')?.textContent;
    const area = fig.querySelector<HTMLElement>('.kplot-area');
    if (!area || (!json && !(loader && fig.dataset.specSrc !== undefined))) return;
    fig.dataset.kplotInit = '1';
    const tools = document.createElement('div');
    tools.className = 'kplot-tools';
    const readout = document.createElement('output');
    readout.className = 'kplot-readout';
    readout.setAttribute('aria-live', 'polite');
    readout.textContent = HINT;
    const buttons = new Map<string, HTMLButtonElement>();
    const make = (spec: PlotSpec): State => {
      const view = defaultView(spec);
      const st: State = { spec, view, rendered: renderPlot(spec, view), area, readout, legend: fig.querySelector('.kplot-legend'), buttons };
      states.set(fig, st);
      syncButtons(st);
      return st;
    };
    const ready = (): Promise<State | null> => {
      const st = states.get(fig);
      if (st) return Promise.resolve(st);
      let p = pending.get(fig);
      if (!p) {
        readout.textContent = 'Loading the plot data…';
        p = loader!(fig).then(
          (spec) => {
            readout.textContent = spec ? HINT : 'Plot data not available.';
            return spec ? make(spec) : null;
          },
          (e: unknown) => {
            readout.textContent = `Could not load the plot data: ${(e as Error).message}`;
            return null;
          },
        );
        pending.set(fig, p);
      }
      return p;
    };
    if (json) make(unpackSpec(JSON.parse(json)));
    const button = (key: string, label: string, title: string, onClick: (st: State) => void, pressed?: boolean) => {
      const b = document.createElement('button');
      b.type = 'button';
      b.textContent = label;
      b.title = title;
      if (pressed !== undefined) b.setAttribute('aria-pressed', String(pressed));
      b.addEventListener('click', () => void ready().then((st) => st && onClick(st)));
      tools.append(b);
      buttons.set(key, b);
    };
    // Axis toggles are declared in the static markup (data-xlog / data-ylog) so they can be shown
    // before the spec is loaded.
    const xTog = json ? unpackSpec(JSON.parse(json)).x : null;
    const yTog = json ? unpackSpec(JSON.parse(json)).y : null;
    const hasX = xTog ? !!xTog.toggle : fig.dataset.xlog !== undefined;
    const hasY = yTog ? !!yTog.toggle : fig.dataset.ylog !== undefined;
    if (hasX) button('xlog', 'log x', 'Switch the x axis between log and linear', (st) => toggle(st, 'x'), (xTog?.scale ?? fig.dataset.xlog) === 'log');
    if (hasY) button('ylog', 'log y', 'Switch the y axis between log and linear', (st) => toggle(st, 'y'), (yTog?.scale ?? fig.dataset.ylog) === 'log');
    button('zin', 'zoom in', 'Zoom in on the middle of the x range', (st) => zoomX(st, ZOOM_FACTOR));
    button('zout', 'zoom out', 'Zoom out in x', (st) => zoomX(st, 1 / ZOOM_FACTOR));
    button('reset', 'reset', 'Reset zoom (or double-click the plot)', (st) => reset(st));
    area.after(tools, readout);
    attach(area, ready);
  });
}

/** Changes the spec (e.g. which profiles are shown) and redraws; waits for a lazy spec. */
export async function updatePlot(fig: HTMLElement, mutate: (spec: PlotSpec) => void): Promise<void> {
  const st = states.get(fig) ?? (await pending.get(fig)) ?? (await loadNow(fig));
  if (!st) return;
  mutate(st.spec);
  st.view.yDomain = null;
  redraw(st);
  if (st.legend) st.legend.innerHTML = legendHtml(st.spec.series.filter((s) => !s.hidden));
}

/** Replaces the whole spec (e.g. another epoch), keeping the reader's scale choices. */
export function replacePlot(fig: HTMLElement, spec: PlotSpec): void {
  const st = states.get(fig);
  if (!st) return;
  st.spec = spec;
  st.view.xDomain = null;
  st.view.yDomain = null;
  redraw(st);
  if (st.legend) st.legend.innerHTML = legendHtml(spec.series.filter((s) => !s.hidden));
  const cap = fig.querySelector('figcaption');
  if (cap) cap.textContent = spec.title;
}

/** Starts loading a lazy figure's spec now (e.g. when the reader opens a picker). */
export function loadNow(fig: HTMLElement): Promise<State | null> {
  const area = fig.querySelector<HTMLElement>('.kplot-area');
  area?.dispatchEvent(new Event('kplot-load'));
  return states.has(fig) ? Promise.resolve(states.get(fig)!) : (pending.get(fig) ?? Promise.resolve(null));
}

function syncButtons(st: State) {
  st.buttons.get('xlog')?.setAttribute('aria-pressed', String(st.view.xScale === 'log'));
  st.buttons.get('ylog')?.setAttribute('aria-pressed', String(st.view.yScale === 'log'));
}

function redraw(st: State) {
  st.rendered = renderPlot(st.spec, st.view);
  st.area.innerHTML = st.rendered.svg;
  syncButtons(st);
}

function toggle(st: State, axis: 'x' | 'y') {
  if (axis === 'x') {
    st.view.xScale = st.view.xScale === 'log' ? 'linear' : 'log';
    st.view.xDomain = null;
  } else {
    st.view.yScale = st.view.yScale === 'log' ? 'linear' : 'log';
    st.view.yDomain = null;
  }
  redraw(st);
}

function reset(st: State) {
  st.view.xDomain = null;
  st.view.yDomain = null;
  redraw(st);
}

function zoomX(st: State, factor: number) {
  const { x, frame } = st.rendered;
  const c = frame.left + frame.width / 2;
  const half = (frame.width / 2) * factor;
  st.view.xDomain = [x.invert(c - half), x.invert(c + half)];
  if (st.view.xScale === 'log' && st.view.xDomain[0] <= 0) st.view.xDomain = null;
  redraw(st);
}

/** Pointer position in SVG user units. */
function local(st: State, ev: PointerEvent | MouseEvent): [number, number] {
  const svg = st.area.querySelector('svg');
  const r = (svg ?? st.area).getBoundingClientRect();
  return [((ev.clientX - r.left) * st.spec.widthPx) / r.width, ((ev.clientY - r.top) * st.spec.heightPx) / r.height];
}

const NS = 'http://www.w3.org/2000/svg';

function attach(area: HTMLElement, ready: () => Promise<State | null>) {
  let start: [number, number] | null = null;
  let last: PointerEvent | null = null;
  let st: State | null = null;
  let asked = false;
  const get = (): State | null => {
    if (!st && !asked) {
      asked = true;
      void ready().then((s) => {
        st = s;
        // Replay the pointer so a reader already hovering gets a readout once the data are in.
        if (s && last) move(s, last);
      });
    }
    return st;
  };
  area.addEventListener('kplot-load', () => void get());
  area.addEventListener('pointerenter', () => void get());
  const overlay = (s: State) => {
    const svg = s.area.querySelector('svg')!;
    let g = svg.querySelector<SVGGElement>('g.overlay');
    if (!g) {
      g = document.createElementNS(NS, 'g') as SVGGElement;
      g.setAttribute('class', 'overlay');
      svg.append(g);
    }
    return g;
  };
  const inside = (s: State, [px, py]: [number, number]) => {
    const f = s.rendered.frame;
    return px >= f.left && px <= f.left + f.width && py >= f.top && py <= f.top + f.height;
  };
  const move = (s: State, ev: PointerEvent) => {
    const p = local(s, ev);
    const g = overlay(s);
    const f = s.rendered.frame;
    if (start) {
      const [x0, y0] = start;
      const x1 = Math.min(Math.max(p[0], f.left), f.left + f.width);
      const y1 = Math.min(Math.max(p[1], f.top), f.top + f.height);
      g.innerHTML = `<rect class="zoom-rect" x="${Math.min(x0, x1)}" y="${Math.min(y0, y1)}" width="${Math.abs(x1 - x0)}" height="${Math.abs(y1 - y0)}"/>`;
      return;
    }
    if (!inside(s, p)) {
      g.innerHTML = '';
      return;
    }
    hover(s, p[0], g);
  };
  area.addEventListener('pointerdown', (ev) => {
    const s = get();
    if (!s) return;
    const p = local(s, ev);
    if (!inside(s, p)) return;
    start = p;
    area.setPointerCapture(ev.pointerId);
  });
  area.addEventListener('pointermove', (ev) => {
    last = ev;
    const s = get();
    if (s) move(s, ev);
  });
  area.addEventListener('pointerup', (ev) => {
    const s = get();
    if (!start || !s) return;
    const p = local(s, ev);
    const [x0, y0] = start;
    start = null;
    overlay(s).innerHTML = '';
    const { x, y, frame: f } = s.rendered;
    const x1 = Math.min(Math.max(p[0], f.left), f.left + f.width);
    const y1 = Math.min(Math.max(p[1], f.top), f.top + f.height);
    if (Math.abs(x1 - x0) >= MIN_DRAG_PX) s.view.xDomain = [x.invert(Math.min(x0, x1)), x.invert(Math.max(x0, x1))];
    if (Math.abs(y1 - y0) >= MIN_DRAG_PX) s.view.yDomain = [y.invert(Math.max(y0, y1)), y.invert(Math.min(y0, y1))];
    if (Math.abs(x1 - x0) >= MIN_DRAG_PX || Math.abs(y1 - y0) >= MIN_DRAG_PX) redraw(s);
  });
  area.addEventListener('pointerleave', () => {
    last = null;
    if (!start && st) overlay(st).innerHTML = '';
  });
  area.addEventListener('dblclick', () => void ready().then((s) => s && reset(s)));
}

function hover(st: State, px: number, g: SVGGElement) {
  const { x, y, frame: f } = st.rendered;
  const xv = x.invert(px);
  const parts: string[] = [`${st.spec.x.label} ${fmt4(xv)} ${st.spec.x.unit}`];
  let marks = `<line class="hover-line" x1="${px}" x2="${px}" y1="${f.top}" y2="${f.top + f.height}"/>`;
  for (const s of st.spec.series) {
    if (s.hidden || !s.x.length) continue;
    let best = -1;
    let bestD = Infinity;
    for (let i = 0; i < s.x.length; i++) {
      if (s.y[i] === null) continue;
      const d = Math.abs(x(s.x[i]) - px);
      if (d < bestD) ((bestD = d), (best = i));
    }
    if (best < 0 || (s.kind === 'points' && bestD > 12)) continue;
    const yv = s.y[best] as number;
    const err = s.yErr?.[best];
    parts.push(`${s.label}: ${fmt4(yv)}${err ? ` ± ${fmt4(err)}` : ''}${st.spec.y.unit ? ` ${st.spec.y.unit}` : ''}${s.kind === 'points' ? ` at ${fmt4(s.x[best])} ${st.spec.x.unit}` : ''}`);
    const py = y(yv);
    if (Number.isFinite(py) && py >= f.top && py <= f.top + f.height) marks += `<circle cx="${x(s.x[best])}" cy="${py}" r="3.5" fill="${s.colour}"/>`;
  }
  g.innerHTML = marks;
  st.readout.textContent = parts.join(' · ');
}
