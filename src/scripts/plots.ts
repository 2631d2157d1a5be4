/**
 * Client side of the plots: hover readouts, drag-to-zoom (double-click resets), log/linear toggles.
 * Reads the spec embedded beside each SVG and re-renders with the same code the build used.
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

const states = new WeakMap<HTMLElement, State>();
const MIN_DRAG_PX = 6;
const ZOOM_FACTOR = 0.5;

export function initPlots(root: ParentNode): void {
  root.querySelectorAll<HTMLElement>('figure.kplot').forEach((fig) => {
    if (states.has(fig)) return;
    const json = fig.querySelector('script.kplot-spec')?.textContent;
    const area = fig.querySelector<HTMLElement>('.kplot-area');
    if (!json || !area) return;
    const spec = unpackSpec(JSON.parse(json));
    const view = defaultView(spec);
    const tools = document.createElement('div');
    tools.className = 'kplot-tools';
    const readout = document.createElement('output');
    readout.className = 'kplot-readout';
    readout.setAttribute('aria-live', 'polite');
    readout.textContent = 'Hover for values; drag to zoom; double-click to reset.';
    const st: State = { spec, view, rendered: renderPlot(spec, view), area, readout, legend: fig.querySelector('.kplot-legend'), buttons: new Map() };
    states.set(fig, st);
    const button = (key: string, label: string, title: string, onClick: () => void, pressed?: boolean) => {
      const b = document.createElement('button');
      b.type = 'button';
      b.textContent = label;
      b.title = title;
      if (pressed !== undefined) b.setAttribute('aria-pressed', String(pressed));
      b.addEventListener('click', onClick);
      tools.append(b);
      st.buttons.set(key, b);
    };
    if (spec.x.toggle) button('xlog', 'log x', 'Switch the x axis between log and linear', () => toggle(fig, 'x'), view.xScale === 'log');
    if (spec.y.toggle) button('ylog', 'log y', 'Switch the y axis between log and linear', () => toggle(fig, 'y'), view.yScale === 'log');
    button('zin', 'zoom in', 'Zoom in on the middle of the x range', () => zoomX(fig, ZOOM_FACTOR));
    button('zout', 'zoom out', 'Zoom out in x', () => zoomX(fig, 1 / ZOOM_FACTOR));
    button('reset', 'reset', 'Reset zoom (or double-click the plot)', () => reset(fig));
    area.after(tools, readout);
    attach(fig, st);
  });
}

/** Changes the spec (e.g. which profiles are shown) and redraws. */
export function updatePlot(fig: HTMLElement, mutate: (spec: PlotSpec) => void): void {
  const st = states.get(fig);
  if (!st) return;
  mutate(st.spec);
  st.view.yDomain = null;
  redraw(st);
  if (st.legend) st.legend.innerHTML = legendHtml(st.spec.series.filter((s) => !s.hidden));
}

function redraw(st: State) {
  st.rendered = renderPlot(st.spec, st.view);
  st.area.innerHTML = st.rendered.svg;
  st.buttons.get('xlog')?.setAttribute('aria-pressed', String(st.view.xScale === 'log'));
  st.buttons.get('ylog')?.setAttribute('aria-pressed', String(st.view.yScale === 'log'));
}

function toggle(fig: HTMLElement, axis: 'x' | 'y') {
  const st = states.get(fig)!;
  if (axis === 'x') {
    st.view.xScale = st.view.xScale === 'log' ? 'linear' : 'log';
    st.view.xDomain = null;
  } else {
    st.view.yScale = st.view.yScale === 'log' ? 'linear' : 'log';
    st.view.yDomain = null;
  }
  redraw(st);
}

function reset(fig: HTMLElement) {
  const st = states.get(fig)!;
  st.view.xDomain = null;
  st.view.yDomain = null;
  redraw(st);
}

function zoomX(fig: HTMLElement, factor: number) {
  const st = states.get(fig)!;
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

function attach(fig: HTMLElement, st: State) {
  let start: [number, number] | null = null;
  const overlay = () => {
    const svg = st.area.querySelector('svg')!;
    let g = svg.querySelector<SVGGElement>('g.overlay');
    if (!g) {
      g = document.createElementNS(NS, 'g') as SVGGElement;
      g.setAttribute('class', 'overlay');
      svg.append(g);
    }
    return g;
  };
  const inside = ([px, py]: [number, number]) => {
    const f = st.rendered.frame;
    return px >= f.left && px <= f.left + f.width && py >= f.top && py <= f.top + f.height;
  };
  st.area.addEventListener('pointerdown', (ev) => {
    const p = local(st, ev);
    if (!inside(p)) return;
    start = p;
    st.area.setPointerCapture(ev.pointerId);
  });
  st.area.addEventListener('pointermove', (ev) => {
    const p = local(st, ev);
    const g = overlay();
    const f = st.rendered.frame;
    if (start) {
      const [x0, y0] = start;
      const x1 = Math.min(Math.max(p[0], f.left), f.left + f.width);
      const y1 = Math.min(Math.max(p[1], f.top), f.top + f.height);
      g.innerHTML = `<rect class="zoom-rect" x="${Math.min(x0, x1)}" y="${Math.min(y0, y1)}" width="${Math.abs(x1 - x0)}" height="${Math.abs(y1 - y0)}"/>`;
      return;
    }
    if (!inside(p)) {
      g.innerHTML = '';
      return;
    }
    hover(st, p[0], g);
  });
  st.area.addEventListener('pointerup', (ev) => {
    if (!start) return;
    const p = local(st, ev);
    const [x0, y0] = start;
    start = null;
    overlay().innerHTML = '';
    const { x, y, frame: f } = st.rendered;
    const x1 = Math.min(Math.max(p[0], f.left), f.left + f.width);
    const y1 = Math.min(Math.max(p[1], f.top), f.top + f.height);
    if (Math.abs(x1 - x0) >= MIN_DRAG_PX) st.view.xDomain = [x.invert(Math.min(x0, x1)), x.invert(Math.max(x0, x1))];
    if (Math.abs(y1 - y0) >= MIN_DRAG_PX) st.view.yDomain = [y.invert(Math.max(y0, y1)), y.invert(Math.min(y0, y1))];
    if (Math.abs(x1 - x0) >= MIN_DRAG_PX || Math.abs(y1 - y0) >= MIN_DRAG_PX) redraw(st);
  });
  st.area.addEventListener('pointerleave', () => {
    if (!start) overlay().innerHTML = '';
  });
  st.area.addEventListener('dblclick', () => reset(fig));
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
