export * from './tables.ts';
export * from './parameters.ts';
export * from './report.ts';
