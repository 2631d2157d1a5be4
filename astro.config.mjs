// Kiln site: static pages from the build's JSON documents (generators/site-data/types.ts).
// DIR = KILN_OUT or .kiln/out. No external requests: no web fonts, no CDNs, no telemetry.
import { defineConfig } from 'astro/config';
import { cpSync, existsSync, mkdirSync, readdirSync, copyFileSync } from 'node:fs';
import { basename, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

process.env.ASTRO_TELEMETRY_DISABLED = '1';

const DIR = resolve(process.env.KILN_OUT ?? '.kiln/out');
const DOCS = ['overlay.json', 'manifest.json', 'validation.json', 'summary.json', 'spectral.json', 'spectral-elements.json', 'model.json', 'model.schema.json', 'reexamined.json'];
/** Split per-detector documents the pages fetch; matrix.json only feeds the build's PNG. */
const BUILD_ONLY = new Set(['matrix.json']);

/** Copies the products and the machine-readable JSON documents next to the pages. */
function kilnData() {
  return {
    name: 'kiln-data',
    hooks: {
      'astro:config:setup': () => {
        if (!existsSync(join(DIR, 'index.json')))
          throw new Error(`kiln site: no build output at ${DIR} (index.json missing). Run \`kiln build\` first, or set KILN_OUT.`);
      },
      'astro:build:done': ({ dir, logger }) => {
        const dist = fileURLToPath(dir);
        mkdirSync(join(dist, 'data', 'releases'), { recursive: true });
        copyFileSync(join(DIR, 'index.json'), join(dist, 'data', 'index.json'));
        if (existsSync(join(DIR, 'finder'))) cpSync(join(DIR, 'finder'), join(dist, 'data', 'finder'), { recursive: true });
        const rels = readdirSync(join(DIR, 'releases'), { withFileTypes: true }).filter((d) => d.isDirectory());
        let files = 0;
        for (const r of rels) {
          const src = join(DIR, 'releases', r.name);
          const dataDir = join(dist, 'data', 'releases', r.name);
          mkdirSync(dataDir, { recursive: true });
          for (const doc of DOCS) if (existsSync(join(src, doc))) copyFileSync(join(src, doc), join(dataDir, doc));
          if (existsSync(join(src, 'detectors')))
            cpSync(join(src, 'detectors'), join(dataDir, 'detectors'), { recursive: true, filter: (p) => !BUILD_ONLY.has(basename(p)) });
          if (existsSync(join(src, 'files'))) {
            const dest = join(dist, 'releases', r.name, 'files');
            mkdirSync(dest, { recursive: true });
            cpSync(join(src, 'files'), dest, { recursive: true });
            files += readdirSync(join(src, 'files')).length;
          }
        }
        logger.info(`copied ${files} product files and the JSON documents of ${rels.length} releases from ${DIR}`);
      },
    },
  };
}

/**
 * The response page's worker reads element data from the model document (generators/physics/data/
 * xray-elements-runtime.ts) instead of bundling the whole table: swapped in for worker bundles only.
 */
function workerElementTable() {
  const runtime = fileURLToPath(new URL('./generators/physics/data/xray-elements-runtime.ts', import.meta.url));
  return {
    name: 'kiln-worker-element-table',
    enforce: 'pre',
    resolveId(source) {
      if (source.endsWith('/xray-elements.ts')) return runtime;
      return null;
    },
  };
}

export default defineConfig({
  vite: { worker: { format: 'es', plugins: () => [workerElementTable()] } },
  output: 'static',
  outDir: 'dist',
  base: '/',
  trailingSlash: 'ignore',
  build: { format: 'directory', inlineStylesheets: 'never' },
  devToolbar: { enabled: false },
  prefetch: false,
  integrations: [kilnData()],
});
