/**
 * Which epoch of release A a B epoch is compared with. Epoch ids are not stable across releases
 * (a release may split "launch" into e1…e3, or add e4), so the comparison follows observations:
 * B's epoch is set against the A epoch in force on B's reference date, i.e. what an observer
 * would have used from A for the same data. Same-id epochs pair when no A epoch covers the date;
 * else the A epoch with the nearest reference date.
 */
import type { EpochSite } from '../../../generators/site-data/types.ts';

export interface EpochPair {
  a: EpochSite;
  b: EpochSite;
  /** How the pair was found, for the caption. */
  how: 'in force' | 'same id' | 'nearest';
}

const inForce = (e: EpochSite, date: string) => e.validFrom <= date && (e.validTo === null || date < e.validTo);
const days = (d: string) => Date.parse(d) / 86_400_000;

export function pairEpochs(a: EpochSite[], b: EpochSite[]): EpochPair[] {
  if (!a.length) return [];
  return b.map((eb) => {
    const hit = a.find((ea) => inForce(ea, eb.date));
    if (hit) return { a: hit, b: eb, how: 'in force' };
    const same = a.find((ea) => ea.id === eb.id);
    if (same) return { a: same, b: eb, how: 'same id' };
    const near = [...a].sort((x, y) => Math.abs(days(x.date) - days(eb.date)) - Math.abs(days(y.date) - days(eb.date)))[0];
    return { a: near, b: eb, how: 'nearest' };
  });
}

/** Series label: "e2" when the ids match, else "e4 vs e3". */
export const pairLabel = (p: EpochPair): string => (p.a.id === p.b.id ? `epoch ${p.b.id}` : `epoch ${p.b.id} vs ${p.a.id}`);
