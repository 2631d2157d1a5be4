export { encodePng } from './encode.ts';
export { crc32 } from './crc32.ts';
