/**
 * Where each split site document lives, relative to a release directory (the build's
 * `releases/<id>/`, the site's `/data/releases/<id>/`). Ids are safe path parts (content schema),
 * and every detector has its own directory, so no detector id can collide with another's files.
 */
export const SUMMARY_FILE = 'summary.json';
/** Archived releases: today's checks on their bytes (ReexaminationDoc). */
export const REEXAMINED_FILE = 'reexamined.json';
/** Every detector's curves of a release, thinned for the release page's overlay plots (ReleaseOverlayDoc). */
export const OVERLAY_FILE = 'overlay.json';

export const detectorDir = (detector: string): string => `detectors/${detector}`;
export const modelPath = (detector: string): string => `${detectorDir(detector)}/model.json`;
export const profilesPath = (detector: string): string => `${detectorDir(detector)}/profiles.json`;
export const matrixPath = (detector: string): string => `${detectorDir(detector)}/matrix.json`;
export const checksPath = (detector: string): string => `${detectorDir(detector)}/checks.json`;
export const supplementPath = (detector: string): string => `${detectorDir(detector)}/supplement.json`;
export const areaPath = (detector: string): string => `${detectorDir(detector)}/area.json`;
export const epochPath = (detector: string, epoch: string): string => `${detectorDir(detector)}/epochs/${epoch}.json`;

/** URL base of a release's documents on the site. */
export const siteDataBase = (releaseId: string): string => `/data/releases/${encodeURIComponent(releaseId)}/`;

/** The finder's manifest of a detector entry, relative to the build output (the site's /data/). */
export const finderPath = (instrument: string, detector: string): string => `finder/${instrument}/${detector}.json`;
/** Chunk k of that manifest (its own directory: no detector id can collide with a chunk). */
export const finderChunkPath = (instrument: string, detector: string, chunk: number): string => `finder/${instrument}/${detector}/${chunk}.json`;
