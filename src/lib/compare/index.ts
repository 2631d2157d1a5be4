export * from './interp.ts';
export * from './params.ts';
export * from './checks.ts';
export * from './render.ts';
export * from './epochs.ts';
export * from './side.ts';
