/** Checksum list in the format `sha256sum -c` reads ("<hex>  <name>"), from the release manifest. */
import type { APIRoute, GetStaticPaths } from 'astro';
import { loadIndex, loadManifest } from '../../../../lib/data.ts';
import { checksumLines } from '../../../../lib/downloads.ts';

export const getStaticPaths: GetStaticPaths = () => loadIndex().releases.map((r) => ({ params: { id: r.key } }));

export const GET: APIRoute = ({ params }) =>
  new Response(checksumLines(loadManifest(params.id as string).files) + '\n', { headers: { 'Content-Type': 'text/plain; charset=utf-8' } });
