/**
 * Web Worker of the response page: reads the release's model document (a static file of the
 * site), puts its element table where the generator's physics reads it, loads the generator
 * chunk on the first request, and builds the case. Nothing leaves the browser.
 */
import { RUNTIME_TABLE_KEY } from '../../generators/physics/data/xray-runtime-key.ts';
import type { FormChoice, Generated } from '../lib/response/generate.ts';

export type WorkerIn = { modelUrl: string; form: FormChoice };
export type WorkerOut =
  | { type: 'progress'; phase: string; done: number; total: number }
  | { type: 'done'; result: Generated; modelSha256: string; ms: number }
  | { type: 'error'; message: string; field: string | null };

type Gen = typeof import('../lib/response/generate.ts');
let loaded: { url: string; gen: Gen; doc: ReturnType<Gen['parseModelDocument']>; sha: string } | null = null;

const post = (m: WorkerOut, transfer: Transferable[] = []) => (self as unknown as Worker).postMessage(m, transfer);

async function digestHex(bytes: Uint8Array): Promise<string> {
  const d = new Uint8Array(await crypto.subtle.digest('SHA-256', bytes as Uint8Array<ArrayBuffer>));
  return Array.from(d, (b) => b.toString(16).padStart(2, '0')).join('');
}

self.onmessage = async (ev: MessageEvent<WorkerIn>) => {
  const t0 = performance.now();
  try {
    const { modelUrl, form } = ev.data;
    if (!loaded || loaded.url !== modelUrl) {
      if (loaded) throw new Error('one worker serves one model document');
      post({ type: 'progress', phase: 'reading the model document', done: 0, total: 1 });
      const res = await fetch(modelUrl);
      if (!res.ok) throw new Error(`model document ${modelUrl}: HTTP ${res.status}`);
      const bytes = new Uint8Array(await res.arrayBuffer());
      const text = new TextDecoder().decode(bytes);
      const raw = JSON.parse(text) as { interaction?: unknown };
      (globalThis as Record<string, unknown>)[RUNTIME_TABLE_KEY] = raw.interaction;
      post({ type: 'progress', phase: 'loading the generator', done: 0, total: 1 });
      const gen: Gen = await import('../lib/response/generate.ts');
      loaded = { url: modelUrl, gen, doc: gen.parseModelDocument(text, modelUrl), sha: await digestHex(bytes) };
    }
    const { gen, doc, sha } = loaded;
    const request = gen.requestFrom(form);
    const result = await gen.generate(doc, sha, request, (done, total) => post({ type: 'progress', phase: 'building the matrix', done, total }), digestHex);
    post({ type: 'done', result, modelSha256: sha, ms: performance.now() - t0 }, result.files.map((f) => f.bytes.buffer as ArrayBuffer));
  } catch (e) {
    const where = (e as { where?: { field?: string } }).where;
    post({ type: 'error', message: e instanceof Error ? e.message + formatWhere(e) : String(e), field: where?.field ?? null });
  }
};

/** The value and what was allowed, as the CLI's one line has them. */
function formatWhere(e: Error): string {
  const w = (e as { where?: { value?: unknown; expected?: string } }).where;
  if (!w) return '';
  const got = w.value !== undefined ? `got ${typeof w.value === 'string' ? JSON.stringify(w.value) : String(w.value)}` : '';
  const exp = w.expected ? `expected ${w.expected}` : '';
  const tail = [got, exp].filter(Boolean).join('; ');
  return tail ? ` (${tail})` : '';
}
