/**
 * The PNG encoder against outside references: CRC-32 against node:zlib's crc32 (zlib's
 * implementation of ISO 3309) and the check value of the CRC-32 catalogue ("123456789" →
 * 0xCBF43926, common practice, no source); the file layout against the PNG specification (W3C 2003:
 * signature, IHDR first, IEND last, chunk CRCs) and the pixels round-tripped through zlib's inflate.
 */
import { describe, expect, it } from 'vitest';
import { crc32 as zlibCrc32, inflateSync } from 'node:zlib';
import { crc32, encodePng } from '../../src/lib/png/index.ts';

describe('crc32', () => {
  it('matches the catalogue check value and zlib', () => {
    expect(crc32(new TextEncoder().encode('123456789'))).toBe(0xcbf43926);
    const bytes = Uint8Array.from({ length: 1000 }, (_, i) => (i * 37 + 11) & 0xff);
    expect(crc32(bytes)).toBe(zlibCrc32(bytes));
  });
});

describe('encodePng', () => {
  const w = 3;
  const h = 2;
  const rgba = Uint8Array.from({ length: w * h * 4 }, (_, i) => (i * 29) & 0xff);
  const png = encodePng(w, h, rgba);

  it('has the PNG signature and IHDR/IDAT/IEND chunks with valid CRCs', () => {
    expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
    const types: string[] = [];
    let o = 8;
    let idat = Buffer.alloc(0);
    while (o < png.length) {
      const len = png.readUInt32BE(o);
      const type = png.toString('latin1', o + 4, o + 8);
      types.push(type);
      expect(png.readUInt32BE(o + 8 + len)).toBe(zlibCrc32(png.subarray(o + 4, o + 8 + len)));
      if (type === 'IHDR') {
        expect(png.readUInt32BE(o + 8)).toBe(w);
        expect(png.readUInt32BE(o + 12)).toBe(h);
        expect(png[o + 16]).toBe(8); // bit depth
        expect(png[o + 17]).toBe(6); // colour type RGBA
      }
      if (type === 'IDAT') idat = Buffer.concat([idat, png.subarray(o + 8, o + 8 + len)]);
      o += 12 + len;
    }
    expect(types).toEqual(['IHDR', 'IDAT', 'IEND']);
    const raw = inflateSync(idat);
    expect(raw.length).toBe(h * (1 + w * 4));
    for (let r = 0; r < h; r++) {
      expect(raw[r * (1 + w * 4)]).toBe(0); // filter type None
      expect([...raw.subarray(r * (1 + w * 4) + 1, (r + 1) * (1 + w * 4))]).toEqual([...rgba.subarray(r * w * 4, (r + 1) * w * 4)]);
    }
  });

  it('rejects a pixel buffer of the wrong size', () => {
    expect(() => encodePng(2, 2, new Uint8Array(3))).toThrow(/expected 16 bytes/);
  });
});
