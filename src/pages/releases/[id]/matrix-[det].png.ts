/** The redistribution matrix as a PNG (log colour scale), rendered at build time from matrix.log10. */
import type { APIRoute, GetStaticPaths } from 'astro';
import { loadIndex, loadSite } from '../../../lib/data.ts';
import { matrixPixels } from '../../../lib/matrix.ts';
import { encodePng } from '../../../lib/png/index.ts';

export const getStaticPaths: GetStaticPaths = () =>
  loadIndex().releases.flatMap((r) => loadSite(r.id).detectors.filter((d) => d.matrix.log10.length > 0).map((d) => ({ params: { id: r.id, det: d.id } })));

export const GET: APIRoute = ({ params }) => {
  const det = loadSite(params.id as string).detectors.find((d) => d.id === params.det)!;
  const { width, height, rgba } = matrixPixels(det.matrix);
  return new Response(new Uint8Array(encodePng(width, height, rgba)), { headers: { 'Content-Type': 'image/png' } });
};
