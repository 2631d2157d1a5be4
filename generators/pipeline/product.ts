/**
 * Products of one detector of one release: the RMF (the redistribution does not depend on the
 * epoch) for the detector or for each of its regions (per node, or per node × row band, as the
 * release chooses), and per epoch the ARF (contamination grows with time) and, on request, the
 * full response (RSP = RMF × ARF) per region. Pure: data in, FITS bytes and site data out, so the
 * same code runs in a worker thread and in an observer's browser (model/case.ts shares its parts).
 */
import { energyGrid, type RedistributionResult } from '../response/index.ts';
import type { ArfData } from '../response/types.ts';
import { writeArf, writeRmf } from '../ogip/index.ts';
import type { EpochSite } from '../site-data/types.ts';
import { areaOnDate, fullResponse, regionRedistribution, regionRedistributionInput, rspMetaFor, type CaseChoice, type CaseGrid } from '../model/parts.ts';
import type { PortableRedistributionInput } from '../response/portable-input.ts';
import { detectorRegion, regionsOf, type Region } from '../model/regions.ts';
import type { BuiltFile, DetectorJob } from './job.ts';
import { ALL_EPOCHS, productFileName, productId } from './names.ts';
import type { ValidRange } from '../response/valid-range.ts';
import { validRangeOf } from '../model/parts.ts';

export interface EpochProducts {
  epoch: string;
  arf: ArfData;
  site: EpochSite;
}

export interface DetectorProducts {
  files: BuiltFile[];
  /** The whole detector's matrix (shipped when the release builds per-detector products; always used for checks and plots). */
  redistribution: RedistributionResult;
  epochs: EpochProducts[];
  /** Each region's matrix by product label, when the release builds per-region products (in memory only: the site's per-region curves). */
  regionMatrices: { label: string; rmf: RedistributionResult['rmf'] }[];
  /** Channels and energies the model covers completely (written in every product). */
  validRange: ValidRange;
}

/** The grid text of products made on the model's own energy grid. */
export const MODEL_GRID_TEXT = 'model grid';

/** Validity of the whole detector: first epoch's start to last epoch's end. */
export function detectorValidity(job: DetectorJob): { validFrom: string; validTo: string | null } {
  const eps = job.detector.epochs;
  return { validFrom: eps[0].validFrom, validTo: eps[eps.length - 1].validTo };
}

export function modelGrid(job: DetectorJob): CaseGrid {
  return { bins: energyGrid(job.instrument.energyGrid, 'energyGrid'), text: MODEL_GRID_TEXT };
}

const regionFields = (r: Region) => ({ ...(r.node !== null ? { node: r.node } : {}), ...(r.rowBand !== null ? { rowBand: r.rowBand } : {}) });

/** The matrices a job makes (the whole detector's, then each region's, by label), as inputs another thread can take. */
export function jobMatrixInputs(job: DetectorJob): { label: string; input: PortableRedistributionInput }[] {
  const grid = modelGrid(job);
  const whole = detectorValidity(job);
  const wholeRegion = detectorRegion(job.detector);
  const regions = [wholeRegion, ...regionsOf(job.detector, job.release.productsPer ?? 'detector').filter((r) => r.label !== wholeRegion.label)];
  return regions.map((region) => ({ label: region.label, input: regionRedistributionInput(job, { region, grid, group: 1 }, whole.validFrom) }));
}

/**
 * The products of a job. `prebuilt`: matrices already made from jobMatrixInputs (by label; e.g.
 * on several threads, pipeline/matrix-threads.ts), used instead of making them here.
 */
export function buildDetectorProducts(job: DetectorJob, prebuilt?: ReadonlyMap<string, RedistributionResult>): DetectorProducts {
  const { detector, instrument, release } = job;
  const grid = modelGrid(job);
  const whole = detectorValidity(job);
  const files: BuiltFile[] = [];
  const choiceFor = (region: Region): CaseChoice => ({ region, grid, group: 1 });
  const range = validRangeOf(job, grid.bins, 1, detector.redistribution.thresholdKeV);
  const matrixOf = (region: Region) => prebuilt?.get(region.label) ?? regionRedistribution(job, choiceFor(region), whole.validFrom);

  const wholeRegion = detectorRegion(detector);
  const redistribution = matrixOf(wholeRegion);
  const regions = regionsOf(detector, release.productsPer ?? 'detector');
  const matrices = regions.map((r) => (r.label === wholeRegion.label ? redistribution : matrixOf(r)));
  if (release.products.includes('rmf'))
    regions.forEach((r, k) =>
      files.push({
        id: productId(r.label, ALL_EPOCHS, 'rmf'),
        kind: 'rmf',
        detector: detector.id,
        ...regionFields(r),
        epoch: ALL_EPOCHS,
        name: productFileName(instrument.id, r.label, ALL_EPOCHS, release.id, 'rmf'),
        fits: writeRmf(matrices[k].rmf),
        ...whole,
        validEnergyKeV: range.energyKeV,
        validChannels: range.channels,
      }),
    );

  const epochs: EpochProducts[] = [];
  for (const epoch of detector.epochs) {
    const area = areaOnDate(job, grid.bins, grid.text, epoch, epoch.date);
    const { arf, centres, mirrorCm2, efficiency: eff } = area;
    const validity = { validFrom: epoch.validFrom, validTo: epoch.validTo };
    if (release.products.includes('arf'))
      files.push({
        id: productId(detector.id, epoch.id, 'arf'),
        kind: 'arf',
        detector: detector.id,
        epoch: epoch.id,
        name: productFileName(instrument.id, detector.id, epoch.id, release.id, 'arf'),
        fits: writeArf(arf),
        ...validity,
        validEnergyKeV: range.energyKeV,
      });
    if (release.products.includes('rsp'))
      regions.forEach((r, k) =>
        files.push({
          id: productId(r.label, epoch.id, 'rsp'),
          kind: 'rsp',
          detector: detector.id,
          ...regionFields(r),
          epoch: epoch.id,
          name: productFileName(instrument.id, r.label, epoch.id, release.id, 'rsp'),
          fits: writeRmf(fullResponse(matrices[k].rmf, arf, rspMetaFor(job, epoch, area, choiceFor(r)))),
          ...validity,
          validEnergyKeV: range.energyKeV,
          validChannels: range.channels,
        }),
      );
    epochs.push({
      epoch: epoch.id,
      arf,
      site: {
        id: epoch.id,
        date: epoch.date,
        validFrom: epoch.validFrom,
        validTo: epoch.validTo,
        energyKeV: Array.from(centres),
        mirrorCm2: Array.from(mirrorCm2),
        components: eff.components.map((c) => ({ name: c.name, kind: c.kind === 'sensor' ? 'detector' : c.kind, values: Array.from(c.values) })),
        detectorQE: Array.from(eff.detectorQE),
        effectiveAreaCm2: Array.from(area.arf.specrespCm2),
      },
    });
  }
  const regionMatrices = regions.flatMap((r, k) => (r.node !== null ? [{ label: r.label, rmf: matrices[k].rmf }] : []));
  return { files, redistribution, epochs, regionMatrices, validRange: range };
}
