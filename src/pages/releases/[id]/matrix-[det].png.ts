/** The redistribution matrix as a PNG (log colour scale), rendered at build time from the detector's matrix.json. */
import type { APIRoute, GetStaticPaths } from 'astro';
import { loadDetector, loadIndex, loadSummary } from '../../../lib/data.ts';
import { matrixPixels } from '../../../lib/matrix.ts';
import { encodePng } from '../../../lib/png/index.ts';

export const getStaticPaths: GetStaticPaths = () =>
  loadIndex().releases.flatMap((r) => loadSummary(r.key).detectors.map((d) => ({ params: { id: r.key, det: d.id } })));

export const GET: APIRoute = ({ params }) => {
  const { matrix } = loadDetector(params.id as string, params.det as string).site;
  // An empty matrix picture still gets a 1 × 1 transparent PNG, so every detector has its file.
  const { width, height, rgba } = matrix.log10.length ? matrixPixels(matrix) : { width: 1, height: 1, rgba: new Uint8Array(4) };
  return new Response(new Uint8Array(encodePng(width, height, rgba)), { headers: { 'Content-Type': 'image/png' } });
};
