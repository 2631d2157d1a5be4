/** OGIP response and spectrum products (RMF, ARF, PHA) to and from FITS, browser-safe. */
export { writeRmf, readRmf, isMatrixHeader, RMF_MATRIX_HDUVERS, RMF_EBOUNDS_HDUVERS, type RmfHeaders } from './rmf.ts';
export { writeArf, readArf, isArfHeader, ARF_HDUVERS } from './arf.ts';
export { writePha, readPha, isPhaHeader, PHA_HDUVERS } from './pha.ts';
export { identifyProduct, type OgipProduct } from './identify.ts';
export { OGIP_DEFAULT_FIRST_CHANNEL, DEFAULT_CREATOR } from './common.ts';
