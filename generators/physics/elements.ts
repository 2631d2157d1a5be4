/**
 * Element data (H..Zn) from the xraylib-derived table in data/xray-elements.ts: symbols, atomic
 * weights, edges, K lines, K fluorescence yields and jump ratios.
 */
import { KilnInputError } from '../errors.ts';
import { XRAY_TABLE } from './data/xray-elements.ts';
import type { XrayEdgeRecord, XrayElementRecord } from './data/xray-table-types.ts';

export type ElementData = XrayElementRecord;
export type EdgeData = XrayEdgeRecord;

/** Energy range covered by the cross-section table, keV (xraylib's tables start at 0.1 keV). */
export const TABLE_ENERGY_MIN_KEV = XRAY_TABLE.energyMinKeV;
export const TABLE_ENERGY_MAX_KEV = XRAY_TABLE.energyMaxKeV;
export const TABLE_PROVENANCE = XRAY_TABLE.provenance;

const BY_SYMBOL = new Map<string, ElementData>(XRAY_TABLE.elements.map((e) => [e.symbol, e]));
const BY_Z = new Map<number, ElementData>(XRAY_TABLE.elements.map((e) => [e.z, e]));

export const ELEMENT_SYMBOLS: readonly string[] = XRAY_TABLE.elements.map((e) => e.symbol);
const RANGE_TEXT = `an element from ${ELEMENT_SYMBOLS[0]} to ${ELEMENT_SYMBOLS[ELEMENT_SYMBOLS.length - 1]} (Z ${XRAY_TABLE.elements[0].z}..${XRAY_TABLE.elements[XRAY_TABLE.elements.length - 1].z})`;

export function isKnownElement(symbol: string): boolean {
  return BY_SYMBOL.has(symbol);
}

/** Element by symbol (case-sensitive, "Si"); unknown → KilnInputError naming it. */
export function elementBySymbol(symbol: string): ElementData {
  const e = BY_SYMBOL.get(symbol);
  if (!e) throw new KilnInputError(`unknown element "${symbol}"`, { field: 'element', value: symbol, expected: RANGE_TEXT });
  return e;
}

export function elementByZ(z: number): ElementData {
  const e = BY_Z.get(z);
  if (!e) throw new KilnInputError(`no element with atomic number ${z} in the table`, { field: 'element', value: z, expected: RANGE_TEXT });
  return e;
}

/** Accepts a symbol, an atomic number or an already looked-up element. */
export function element(ref: string | number | ElementData): ElementData {
  if (typeof ref === 'string') return elementBySymbol(ref);
  if (typeof ref === 'number') return elementByZ(ref);
  return ref;
}

/** xraylib EdgeEnergy of a shell (K, L1..M5), keV, or null if the element has none. */
export function edgeEnergyKeV(ref: string | number | ElementData, shell: string): number | null {
  return element(ref).edges.find((e) => e.shell === shell)?.edgeKeV ?? null;
}

/**
 * Where the cross sections jump (the table's segment boundaries), keV, ascending. These follow
 * xraylib's cross-section data, which for light elements sit up to ~2 % away from EdgeEnergy.
 */
export function tableEdgesKeV(ref: string | number | ElementData): number[] {
  return element(ref).segments.slice(1).map((s) => s.eLoKeV);
}
