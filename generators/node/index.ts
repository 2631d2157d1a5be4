/** Thin Node layers over the browser-safe core. */
export * from './fits-file.ts';
export * from './files.ts';
