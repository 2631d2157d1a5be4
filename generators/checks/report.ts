/** Formatting check results: readable text (one line per check, then a summary) and JSON. */
import type { FileCheckResult } from './check-file.ts';
import { fmt } from './make-check.ts';
import type { Check, CheckStatus } from './types.ts';

export type StatusCounts = Record<CheckStatus, number>;

export function countStatuses(checks: readonly Check[]): StatusCounts {
  const c: StatusCounts = { pass: 0, fail: 0, warn: 0, review: 0, accepted: 0 };
  for (const k of checks) c[k.status]++;
  return c;
}

function show(v: number | string | null, unit: string | null): string {
  if (v === null) return '';
  const s = typeof v === 'number' ? fmt(v) : v;
  return unit ? `${s} ${unit}` : s;
}

/** One line: "FAIL   rmf.rows.sum-le-1  1.2 vs 1.00001: row 5 ... sums to 1.2 > 1". */
export function formatCheckLine(c: Check): string {
  const m = show(c.measured, c.unit);
  const t = show(c.tolerance, c.unit);
  const mt = m && t ? `${m} vs ${t}` : m || (t ? `expected ${t}` : '');
  return `${c.status.toUpperCase().padEnd(6)} ${c.id}${mt ? `  [${mt}]` : ''}  ${c.message}`;
}

export function summaryLine(counts: StatusCounts, total: number): string {
  return `${total} checks: ${counts.pass} pass, ${counts.fail} fail, ${counts.warn} warn, ${counts.review} review${counts.accepted ? `, ${counts.accepted} accepted` : ''}`;
}

export interface FormatOptions {
  /** Show passing checks too (default true). */
  showPassing?: boolean;
}

export function formatReportText(results: readonly FileCheckResult[], opts: FormatOptions = {}): string {
  const lines: string[] = [];
  const all: Check[] = [];
  for (const r of results) {
    lines.push(`${r.fileName} (${r.kind.toUpperCase()})`);
    for (const c of r.checks) if (opts.showPassing !== false || c.status !== 'pass') lines.push(`  ${formatCheckLine(c)}`);
    lines.push(`  ${summaryLine(countStatuses(r.checks), r.checks.length)}`);
    all.push(...r.checks);
  }
  if (results.length > 1) lines.push(`total: ${results.length} files, ${summaryLine(countStatuses(all), all.length)}`);
  return lines.join('\n');
}

export interface CheckReportJson {
  schema: 'kiln/check-report/1';
  files: { fileName: string; kind: FileCheckResult['kind']; counts: StatusCounts; checks: Check[] }[];
  counts: StatusCounts;
}

export function reportJson(results: readonly FileCheckResult[]): CheckReportJson {
  return {
    schema: 'kiln/check-report/1',
    files: results.map((r) => ({ fileName: r.fileName, kind: r.kind, counts: countStatuses(r.checks), checks: r.checks })),
    counts: countStatuses(results.flatMap((r) => r.checks)),
  };
}

/** JSON text with non-finite numbers (NaN measured values) written as null. */
export function formatReportJson(results: readonly FileCheckResult[]): string {
  return JSON.stringify(reportJson(results), (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2);
}
