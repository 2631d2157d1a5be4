export * from './grid.ts';
export * from './ebounds.ts';
export * from './compress.ts';
export * from './params.ts';
export * from './redistribution.ts';
export * from './fluorescence-share.ts';
export * from './collection-options.ts';
export * from './valid-range.ts';
