/**
 * What a release's products are made from, and its fingerprint. The fingerprint covers the model
 * (resolved stack, redistribution spec, line fits, grids, mirror table, epochs, validity,
 * product list) and not the release's status, title or notes: a published release may later be
 * marked superseded or withdrawn, or its notes corrected, without touching its products.
 */
import { RELEASE_STATUSES } from '../content/schema.ts';
import { statusIndependentText, withStatus } from '../content/status-line.ts';
import type { ResolvedRelease } from '../content/types.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import type { DetectorJob } from './job.ts';
import { checkSettingsOf } from './check-settings.ts';

/** Bump when the meaning of the fingerprinted fields changes (not when code changes: archives keep their bytes). */
export const INPUTS_SCHEMA = 'kiln/inputs/1';

export function jobsOf(r: ResolvedRelease): DetectorJob[] {
  const { release, instrument } = r;
  return r.detectors.map((detector) => ({
    release: {
      id: release.id,
      date: release.date,
      validFrom: release.validFrom,
      validTo: release.validTo,
      products: [...release.products],
      // Present only when not per detector, so releases from before regions fingerprint as before.
      ...(release.productsPer !== 'detector' ? { productsPer: release.productsPer } : {}),
    },
    instrument: {
      id: instrument.id,
      telescope: instrument.telescope,
      instrument: instrument.instrument,
      channels: instrument.channels,
      energyGrid: instrument.energyGrid,
      mirror: { energyKeV: instrument.mirror.energyKeV, areaCm2: instrument.mirror.areaCm2, file: instrument.mirror.file },
    },
    detector,
    checks: checkSettingsOf(r, detector.id),
  }));
}

/** The fingerprinted view of a release: jobs without file paths (moving the content tree changes nothing). */
function fingerprintView(r: ResolvedRelease): unknown {
  return {
    schema: INPUTS_SCHEMA,
    jobs: jobsOf(r).map((j) => ({
      release: j.release,
      instrument: { ...j.instrument, mirror: { energyKeV: j.instrument.mirror.energyKeV, areaCm2: j.instrument.mirror.areaCm2 } },
      // Regions change products only when the release builds per region or a transfer loss needs
      // their transfer counts: a release from before regions keeps its fingerprint when the
      // instrument gains them.
      detector: { ...j.detector, lineFitsFile: undefined, regions: usesRegions(j) ? j.detector.regions : undefined },
    })),
  };
}

function usesRegions(j: DetectorJob): boolean {
  return (j.release.productsPer ?? 'detector') !== 'detector' || j.detector.redistribution.transferLoss !== undefined;
}

export function inputsSha256(r: ResolvedRelease): string {
  return sha256Hex(canonicalJson(fingerprintView(r)));
}

const UTF8 = new TextDecoder();

/** Is this input the release's own release.yaml / notes file? (content-relative path vs absolute file) */
const isFileOf = (abs: string, rel: string): boolean => abs.split('\\').join('/').endsWith('/' + rel);

/**
 * SHA-256 of each input file that feeds the products (content-relative path → hex), to name what
 * changed: release.yaml in its status-independent form (publishing changes only the status line),
 * the notes left out (they never feed a product). This is what a kiln/seal/2 records.
 */
export function inputFileHashes(r: ResolvedRelease): Record<string, string> {
  const out: Record<string, string> = {};
  for (const f of r.inputs) {
    if (isFileOf(r.release.notesFile, f.path)) continue;
    out[f.path] = isFileOf(r.release.file, f.path) ? sha256Hex(statusIndependentText(UTF8.decode(f.bytes))) : sha256Hex(f.bytes);
  }
  return out;
}

/**
 * Input files that differ from those a seal recorded, by path, sorted. A kiln/seal/1 hashed the
 * raw bytes (release.yaml with the status it had then, notes included): release.yaml counts as
 * unchanged when it matches with any status value, and the notes are not compared.
 */
export function changedInputFiles(r: ResolvedRelease, seal: { schema: string; inputFiles: Record<string, string> }): string[] {
  let now: Record<string, string>;
  let recorded = seal.inputFiles;
  if (seal.schema === 'kiln/seal/1') {
    now = {};
    recorded = { ...seal.inputFiles };
    for (const f of r.inputs) {
      if (isFileOf(r.release.notesFile, f.path)) {
        delete recorded[f.path];
        continue;
      }
      now[f.path] = sha256Hex(f.bytes);
      if (isFileOf(r.release.file, f.path) && now[f.path] !== recorded[f.path]) {
        const text = UTF8.decode(f.bytes);
        for (const st of RELEASE_STATUSES) {
          const t = withStatus(text, st);
          if (t !== null && sha256Hex(t) === recorded[f.path]) now[f.path] = recorded[f.path];
        }
      }
    }
  } else now = inputFileHashes(r);
  return Object.keys({ ...now, ...recorded })
    .filter((p) => now[p] !== recorded[p])
    .sort();
}
