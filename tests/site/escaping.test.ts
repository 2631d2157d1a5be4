/**
 * Text from content (detector names, release ids, labels, notes) reaches string-built SVG/HTML in
 * the plot code. Parsed back with parse5 (an implementation of the WHATWG HTML parsing algorithm,
 * the one browsers use), a hostile string must come out as the same text, never as elements or
 * attributes: `<` and `&` as character references (HTML Living Standard, "13.1.4 Character
 * references"), `"` inside attribute values. The JSON behind a plot sits in a
 * <script type="application/json"> whose `<` is written \u003c, so "</script>" cannot end it.
 */
import { parse, parseFragment } from 'parse5';
import { describe, expect, it } from 'vitest';
import { figureHtml, colourBar, legendHtml, type PlotSpec } from '../../src/lib/plot/index.ts';
import { breakableNameHtml, shaCellHtml } from '../../src/lib/downloads.ts';

const HOSTILE = `a</text></svg><img src=x onerror="alert(1)"><script>alert(2)</script><b>b</b> & "q" 'r' >`;
/** Tags the payload tries to create: none may appear. */
const INJECTED = new Set(['img', 'b']);

interface Node5 { nodeName: string; tagName?: string; attrs?: { name: string; value: string }[]; childNodes?: Node5[]; value?: string; content?: Node5 }

function walk(n: Node5, visit: (n: Node5) => void): void {
  visit(n);
  for (const c of n.childNodes ?? []) walk(c, visit);
  if (n.content) walk(n.content, visit);
}

function inspect(html: string) {
  const root = parseFragment(html) as unknown as Node5;
  const tags: string[] = [];
  const handlers: string[] = [];
  const scripts: { type: string | undefined; text: string }[] = [];
  const texts: string[] = [];
  const attrs: string[] = [];
  walk(root, (n) => {
    if (n.tagName) {
      tags.push(n.tagName);
      for (const a of n.attrs ?? []) {
        if (/^on/i.test(a.name)) handlers.push(a.name);
        attrs.push(a.value);
      }
      if (n.tagName === 'script') scripts.push({ type: n.attrs?.find((a) => a.name === 'type')?.value, text: (n.childNodes ?? []).map((c) => c.value ?? '').join('') });
    }
    if (n.nodeName === '#text' && n.value !== undefined) texts.push(n.value);
  });
  return { tags, handlers, scripts, texts, attrs };
}

/**
 * Plot ids are built from content ids, which the content schema restricts to safe ids
 * (generators/content/schema.ts safeId), and are used unescaped inside the SVG's clip-path url():
 * this fixture keeps to that contract.
 */
const spec: PlotSpec = {
  id: 'plot-hostile',
  title: HOSTILE,
  widthPx: 400,
  heightPx: 200,
  note: HOSTILE,
  x: { label: HOSTILE, unit: HOSTILE, scale: 'linear' },
  y: { label: HOSTILE, unit: 'cm²', scale: 'linear' },
  series: [
    { label: HOSTILE, colour: '#000', kind: 'line', x: [1, 2, 3], y: [1, 2, 3] },
    { label: `${HOSTILE} 2`, colour: '#111', kind: 'points', x: [1, 2], y: [2, 1], yErr: [0.1, 0.1] },
  ],
};

describe('hostile text in string-built SVG/HTML (parse5)', () => {
  it('a figure (caption, SVG title and axis titles, legend, note, id) shows the text and creates nothing', () => {
    const html = figureHtml(spec, { caption: HOSTILE });
    const r = inspect(html);
    expect(r.tags.filter((t) => INJECTED.has(t))).toEqual([]);
    expect(r.handlers).toEqual([]);
    // The only script is the plot's JSON data, and it parses back to the same strings.
    expect(r.scripts.length).toBe(1);
    expect(r.scripts[0].type).toBe('application/json');
    expect(JSON.stringify(JSON.parse(r.scripts[0].text))).toContain(JSON.stringify(HOSTILE).slice(1, -1));
    // Shown as text: caption, axis titles, legend, note all carry the string literally.
    expect(r.texts.filter((t) => t.includes(HOSTILE)).length).toBeGreaterThanOrEqual(4);
    // The SVG's accessible name is the title, as an attribute value.
    expect(r.attrs).toContain(HOSTILE);
  });

  it('the figure stays one figure inside a whole HTML document (nothing closes it early)', () => {
    const doc = parse(`<!doctype html><html><body>${figureHtml(spec, { caption: HOSTILE })}<p id="after">after</p></body></html>`) as unknown as Node5;
    const body = doc.childNodes!.find((n) => n.tagName === 'html')!.childNodes!.find((n) => n.tagName === 'body')!;
    expect(body.childNodes!.filter((n) => n.tagName).map((n) => n.tagName)).toEqual(['figure', 'p']);
  });

  it('the legend and the colour bar title carry the text, no elements', () => {
    for (const html of [legendHtml(spec.series), `<svg>${colourBar(0, 0, 10, 100, -7, 0, HOSTILE, 'g1')}</svg>`]) {
      const r = inspect(html);
      expect(r.tags.filter((t) => INJECTED.has(t) || t === 'script')).toEqual([]);
      expect(r.handlers).toEqual([]);
      expect(r.texts.some((t) => t.includes(HOSTILE))).toBe(true);
    }
  });

  it('download table cells (file names, checksums) carry the text, no elements', () => {
    for (const html of [`<table><tr><td>${breakableNameHtml(HOSTILE)}</td><td>${shaCellHtml(HOSTILE, HOSTILE)}</td></tr></table>`]) {
      const r = inspect(html);
      expect(r.tags.filter((t) => INJECTED.has(t) || t === 'script')).toEqual([]);
      expect(r.handlers).toEqual([]);
    }
  });
});
