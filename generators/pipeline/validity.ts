/** Which product of a release applies on a date (browser-safe; shared with the spectral engine's pairing). */
export { arfValidOn } from '../spectrum/pairing.ts';
