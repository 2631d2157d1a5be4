/** How a release is laid out on the site: inline sections for few detectors, a page per detector for many. */

/**
 * Detector sections shown on the release page itself. Each section (static SVG of seven plots,
 * matrix, profile picker) weighs 70–100 KB of HTML in the demo; two fit the 300 KB page budget
 * with the page's own tables, CSS and JavaScript. Beyond that each detector gets its own page.
 */
export const INLINE_DETECTORS = 2;

/** Rows of the release page's "needs attention" table; the rest are on the detector pages. */
export const ATTENTION_ROWS = 100;

export const detectorPageHref = (releaseId: string, detector: string): string =>
  `/releases/${encodeURIComponent(releaseId)}/detectors/${encodeURIComponent(detector)}/`;

/** Files listed in the finder's full table (~330 B of HTML each: 300 rows stay near 100 KB). */
export const FINDER_TABLE_ROWS = 300;
