export * from './tables.ts';
export * from './parameters.ts';
export * from './report.ts';
export * from './impact-text.ts';
