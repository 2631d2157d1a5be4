/** Physics of the detector stack: element data, attenuation, materials, layers, efficiency, ARF. */
export * from './types.ts';
export * from './elements.ts';
export * from './attenuation.ts';
export * from './compound.ts';
export * from './layers.ts';
export * from './contamination.ts';
export * from './detector.ts';
export * from './efficiency.ts';
export * from './arf.ts';
export * from './resolution.ts';
export * from './profile.ts';
export * from './escape.ts';
export * from './escape-inputs.ts';
export * from './interp.ts';
