/**
 * Elementary functions whose every bit is fixed by this code, not by the JavaScript engine, so a
 * product built in a browser equals the one built by Node byte for byte. The response core uses
 * these instead of Math.exp/log/pow/expm1/log1p (an architecture test holds it). Math.sqrt, floor,
 * abs, min and max stay: ECMAScript defines them exactly.
 */
export { exp } from './exp.ts';
export { log } from './log.ts';
export { expm1 } from './expm1.ts';
export { log1p } from './log1p.ts';
export { pow } from './pow.ts';
