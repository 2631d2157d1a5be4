/**
 * A release's checks as text for people (`kiln report`, a refused build): what needs action
 * first — failed, then open review items, warnings, accepted items — each with the measured
 * value against the allowed one; passes summarised unless asked for. Pure.
 */
import { countStatuses, summaryLine } from './report.ts';
import { fmt } from './make-check.ts';
import type { Check, CheckStatus } from './types.ts';

/** Reading order: what blocks a candidate first. */
export const REPORT_ORDER: readonly CheckStatus[] = ['fail', 'review', 'warn', 'accepted', 'pass'];

const show = (v: number | string | null, unit: string | null): string => (v === null ? '' : `${typeof v === 'number' ? fmt(v) : v}${unit ? ` ${unit}` : ''}`);

/** "FAIL    rmf.rows.sum-le-1 [fi0-rmf]  measured 1.2, allowed 1.00001: row 5 sums to 1.2". */
export function reportLine(c: Check): string {
  const m = show(c.measured, c.unit);
  const t = show(c.tolerance, c.unit);
  const numbers = [m && `measured ${m}`, t && `allowed ${t}`].filter(Boolean).join(', ');
  const signed = c.acceptance ? ` — accepted by ${c.acceptance.role}: ${c.acceptance.reason}` : '';
  return `${c.status.toUpperCase().padEnd(8)} ${c.id}${c.product ? ` [${c.product}]` : ''}${numbers ? `  ${numbers}` : ''}: ${c.message}${signed}`;
}

export function sortForReport(checks: readonly Check[]): Check[] {
  const rank = (c: Check) => REPORT_ORDER.indexOf(c.status);
  // Stable: within a status, the build's order (product by product).
  return checks.map((c, i) => ({ c, i })).sort((a, b) => rank(a.c) - rank(b.c) || a.i - b.i).map((x) => x.c);
}

export interface ReleaseReportOptions {
  /** List passing checks too (default: counted only). */
  passing?: boolean;
  /** Only these statuses (a refused build lists its failures). */
  only?: readonly CheckStatus[];
}

export function formatReleaseReport(title: string, checks: readonly Check[], opts: ReleaseReportOptions = {}): string {
  const shown = sortForReport(checks).filter((c) => (opts.only ? opts.only.includes(c.status) : opts.passing || c.status !== 'pass'));
  return [title, ...shown.map((c) => `  ${reportLine(c)}`), `  ${summaryLine(countStatuses(checks), checks.length)}`].join('\n');
}
