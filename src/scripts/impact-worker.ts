/**
 * Web Worker of the compare page's impact section: sets the element table the absorption of the
 * reference sources reads (the newer release's spectral-elements.json), loads the spectral engine
 * on the first request and computes the impact from the two releases' published files. Nothing
 * leaves the browser; the page stays responsive while the fits run here.
 */
import { RUNTIME_TABLE_KEY } from '../../generators/physics/data/xray-runtime-key.ts';
import type { ImpactRequest } from '../lib/impact/compute.ts';
import type { SourceImpact } from '../../generators/spectrum/index.ts';

export type ImpactWorkerIn = { elementsUrl: string; request: ImpactRequest };
export type ImpactWorkerOut =
  | { type: 'progress'; phase: string; done: number; total: number }
  | { type: 'done'; impact: SourceImpact[]; ms: number }
  | { type: 'error'; message: string };

const post = (m: ImpactWorkerOut) => (self as unknown as Worker).postMessage(m);
let compute: typeof import('../lib/impact/compute.ts') | null = null;

self.onmessage = async (ev: MessageEvent<ImpactWorkerIn>) => {
  const t0 = performance.now();
  try {
    if (!compute) {
      post({ type: 'progress', phase: 'reading the element data', done: 0, total: 1 });
      const r = await fetch(ev.data.elementsUrl);
      if (!r.ok) throw new Error(`${ev.data.elementsUrl}: HTTP ${r.status}`);
      (globalThis as Record<string, unknown>)[RUNTIME_TABLE_KEY] = await r.json();
      post({ type: 'progress', phase: 'loading the spectral engine', done: 0, total: 1 });
      compute = await import('../lib/impact/compute.ts');
    }
    const impact = await compute.computeImpact(ev.data.request, (done, total, phase) => post({ type: 'progress', phase, done, total }));
    post({ type: 'done', impact, ms: performance.now() - t0 });
  } catch (e) {
    post({ type: 'error', message: e instanceof Error ? e.message : String(e) });
  }
};
