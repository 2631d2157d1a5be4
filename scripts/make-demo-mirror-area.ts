/**
 * Writes the invented mirror effective-area table of the demo instrument,
 * content/instruments/quillon-tarncam/mirror-area.csv (columns energy_keV,area_cm2).
 * An asymmetric log-normal bump peaking at 1.5 keV: a made-up curve with the rough shape of a
 * small grazing-incidence mirror, not a model of any real one.
 *
 *   node --import tsx scripts/make-demo-mirror-area.ts [--check]
 */
import { readFile, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

/** Invented shape parameters. */
export const MIRROR_PEAK_CM2 = 440;
export const MIRROR_PEAK_KEV = 1.5;
const LOG_WIDTH_BELOW_PEAK = 1.6;
const LOG_WIDTH_ABOVE_PEAK = 0.75;
/** Table from 0.1 to 12.5 keV in 0.1 keV steps: covers the 0.2–12 keV response grid. */
const E_MIN_KEV = 0.1;
const E_MAX_KEV = 12.5;
const STEP_KEV = 0.1;

export function demoMirrorAreaCm2(energyKeV: number): number {
  const x = Math.log(energyKeV / MIRROR_PEAK_KEV);
  const w = x < 0 ? LOG_WIDTH_BELOW_PEAK : LOG_WIDTH_ABOVE_PEAK;
  return MIRROR_PEAK_CM2 * Math.exp(-0.5 * (x / w) ** 2);
}

export function makeMirrorAreaCsv(): string {
  const rows: string[] = [];
  const n = Math.round((E_MAX_KEV - E_MIN_KEV) / STEP_KEV);
  for (let i = 0; i <= n; i++) {
    const e = E_MIN_KEV + i * STEP_KEV;
    rows.push(`${e.toFixed(2)},${demoMirrorAreaCm2(e).toFixed(2)}`);
  }
  return [
    '# INVENTED demo data: mirror effective area of the fictional QUILLON telescope.',
    '# Made by scripts/make-demo-mirror-area.ts (an analytic bump, not a measurement).',
    'energy_keV,area_cm2',
    ...rows,
    '',
  ].join('\n');
}

const FILE = join(dirname(fileURLToPath(import.meta.url)), '..', 'content', 'instruments', 'quillon-tarncam', 'mirror-area.csv');

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const text = makeMirrorAreaCsv();
  if (process.argv.includes('--check')) {
    readFile(FILE, 'utf8')
      .catch(() => null)
      .then((old) => {
        if (old !== text) process.stderr.write(`differs: ${FILE}\n`);
        process.exit(old === text ? 0 : 1);
      });
  } else writeFile(FILE, text).then(() => process.stdout.write(`wrote ${FILE}\n`));
}
