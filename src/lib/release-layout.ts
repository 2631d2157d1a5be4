/** How a release is laid out on the site: inline sections for few detectors, a page per detector for many. */

/**
 * Detector sections shown on the release page itself. Each section (static SVG of ten plots,
 * matrix, profile picker, line-fit table) weighs 45–50 KB of HTML in the demo; two fit the 300 KB
 * page budget with the overlay (~20 KB), the page's own tables, CSS and JavaScript. Beyond that
 * each detector gets its own page.
 */
export const INLINE_DETECTORS = 2;

/**
 * Checks listed on the release page itself when its detectors are inline. A check row weighs
 * about 290 B of HTML (demo 1.1.0: 77.5 KB for 271 rows, attention table included); measured on
 * that page, 300 checks (~90 KB) plus two detector sections (~95 KB), the overlay (~20 KB), the
 * rest of the page (~30 KB) and its CSS and JavaScript (~68 KB) stay within the 300 KB budget.
 * A release with more checks gets a page per detector.
 */
export const INLINE_CHECKS = 300;

/** Whether a release's detectors are shown on its own page (few detectors, not too many checks). */
export function detectorsInline(summary: { detectors: readonly { checks: { pass: number; fail: number; warn: number; review: number; accepted?: number } }[]; checks: readonly unknown[] }): boolean {
  const checks = summary.checks.length + summary.detectors.reduce((n, d) => n + d.checks.pass + d.checks.fail + d.checks.warn + d.checks.review + (d.checks.accepted ?? 0), 0);
  return summary.detectors.length <= INLINE_DETECTORS && checks <= INLINE_CHECKS;
}

/** Rows of the release page's "needs attention" table; the rest are on the detector pages. */
export const ATTENTION_ROWS = 100;

export const detectorPageHref = (releaseId: string, detector: string): string =>
  `/releases/${encodeURIComponent(releaseId)}/detectors/${encodeURIComponent(detector)}/`;

/** Files listed in the finder's full table (~330 B of HTML each: 300 rows stay near 100 KB). */
export const FINDER_TABLE_ROWS = 300;
