export * from './read.ts';
export * from './row.ts';
