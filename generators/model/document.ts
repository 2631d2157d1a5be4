/**
 * The model document of a release from its jobs, and the jobs back from a document: the one
 * contract between the build and anything that rebuilds a product. Pure.
 */
import { parseFormula } from '../physics/compound.ts';
import type { XrayTable } from '../physics/data/xray-table-types.ts';
import type { DetectorJob } from '../pipeline/job.ts';
import { MODEL_SCHEMA, type ModelDocument } from './types.ts';

/** Label of the mirror table in messages about a document's jobs (the table is inside the document). */
const MIRROR_LABEL = 'mirror area of the model document';

/** Every element the detectors' stacks need (filters, contamination, surface, sensor), sorted. */
export function elementsUsed(jobs: readonly DetectorJob[]): string[] {
  const out = new Set<string>();
  for (const j of jobs) {
    const s = j.detector.stack;
    const formulas = [...s.filters, ...s.surface].map((l) => l.material.formula);
    if (s.contamination) formulas.push(s.contamination.material.formula);
    formulas.push(s.sensor.material.formula);
    for (const f of formulas) for (const p of parseFormula(f)) out.add(p.symbol);
  }
  return [...out].sort();
}

/** The subset of an element table holding only the given symbols (order of the table: by Z). */
export function interactionSubset(table: XrayTable, symbols: readonly string[]): XrayTable {
  const want = new Set(symbols);
  return { ...table, elements: table.elements.filter((e) => want.has(e.symbol)) };
}

/** The document of one release (jobs in release order, all of the same release). */
export function modelDocumentOf(jobs: readonly DetectorJob[], table: XrayTable): ModelDocument {
  const { release, instrument } = jobs[0];
  return {
    schema: MODEL_SCHEMA,
    release: { id: release.id, date: release.date, validFrom: release.validFrom, validTo: release.validTo, products: [...release.products], productsPer: release.productsPer ?? 'detector' },
    instrument: {
      id: instrument.id,
      telescope: instrument.telescope,
      instrument: instrument.instrument,
      channels: instrument.channels,
      energyGrid: instrument.energyGrid,
      mirror: { energyKeV: Array.from(instrument.mirror.energyKeV), areaCm2: Array.from(instrument.mirror.areaCm2) },
    },
    interaction: interactionSubset(table, elementsUsed(jobs)),
    detectors: jobs.map((j) => j.detector),
  };
}

/** One job per detector, exactly as the build runs them, from a (parsed) document and its SHA-256. */
export function jobsFromModel(doc: ModelDocument, modelSha256: string): DetectorJob[] {
  const { release: r, instrument: ins } = doc;
  return doc.detectors.map((detector) => ({
    release: { id: r.id, date: r.date, validFrom: r.validFrom, validTo: r.validTo, products: [...r.products], ...(r.productsPer !== 'detector' ? { productsPer: r.productsPer } : {}) },
    instrument: {
      id: ins.id,
      telescope: ins.telescope,
      instrument: ins.instrument,
      channels: ins.channels,
      energyGrid: ins.energyGrid,
      mirror: { energyKeV: ins.mirror.energyKeV, areaCm2: ins.mirror.areaCm2, file: MIRROR_LABEL },
    },
    detector,
    modelSha256,
  }));
}
