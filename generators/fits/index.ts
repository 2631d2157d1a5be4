/** FITS reading and writing in pure TypeScript (Uint8Array in/out, no Node APIs). */
export * from './errors.ts';
export * from './card.ts';
export * from './header.ts';
export * from './column.ts';
export * from './bintable.ts';
export * from './checksum.ts';
export * from './hdu.ts';
export * from './file.ts';
