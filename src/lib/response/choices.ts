/**
 * What the response page offers, from the build's model documents (build time): for each
 * release with a model document, its detectors with their nodes, rows and validity, the channel
 * count and the energy range the data cover. The page embeds this; the worker reads the document itself.
 */
import type { ModelDocument } from '../../../generators/model/types.ts';
import type { ReleaseIndex } from '../../../generators/site-data/types.ts';

export interface ReleaseChoice {
  id: string;
  title: string;
  status: string;
  modelUrl: string;
  modelSha256: string;
  channels: number;
  /** Energy range of the model's data (interaction table ∩ mirror table), keV. */
  dataRangeKeV: [number, number];
  grid: { minKeV: number; maxKeV: number; bins: number; spacing: string };
  detectors: {
    id: string;
    name: string;
    validFrom: string;
    validTo: string | null;
    epochs: { id: string; date: string; validFrom: string; validTo: string | null }[];
    nodes: { id: string; name: string; readNoiseE: number }[];
    transfers: number | null;
    rowBands: { id: string; firstTransfer: number; lastTransfer: number }[];
  }[];
}

export function releaseChoices(index: ReleaseIndex, load: (id: string) => ModelDocument | null): ReleaseChoice[] {
  const out: ReleaseChoice[] = [];
  for (const r of index.releases) {
    if (!r.model || r.status === 'draft') continue;
    const doc = load(r.id);
    if (!doc) continue;
    const m = doc.instrument.mirror.energyKeV;
    out.push({
      id: r.id,
      title: r.title,
      status: r.status,
      modelUrl: `/data/releases/${r.id}/${r.model.path}`,
      modelSha256: r.model.sha256,
      channels: doc.instrument.channels.count,
      dataRangeKeV: [Math.max(doc.interaction.energyMinKeV, m[0]), Math.min(doc.interaction.energyMaxKeV, m[m.length - 1])],
      grid: doc.instrument.energyGrid,
      detectors: doc.detectors.map((d) => ({
        id: d.id,
        name: d.name,
        validFrom: d.epochs[0].validFrom,
        validTo: d.epochs[d.epochs.length - 1].validTo,
        epochs: d.epochs.map((e) => ({ id: e.id, date: e.date, validFrom: e.validFrom, validTo: e.validTo })),
        nodes: (d.regions?.nodes ?? []).map((n) => ({ id: n.id, name: n.name, readNoiseE: n.redistribution.fwhm.readNoiseE })),
        transfers: d.regions?.transfers ?? null,
        rowBands: d.regions?.rowBands ?? [],
      })),
    });
  }
  return out;
}
