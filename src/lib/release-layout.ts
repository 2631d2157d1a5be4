/** How a release is laid out on the site: inline sections for few detectors, a page per detector for many. */

/**
 * Detector sections shown on the release page itself. Each section (static SVG of seven plots,
 * matrix, profile picker) weighs 70–100 KB of HTML in the demo; two fit the 300 KB page budget
 * with the page's own tables, CSS and JavaScript. Beyond that each detector gets its own page.
 */
export const INLINE_DETECTORS = 2;

/**
 * Checks listed on the release page itself when its detectors are inline. A check row weighs
 * about 220 B of HTML (the demo: 157 KB for 719 rows); 400 rows (~90 KB) plus two detector
 * sections stay within the page budget. A release with more checks gets a page per detector.
 */
export const INLINE_CHECKS = 400;

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
