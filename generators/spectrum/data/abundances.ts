/**
 * Element abundances of the cold gas that absorbs a source, by number relative to hydrogen.
 *
 * Table: Anders & Grevesse (1989), "Abundances of the elements: meteoritic and solar",
 * Geochimica et Cosmochimica Acta 53, 197, photospheric values, given here as log ε
 * (log10 of the number ratio to H, plus 12).
 *
 * VALUES FROM MEMORY: written down without the paper at hand. Doubt about ±0.05 dex per element
 * (±12 %); the tests that use them state a tolerance covering it. Elements the table here leaves
 * out (beyond the cross-section table's H..Zn, or too rare to matter: Li, Be, B, Sc, V) add
 * well under 0.1 % to the absorption in 0.1–20 keV.
 */
export interface AbundanceTable {
  name: string;
  source: string;
  fromMemory: boolean;
  /** log10(n_X / n_H) + 12, by element symbol. */
  logEpsilon: Readonly<Record<string, number>>;
}

export const ANDERS_GREVESSE_1989: AbundanceTable = {
  name: 'anders-grevesse-1989',
  source: 'Anders & Grevesse (1989), Geochim. Cosmochim. Acta 53, 197, photospheric (from memory, ±0.05 dex)',
  fromMemory: true,
  logEpsilon: {
    H: 12.0,
    He: 10.99,
    C: 8.56,
    N: 8.05,
    O: 8.93,
    F: 4.56,
    Ne: 8.09,
    Na: 6.33,
    Mg: 7.58,
    Al: 6.47,
    Si: 7.55,
    P: 5.45,
    S: 7.21,
    Cl: 5.5,
    Ar: 6.56,
    K: 5.12,
    Ca: 6.36,
    Ti: 4.99,
    Cr: 5.67,
    Mn: 5.39,
    Fe: 7.67,
    Co: 4.92,
    Ni: 6.25,
    Cu: 4.21,
    Zn: 4.6,
  },
};

/** The table used when a source names none. */
export const DEFAULT_ABUNDANCES = ANDERS_GREVESSE_1989;
export const ABUNDANCE_TABLES: readonly AbundanceTable[] = [ANDERS_GREVESSE_1989];
