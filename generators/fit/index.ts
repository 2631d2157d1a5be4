export * from './lsq.ts';
export * from './linalg.ts';
export * from './fwhm-law.ts';
export * from './centroid-law.ts';
export * from './transfer-loss.ts';
