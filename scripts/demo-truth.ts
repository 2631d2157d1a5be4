/**
 * The stated truth behind the demo line fits of the invented QUILLON / TARNCAM scenario.
 * scripts/make-demo-linefits.ts draws content/releases/<id>/linefits/<detector>.csv from it, and
 * tests/content/ check that fitting the CSVs recovers it. Every number here is invented for the
 * demo; only the X-ray line energies are physics (see LINE_ENERGIES_KEV).
 *
 * Where a release's model takes a parameter from a law, the truth equals the law the release
 * states (tests check that). Where the release interpolates line fits, the truth below is the
 * only place the "real" curve is written down.
 */

/**
 * Line energies, keV. Kα = radiative-rate-weighted mean of Kα1 (KL3) and Kα2 (KL2), Kβ = Kβ1,3,
 * as given by xraylib (LineEnergy, RadRate); checked against python3-xraylib in
 * tests/content/demo-lines.test.ts.
 */
export const LINE_ENERGIES_KEV = {
  'C Ka': 0.2774,
  'O Ka': 0.5249,
  'F Ka': 0.6768,
  'Al Ka': 1.4867,
  'Si Ka': 1.7398,
  'Ag La1': 2.9844,
  'Ti Ka': 4.5089,
  'Mn Ka': 5.895,
  'Mn Kb': 6.4904,
  'Ni Ka': 7.4723,
  'Cu Ka': 8.0411,
} as const;
export type LineName = keyof typeof LINE_ENERGIES_KEV;

export interface DetectorTruth {
  pairEnergyEv: number;
  fwhm: { readNoiseE: number; fano: number; sigma0Ev: number; pixelsPerEvent: { a: number; bPerKeV: number } };
  centroid: { gainError: number; offsetEv: number; chargeLossEv: number; chargeLossScaleKeV: number };
  tail: { fractionAtZero: number; fractionScaleKeV: number; tailScaleEv: number };
  shelf: { fraction: number };
  /**
   * Line efficiency: the measured detection efficiency (events in any channel per photon incident
   * on the detector) is drawn as value × the true efficiency, with a 1σ error of err × the true
   * efficiency; null where no absolute flux is known (in flight).
   */
  efficiency: { value: number; err: number } | null;
  /**
   * The true sensor has a partially collecting entrance layer: the line fits' tail fraction, tail
   * scale and shelf are then what a core + tail + shelf fit measures on the true partial-charge
   * response (generators/physics/partial-charge.ts with these values, refitted by
   * generators/checks/profile-refit.ts), not the tail law above; the CSV also gets the optional
   * tail_scale_err_eV and shelf_fraction_err columns.
   */
  partialTruth?: { thicknessUm: number; collectionAtSurface: number };
  /** Charge lost in transfer (physics/transfer-loss.ts); absent = none. */
  transferLoss?: { lossPerTransfer: number; energyIndex: number; referenceKeV: number };
}

/** A row band of the demo detectors (instrument.yaml regions.rowBands) and the lines measured in it. */
export interface BandTruth {
  id: string;
  firstTransfer: number;
  lastTransfer: number;
  lines: { line: LineName; counts: number }[];
}

export interface ReleaseTruth {
  release: string;
  seed: number;
  /** How the lines were obtained (goes into the CSV's comment header). */
  setting: string;
  /** Counts in each line (peak + tail + shelf). */
  lines: { line: LineName; counts: number }[];
  detectors: Record<string, DetectorTruth>;
  /** Lines measured per row band (the CSV's region column); the whole-detector rows span transfers 0 … wholeTransfers − 1. */
  rowBands?: BandTruth[];
  wholeTransfers?: number;
}

/** Fano factor of the demo's silicon: inside the ≈0.115–0.12 range measured for silicon (from memory). */
const FANO = 0.118;
/** Mean energy per pair in cold silicon, invented for the demo (≈3.65 eV warm, a bit more cold: Scholze, Rabus & Ulm, J. Appl. Phys. 84, 2926 (1998), from memory). */
const PAIR_EV = 3.68;

const GROUND_FI: DetectorTruth = {
  pairEnergyEv: PAIR_EV,
  fwhm: { readNoiseE: 3.5, fano: FANO, sigma0Ev: 10, pixelsPerEvent: { a: 1.2, bPerKeV: 0.35 } },
  centroid: { gainError: 0, offsetEv: 0, chargeLossEv: 5, chargeLossScaleKeV: 0.8 },
  tail: { fractionAtZero: 0.08, fractionScaleKeV: 1.0, tailScaleEv: 60 },
  shelf: { fraction: 0.005 },
  efficiency: { value: 1, err: 0.015 },
};
const GROUND_BI: DetectorTruth = {
  pairEnergyEv: PAIR_EV,
  fwhm: { readNoiseE: 4.0, fano: FANO, sigma0Ev: 15, pixelsPerEvent: { a: 1.4, bPerKeV: 0.45 } },
  // Hidden truth: release 1.0.0 interpolates the measured centroids and tails of this detector.
  centroid: { gainError: 0, offsetEv: 0, chargeLossEv: 25, chargeLossScaleKeV: 0.6 },
  tail: { fractionAtZero: 0.35, fractionScaleKeV: 0.7, tailScaleEv: 90 },
  shelf: { fraction: 0.012 },
  efficiency: { value: 1, err: 0.015 },
};

/** In flight: more noise (radiation damage, invented), a residual gain drift after PI correction. */
const FLIGHT_FI: DetectorTruth = {
  ...GROUND_FI,
  fwhm: { ...GROUND_FI.fwhm, readNoiseE: 3.9, sigma0Ev: 18 },
  centroid: { ...GROUND_FI.centroid, gainError: 0.0021 },
  efficiency: null,
};
const FLIGHT_BI: DetectorTruth = {
  ...GROUND_BI,
  fwhm: { ...GROUND_BI.fwhm, readNoiseE: 4.3, sigma0Ev: 22 },
  centroid: { ...GROUND_BI.centroid, gainError: 0.0015 },
  efficiency: null,
};

/** 2.0.0: the revised soft response (steeper, shorter FI tail; BI tail and shelf as laws). */
const REVISED_FI: DetectorTruth = {
  ...FLIGHT_FI,
  centroid: { ...FLIGHT_FI.centroid, chargeLossEv: 8, chargeLossScaleKeV: 0.5 },
  tail: { fractionAtZero: 0.12, fractionScaleKeV: 0.8, tailScaleEv: 45 },
};
const REVISED_BI: DetectorTruth = {
  ...FLIGHT_BI,
  tail: { fractionAtZero: 0.3, fractionScaleKeV: 0.55, tailScaleEv: 80 },
  shelf: { fraction: 0.015 },
  // Hidden truth of 2.0.0: the entrance layer as it really is (invented). The release states its
  // own estimate (0.05 µm, 0.80), so closure tests a model against a truth it does not equal.
  partialTruth: { thicknessUm: 0.056, collectionAtSurface: 0.78 },
};

/**
 * 2.1.0: a mild charge-transfer loss has grown in flight (none measurable on the ground), fitted
 * from the calibration source's lines in four row bands. Invented numbers.
 */
const CTI_FI: DetectorTruth = { ...REVISED_FI, transferLoss: { lossPerTransfer: 4e-6, energyIndex: 0.4, referenceKeV: 5.895 } };
const CTI_BI: DetectorTruth = { ...REVISED_BI, transferLoss: { lossPerTransfer: 3e-6, energyIndex: 0.4, referenceKeV: 5.895 } };
/** Rows of a TARNCAM frame (instrument.yaml regions.transfers) and its four row bands. */
export const DEMO_TRANSFERS = 1024;
const BAND_LINES: { line: LineName; counts: number }[] = [
  { line: 'Al Ka', counts: 8000 },
  { line: 'Ti Ka', counts: 6000 },
  { line: 'Mn Ka', counts: 40000 },
];
export const DEMO_ROW_BANDS: BandTruth[] = [
  { id: 'r1', firstTransfer: 0, lastTransfer: 255, lines: BAND_LINES },
  { id: 'r2', firstTransfer: 256, lastTransfer: 511, lines: BAND_LINES },
  { id: 'r3', firstTransfer: 512, lastTransfer: 767, lines: BAND_LINES },
  { id: 'r4', firstTransfer: 768, lastTransfer: 1023, lines: BAND_LINES },
];

export const DEMO_TRUTH: ReleaseTruth[] = [
  {
    release: '1.0.0',
    seed: 0x51ee1,
    setting: 'ground calibration, beamline with fluorescence targets (invented)',
    lines: [
      { line: 'C Ka', counts: 4000 },
      { line: 'O Ka', counts: 6000 },
      { line: 'Al Ka', counts: 20000 },
      { line: 'Si Ka', counts: 15000 },
      { line: 'Ag La1', counts: 12000 },
      { line: 'Ti Ka', counts: 20000 },
      { line: 'Mn Ka', counts: 40000 },
      { line: 'Mn Kb', counts: 8000 },
      { line: 'Ni Ka', counts: 15000 },
      { line: 'Cu Ka', counts: 15000 },
    ],
    detectors: { fi0: GROUND_FI, bi1: GROUND_BI },
  },
  {
    release: '1.1.0',
    seed: 0x51ee2,
    setting: 'in flight, onboard calibration source (Mn K) with Al and Ti fluorescence targets (invented)',
    lines: [
      { line: 'Al Ka', counts: 5000 },
      { line: 'Ti Ka', counts: 6000 },
      { line: 'Mn Ka', counts: 60000 },
      { line: 'Mn Kb', counts: 9000 },
    ],
    detectors: { fi0: FLIGHT_FI, bi1: FLIGHT_BI },
  },
  {
    release: '2.0.0',
    seed: 0x51ee3,
    setting: 'in flight, calibration source plus the soft fluorescence target (O, F, Al, Si) and the Cu K line of the camera body (invented)',
    lines: [
      { line: 'O Ka', counts: 3000 },
      { line: 'F Ka', counts: 3000 },
      { line: 'Al Ka', counts: 8000 },
      { line: 'Si Ka', counts: 4000 },
      { line: 'Ti Ka', counts: 8000 },
      { line: 'Mn Ka', counts: 90000 },
      { line: 'Mn Kb', counts: 13000 },
      { line: 'Cu Ka', counts: 6000 },
    ],
    detectors: { fi0: REVISED_FI, bi1: REVISED_BI },
  },
  {
    release: '2.1.0',
    seed: 0x51ee4,
    setting: 'in flight, calibration source in four row bands plus the soft fluorescence target (invented)',
    lines: [
      { line: 'O Ka', counts: 3000 },
      { line: 'F Ka', counts: 3000 },
      { line: 'Al Ka', counts: 8000 },
      { line: 'Si Ka', counts: 4000 },
      { line: 'Ti Ka', counts: 8000 },
      { line: 'Mn Ka', counts: 90000 },
      { line: 'Mn Kb', counts: 13000 },
    ],
    detectors: { fi0: CTI_FI, bi1: CTI_BI },
    rowBands: DEMO_ROW_BANDS,
    wholeTransfers: DEMO_TRANSFERS,
  },
];
