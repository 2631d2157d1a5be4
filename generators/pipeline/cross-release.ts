/**
 * Cross-release review: each detector's products against the release before it. Differences
 * beyond the stated tolerances (generators/checks/tolerances.ts) get status "review": a
 * reviewer must accept them; they never fail a build.
 */
import { join } from 'node:path';
import { compareArf, compareRmf } from '../checks/index.ts';
import { readArf, readRmf } from '../ogip/index.ts';
import { readFitsFile } from '../node/index.ts';
import type { Check, ProductSummary } from '../site-data/types.ts';
import type { ArfData, RmfData } from '../response/types.ts';
import { tidyCheck } from './validate.ts';
import { arfValidOn } from './validity.ts';

function rmfAt(dir: string, p: ProductSummary): RmfData {
  return readRmf(readFitsFile(join(dir, p.path))).data;
}
function arfAt(dir: string, p: ProductSummary): ArfData {
  return readArf(readFitsFile(join(dir, p.path))).data;
}


export function crossReleaseChecks(olderDir: string, older: ProductSummary[], olderId: string, newerDir: string, newer: ProductSummary[], newerId: string): Check[] {
  const checks: Check[] = [];
  const label = `${olderId} → ${newerId}`;
  for (const p of newer) {
    if (p.kind === 'rmf') {
      const o = older.find((q) => q.kind === 'rmf' && q.detector === p.detector);
      if (o) checks.push(...compareRmf(rmfAt(olderDir, o), rmfAt(newerDir, p), p.id, { label }));
    } else if (p.kind === 'arf') {
      const o = arfValidOn(older, p.detector, p.validFrom);
      if (o) checks.push(...compareArf(arfAt(olderDir, o), arfAt(newerDir, p), p.id, { label: `${label} (${o.epoch} → ${p.epoch})` }));
    }
  }
  return checks.map(tidyCheck);
}
