/**
 * Minimal PNG encoder (PNG specification, W3C Recommendation 2003): 8-bit RGBA, no interlace,
 * filter type 0 on every scanline, zlib via node:zlib. Build-time only (Node).
 */
import { deflateSync } from 'node:zlib';
import { crc32 } from './crc32.ts';

const SIGNATURE = Uint8Array.from([137, 80, 78, 71, 13, 10, 26, 10]);
const COLOUR_TYPE_RGBA = 6;
const BIT_DEPTH = 8;

function chunk(type: string, data: Uint8Array): Buffer {
  const out = Buffer.alloc(12 + data.length);
  out.writeUInt32BE(data.length, 0);
  out.write(type, 4, 'latin1');
  Buffer.from(data).copy(out, 8);
  out.writeUInt32BE(crc32(out.subarray(4, 8 + data.length)), 8 + data.length);
  return out;
}

/** rgba: width*height*4 bytes, rows top to bottom. */
export function encodePng(width: number, height: number, rgba: Uint8Array): Buffer {
  if (rgba.length !== width * height * 4) throw new Error(`encodePng: expected ${width * height * 4} bytes, got ${rgba.length}`);
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = BIT_DEPTH;
  ihdr[9] = COLOUR_TYPE_RGBA;
  const raw = Buffer.alloc(height * (1 + width * 4));
  for (let r = 0; r < height; r++) {
    raw[r * (1 + width * 4)] = 0;
    Buffer.from(rgba.buffer, rgba.byteOffset + r * width * 4, width * 4).copy(raw, r * (1 + width * 4) + 1);
  }
  return Buffer.concat([Buffer.from(SIGNATURE), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', new Uint8Array(0))]);
}
