/**
 * kiln fold: expected counts of a source through a response — total and per-band rates, pile-up
 * at the instrument's frame time, and (--json) the counts of every channel. A thin shell over
 * generators/spectrum.
 */
import { bandRates, binnedPhotonFlux, foldCounts, pileupEstimate, PILEUP_LEAVES_OUT, sum, type Band, type PileupEstimate } from '../spectrum/index.ts';
import { optFlag, optString, type CommandSpec, type ParsedArgs } from './args.ts';
import { checkSourceFits, gridFor, loadResponse, loadSource, loadSpectral, parseBands, positiveOption, RESPONSE_OPTIONS, responsePaths } from './spectral-inputs.ts';
import { UsageError } from './args.ts';

function num(x: number): string {
  return x === 0 ? '0' : Math.abs(x) >= 1e-3 && Math.abs(x) < 1e7 ? String(Number(x.toPrecision(5))) : x.toExponential(4);
}

export async function runFold(args: ParsedArgs, write: (s: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  const sourcePath = optString(args, 'source');
  if (!sourcePath) throw new UsageError('--source FILE is required');
  const paths = responsePaths(args);
  const source = await loadSource(sourcePath);
  const r = loadResponse(paths.rmf, paths.arf);
  await checkSourceFits(source, r.response);
  const exposureS = positiveOption(args, 'exposure') ?? source.doc.exposureS;
  const insPath = optString(args, 'instrument');
  const spectral = insPath ? await loadSpectral(insPath) : null;
  const bandsText = optString(args, 'bands');
  const e0 = r.response.energLoKeV[0];
  const e1 = r.response.energHiKeV[r.response.energHiKeV.length - 1];
  const bands: Band[] = bandsText ? parseBands(bandsText) : spectral ? spectral.bands : [{ name: 'all', loKeV: e0, hiKeV: e1 }];
  const flux = binnedPhotonFlux(gridFor(r, source), source.model);
  const counts = foldCounts(r.response, flux, exposureS);
  const total = sum(counts);
  const frameTimeS = positiveOption(args, 'frame-time') ?? spectral?.pileup.frameTimeS;
  const cell = spectral?.pileup.brightestCellFraction;
  const pileup: PileupEstimate | null = frameTimeS !== undefined && cell !== undefined ? pileupEstimate({ rateCps: total / exposureS, frameTimeS, brightestCellFraction: cell }) : null;
  const rates = bandRates(r.response, counts, exposureS, bands);
  if (optFlag(args, 'json')) {
    write(
      JSON.stringify({
        source: source.doc.id,
        rmf: r.rmfPath,
        arf: r.arfPath,
        exposureS,
        totalCounts: total,
        rateCps: total / exposureS,
        photonFluxCm2s: sum(flux),
        bands: rates,
        pileup: pileup ? { ...pileup, leavesOut: PILEUP_LEAVES_OUT } : null,
        firstChannel: r.response.firstChannel,
        counts: Array.from(counts),
      }) + '\n',
    );
    return 0;
  }
  const lines = [
    `source ${source.doc.id} (${source.doc.title}) through ${r.rmfPath}${r.arfPath ? ` + ${r.arfPath}` : ''}, exposure ${num(exposureS)} s`,
    `  total   ${num(total)} counts, ${num(total / exposureS)} counts/s (photon flux ${num(sum(flux))} photons/cm²/s in ${num(e0)}–${num(e1)} keV)`,
    ...rates.map((b) => `  ${b.name.padEnd(7)} ${num(b.loKeV)}–${num(b.hiKeV)} keV: ${num(b.counts)} counts, ${num(b.rateCps)} counts/s`),
  ];
  if (pileup)
    lines.push(
      `  pile-up at ${num(pileup.frameTimeS)} s frames, ${num(pileup.brightestCellFraction)} of the image in the brightest cell: ${num(pileup.photonsPerFrame)} photons/frame there, P(≥2) = ${num(pileup.pileupProbability)}, ${num(100 * pileup.affectedEventFraction)} % of its events affected`,
      `  (${PILEUP_LEAVES_OUT})`,
    );
  write(lines.join('\n') + '\n');
  return 0;
}

export const command: CommandSpec = {
  name: 'fold',
  summary: 'Fold a source through a response: expected counts, per-band rates and pile-up',
  usage: 'kiln fold --source FILE --rmf FILE [--arf FILE] [--exposure S] [--instrument FILE] [--bands LIST] [--frame-time S] [--json]',
  options: [
    { name: 'source', arg: 'FILE', help: 'source description (YAML, see content/instruments/*/sources/)' },
    ...RESPONSE_OPTIONS,
    { name: 'exposure', arg: 'S', help: "exposure in seconds (default: the source's exposureS)" },
    { name: 'instrument', arg: 'FILE', help: 'instrument.yaml whose spectral.yaml beside it gives the bands and pile-up inputs' },
    { name: 'bands', arg: 'LIST', help: 'bands in keV, e.g. soft:0.3-2,hard:2-10 (default: the instrument\'s, else the whole response)' },
    { name: 'frame-time', arg: 'S', help: "frame time in seconds for the pile-up estimate (default: the instrument's)" },
    { name: 'json', help: 'print JSON, with the expected counts of every channel' },
  ],
  positionals: { min: 0, max: 0, names: '' },
  run: (args) => runFold(args),
};
