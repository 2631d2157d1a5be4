export * from './gunzip.ts';
export * from './analyse.ts';
export * from './fitsjs.ts';
