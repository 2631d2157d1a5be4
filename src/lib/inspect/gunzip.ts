/** Products are published gzip-compressed; the browser's DecompressionStream unpacks them locally. */
const GZIP_MAGIC = [0x1f, 0x8b];

export const isGzip = (b: Uint8Array): boolean => b.length > 2 && b[0] === GZIP_MAGIC[0] && b[1] === GZIP_MAGIC[1];

export async function maybeGunzip(bytes: Uint8Array): Promise<Uint8Array> {
  if (!isGzip(bytes)) return bytes;
  const stream = new Blob([bytes as Uint8Array<ArrayBuffer>]).stream().pipeThrough(new DecompressionStream('gzip'));
  return new Uint8Array(await new Response(stream).arrayBuffer());
}
