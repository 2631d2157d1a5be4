/**
 * A corpus of broken content trees: each case edits a scratch copy of the demo content and checks
 * that loadContent throws a KilnInputError naming the file, the line (found in the edited text,
 * not taken from our code), the field or column, the bad value and the expectation.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import { loadContent } from '../../generators/content/index.ts';
import { INSTRUMENT, MIRROR, rel, scratchCopy, type Scratch } from './helpers.ts';

interface Case {
  name: string;
  edit: (s: Scratch) => void;
  /** File the error must name, relative to the content root. */
  file: string;
  line?: (s: Scratch) => number;
  field?: string | RegExp;
  value?: unknown;
  message?: RegExp;
  expected?: RegExp;
}

const LF10 = rel('1.0.0', 'linefits/fi0.csv');
const LF11B = rel('1.1.0', 'linefits/bi1.csv');
/** 1-based character column of `needle` in the first line that contains it. */
const columnOf = (s: Scratch, file: string, needle: string) => s.read(file).split('\n').find((l) => l.includes(needle))!.indexOf(needle) + 1;

const CASES: Case[] = [
  // ---- instrument.yaml: field-level physics sanity
  { name: 'negative depletion depth', edit: (s) => s.replace(INSTRUMENT, 'depletionUm: 45', 'depletionUm: -45'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'depletionUm: -45'), field: 'detectors[0].stack.sensor.depletionUm', value: -45, expected: /> 0/ },
  { name: 'Fano factor ≥ 1', edit: (s) => s.replace(INSTRUMENT, 'fano: 0.118', 'fano: 1.2'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'fano: 1.2'), field: 'detectors[0].redistribution.fwhm.fano', value: 1.2, expected: /< 1/ },
  { name: 'negative read noise', edit: (s) => s.replace(INSTRUMENT, 'readNoiseE: 4.0', 'readNoiseE: -1'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'readNoiseE: -1'), field: 'detectors[1].redistribution.fwhm.readNoiseE', value: -1, expected: /≥ 0/ },
  { name: 'zero layer thickness', edit: (s) => s.replace(INSTRUMENT, /thicknessUm: 0\.30\n/, 'thicknessUm: 0\n'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, /thicknessUm: 0$/), field: 'detectors[0].stack.surface[1].thicknessUm', value: 0, expected: /> 0/ },
  { name: 'negative density', edit: (s) => s.replace(INSTRUMENT, 'densityGcm3: 3.17', 'densityGcm3: -3.17'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, '-3.17'), field: 'detectors[0].stack.surface[2].material.densityGcm3', value: -3.17, expected: /> 0/ },
  { name: 'bad chemical formula', edit: (s) => s.replace(INSTRUMENT, 'formula: Si3N4', 'formula: Si3Q4'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'Si3Q4'), field: 'detectors[0].stack.surface[2].material.formula', value: 'Si3Q4', message: /Q/, expected: /chemical formula/ },
  { name: 'pixels per event below one', edit: (s) => s.replace(INSTRUMENT, '{ a: 1.2,', '{ a: 0.5,'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'a: 0.5'), field: 'detectors[0].redistribution.fwhm.pixelsPerEvent.a', value: 0.5, expected: /≥ 1/ },
  { name: 'escape not a boolean', edit: (s) => s.replace(INSTRUMENT, 'escape: true', 'escape: yes'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'escape: yes'), field: 'detectors[0].redistribution.escape', value: 'yes', expected: /boolean/ },
  { name: 'unknown profile source', edit: (s) => s.replace(INSTRUMENT, 'centroid: { source: line-fits }', 'centroid: { source: fitted }'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'fitted'), field: 'detectors[1].redistribution.centroid.source', value: 'fitted', expected: /"law", "line-fits"/ },
  // ---- instrument.yaml: structure
  { name: 'misspelt field', edit: (s) => s.replace(INSTRUMENT, 'depletionUm: 40', 'depletionUM: 40'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'depletionUM'), field: 'detectors[1].stack.sensor.depletionUM', value: 'depletionUM', message: /unknown field "depletionUM"/, expected: /depletionUm/ },
  { name: 'unknown top-level field', edit: (s) => s.write(INSTRUMENT, s.read(INSTRUMENT) + 'colour: blue\n'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'colour: blue'), field: 'colour', expected: /telescope/ },
  { name: 'missing required field', edit: (s) => s.replace(INSTRUMENT, 'instrument: TARNCAM\n', ''), file: INSTRUMENT, field: 'instrument', message: /missing required field/, expected: /string/ },
  { name: 'duplicate detector id', edit: (s) => s.replace(INSTRUMENT, '  - id: bi1', '  - id: fi0'), file: INSTRUMENT, line: (s) => s.lastLineStarting(INSTRUMENT, '  - id: fi0'), field: 'detectors[1].id', message: /used twice/ },
  { name: 'non-ASCII telescope name', edit: (s) => s.replace(INSTRUMENT, 'telescope: QUILLON', 'telescope: QUILLÖN'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'QUILLÖN'), field: 'telescope', value: 'QUILLÖN', expected: /ASCII/ },
  { name: 'instrument id differs from directory', edit: (s) => s.replace(INSTRUMENT, 'id: quillon-tarncam', 'id: quillon-other'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'quillon-other'), field: 'id', value: 'quillon-other', expected: /quillon-tarncam/ },
  { name: 'energy grid reversed', edit: (s) => s.replace(INSTRUMENT, 'maxKeV: 12.0', 'maxKeV: 0.1'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'maxKeV: 0.1'), field: 'energyGrid.maxKeV', expected: /maxKeV > minKeV/ },
  { name: 'first channel not 0 or 1', edit: (s) => s.replace(INSTRUMENT, 'firstChannel: 0', 'firstChannel: 2'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'firstChannel: 2'), field: 'channels.firstChannel', value: 2, expected: /0 or 1/ },
  { name: 'fractional bin count', edit: (s) => s.replace(INSTRUMENT, 'bins: 800', 'bins: 800.5'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'bins: 800.5'), field: 'energyGrid.bins', value: 800.5, expected: /integer/ },
  { name: 'partial layer thicker than depletion', edit: (s) => s.replace(INSTRUMENT, 'partial: { thicknessUm: 0.30,', 'partial: { thicknessUm: 41,'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'thicknessUm: 41'), field: 'detectors[1].stack.sensor.partial.thicknessUm', value: 41, expected: /depletionUm = 40/ },
  { name: 'tail and shelf leave no peak', edit: (s) => s.replace(INSTRUMENT, 'fractionAtZero: 0.08', 'fractionAtZero: 0.999'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, '0.999'), field: 'detectors[0].redistribution.tail.fractionAtZero', value: 0.999, expected: /< 1/ },
  // ---- YAML syntax
  { name: 'duplicate YAML key', edit: (s) => s.replace(INSTRUMENT, 'telescope: QUILLON\n', 'telescope: QUILLON\ntelescope: OTHER\n'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, 'telescope: OTHER'), message: /YAML syntax.*unique/ },
  { name: 'YAML indentation', edit: (s) => s.replace(INSTRUMENT, 'mirrorArea: mirror-area.csv', ' mirrorArea: mirror-area.csv'), file: INSTRUMENT, line: (s) => s.lineOf(INSTRUMENT, ' mirrorArea'), message: /YAML syntax/ },
  // ---- mirror-area.csv
  { name: 'mirror energy column in eV', edit: (s) => s.replace(MIRROR, 'energy_keV,area_cm2', 'energy_eV,area_cm2'), file: MIRROR, line: (s) => s.lineOf(MIRROR, 'energy_eV'), field: /column 1/, value: 'energy_eV', message: /unit eV/, expected: /^energy_keV$/ },
  { name: 'mirror energies not increasing', edit: (s) => s.replace(MIRROR, /^0\.50,/m, '0.35,'), file: MIRROR, line: (s) => s.lineOf(MIRROR, /^0\.35,/), field: /energy_keV/, value: 0.35, expected: /> 0\.4/ },
  { name: 'mirror value not a number', edit: (s) => s.replace(MIRROR, /^1\.00,/m, '1.0O,'), file: MIRROR, line: (s) => s.lineOf(MIRROR, '1.0O'), field: 'energy_keV (column 1)', value: '1.0O', expected: /decimal number in keV/ },
  { name: 'negative mirror area', edit: (s) => s.replace(MIRROR, /^5\.00,[\d.]+/m, '5.00,-1'), file: MIRROR, line: (s) => s.lineOf(MIRROR, '5.00,-1'), field: /area_cm2/, value: -1, expected: /≥ 0/ },
  { name: 'mirror table does not span the grid', edit: (s) => s.replace(MIRROR, /^0\.10,.*\n0\.20,.*\n/m, ''), file: MIRROR, message: /does not span/, expected: /≤ 0\.2 keV/ },
  { name: 'mirror table missing', edit: (s) => s.remove(MIRROR), file: MIRROR, message: /file not found/, expected: /energy_keV,area_cm2/ },
  // ---- release.yaml
  { name: 'release id not semver', edit: (s) => s.replace(rel('1.1.0'), 'id: 1.1.0', 'id: "1.1"'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'id: "1.1"'), field: 'id', value: '1.1', expected: /MAJOR\.MINOR\.PATCH/ },
  { name: 'release id with build metadata', edit: (s) => s.replace(rel('1.1.0'), 'id: 1.1.0', 'id: 1.1.0+b5'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), '+b5'), field: 'id', value: '1.1.0+b5', expected: /no "\+build"/ },
  { name: 'release id differs from directory', edit: (s) => s.replace(rel('2.0.0'), 'id: 2.0.0', 'id: 2.0.1'), file: rel('2.0.0'), line: (s) => s.lineOf(rel('2.0.0'), 'id: 2.0.1'), field: 'id', value: '2.0.1', expected: /"2\.0\.0"/ },
  { name: 'unknown status', edit: (s) => s.replace(rel('1.1.0'), 'status: published', 'status: final'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'status: final'), field: 'status', value: 'final', expected: /"draft", "candidate"/ },
  { name: 'validity reversed', edit: (s) => s.replace(rel('1.0.0'), 'validTo: null\nproducts', 'validTo: 2026-01-01\nproducts'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), 'validTo: 2026-01-01'), field: 'validTo', value: '2026-01-01', expected: /after validFrom = 2026-05-12/ },
  { name: 'epoch outlives the release', edit: (s) => s.replace(rel('1.0.0'), 'validTo: null\nproducts', 'validTo: 2027-01-01\nproducts'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), /^    validTo: null/), field: 'epochs[0].validTo', value: null, expected: /≤ release validTo = 2027-01-01/ },
  { name: 'epoch date outside its interval', edit: (s) => s.replace(rel('1.1.0'), 'date: 2026-08-01', 'date: 2026-12-01'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'date: 2026-12-01'), field: 'epochs[0].date', value: '2026-12-01', expected: /in \[2026-05-12, 2026-11-01\)/ },
  { name: 'overlapping epochs', edit: (s) => s.replace(rel('1.1.0'), 'validFrom: 2026-11-01', 'validFrom: 2026-10-01'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'validFrom: 2026-10-01'), field: 'epochs[1].validFrom', message: /overlaps/ },
  { name: 'upper-case epoch id', edit: (s) => s.replace(rel('1.1.0'), 'id: e1', 'id: E1'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'id: E1'), field: 'epochs[0].id', value: 'E1', expected: /lower-case/ },
  { name: 'epoch id "..", not a safe path component', edit: (s) => s.replace(rel('1.1.0'), 'id: e2', 'id: ".."'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'id: ".."'), field: 'epochs[1].id', value: '..', expected: /no "\.\."/ },
  { name: 'invalid calendar date', edit: (s) => s.replace(rel('1.1.0'), 'startDate: 2026-05-12', 'startDate: 2026-02-30'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), '2026-02-30'), field: 'detectors.fi0.model.stack.contamination.law.startDate', value: '2026-02-30', expected: /YYYY-MM-DD/ },
  { name: 'unknown contamination law', edit: (s) => s.replace(rel('1.1.0'), 'kind: exponential', 'kind: cubic'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'cubic'), field: 'detectors.fi0.model.stack.contamination.law.kind', value: 'cubic', expected: /"linear", "exponential"/ },
  { name: 'product kind twice', edit: (s) => s.replace(rel('1.1.0'), 'products: [rmf, arf]', 'products: [rmf, rmf]'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'products:'), field: 'products', message: /twice/ },
  { name: 'detector epochs name an unknown epoch', edit: (s) => s.replace(rel('1.1.0'), '  fi0:\n', '  fi0:\n    epochs: [e1, e9]\n'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'e9'), field: 'detectors.fi0.epochs[1]', value: 'e9', expected: /e1, e2, e3/ },
  { name: 'line-fit path leaves the release', edit: (s) => s.replace(rel('1.0.0'), 'lineFits: linefits/fi0.csv', 'lineFits: ../1.1.0/linefits/fi0.csv'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), '../1.1.0'), field: 'detectors.fi0.lineFits', value: '../1.1.0/linefits/fi0.csv', expected: /no "\.\."/ },
  { name: 'unknown field in a model override', edit: (s) => s.replace(rel('1.1.0'), '    model:\n', '    model:\n      mirror: {}\n'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'mirror: {}'), field: 'detectors.fi0.model.mirror', expected: /stack, redistribution/ },
  { name: 'negative read noise in an override', edit: (s) => s.replace(rel('1.1.0'), 'readNoiseE: 3.9', 'readNoiseE: -2'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'readNoiseE: -2'), field: 'detectors.fi0.model.redistribution.fwhm.readNoiseE', value: -2, expected: /≥ 0/ },
  // ---- cross-file checks
  { name: 'unknown detector', edit: (s) => s.replace(rel('1.0.0'), '  bi1:\n', '  bi9:\n'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), 'bi9:'), field: 'detectors.bi9', value: 'bi9', expected: /fi0, bi1/ },
  { name: 'unknown instrument', edit: (s) => s.replace(rel('1.0.0'), 'instrument: quillon-tarncam', 'instrument: quillon-other'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), 'quillon-other'), field: 'instrument', value: 'quillon-other', expected: /quillon-tarncam/ },
  { name: 'supersedes a missing release', edit: (s) => s.replace(rel('1.1.0'), 'supersedes: 1.0.0', 'supersedes: 0.9.0'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'supersedes: 0.9.0'), field: 'supersedes', value: '0.9.0', expected: /1\.0\.0/ },
  { name: 'supersedes a newer release', edit: (s) => s.replace(rel('1.1.0'), 'supersedes: 1.0.0', 'supersedes: 2.0.0'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'supersedes: 2.0.0'), field: 'supersedes', value: '2.0.0', expected: /below 1\.1\.0/ },
  { name: 'superseded with no successor', edit: (s) => s.replace(rel('1.1.0'), 'supersedes: 1.0.0', 'supersedes: null'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), 'status: superseded'), field: 'status', value: 'superseded', expected: /supersedes: 1\.0\.0/ },
  { name: 'missing release notes', edit: (s) => s.remove(rel('2.0.0', 'notes.md')), file: rel('2.0.0', 'notes.md'), message: /file not found/, expected: /Markdown/ },
  { name: 'missing line-fit file', edit: (s) => s.remove(LF11B), file: LF11B, message: /file not found/, expected: /bi1/ },
  { name: 'line-fit file no detector uses', edit: (s) => s.write(rel('1.0.0', 'linefits/fi1.csv'), s.read(LF10)), file: rel('1.0.0', 'linefits/fi1.csv'), message: /not used/, expected: /detectors\.fi1/ },
  { name: 'override names a layer the instrument lacks', edit: (s) => s.replace(rel('1.1.0'), '      stack:\n', '      stack:\n        filters:\n          - { name: blocking-aluminum, thicknessUm: 0.1 }\n'), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), 'blocking-aluminum'), field: 'detectors.fi0.model.stack.filters[0].name', value: 'blocking-aluminum', expected: /"blocking-aluminium"/ },
  { name: 'switching source needs the whole law', edit: (s) => s.replace(rel('1.1.0'), '          offsetEv: 0\n', ''), file: rel('1.1.0'), line: (s) => s.lineOf(rel('1.1.0'), /^        centroid:$/), field: 'detectors.bi1.model.redistribution.centroid.offsetEv', message: /missing required field/ },
  { name: 'law field on a line-fits parameter', edit: (s) => s.replace(rel('1.0.0'), '    lineFits: linefits/bi1.csv\n', '    lineFits: linefits/bi1.csv\n    model:\n      redistribution:\n        tail: { fractionAtZero: 0.3 }\n'), file: rel('1.0.0'), line: (s) => s.lineOf(rel('1.0.0'), 'fractionAtZero: 0.3'), field: 'detectors.bi1.model.redistribution.tail.fractionAtZero', message: /unknown field "fractionAtZero"/ },
  // ---- line-fit CSV
  { name: 'FWHM column in keV', edit: (s) => s.replace(LF10, 'fwhm_eV,', 'fwhm_keV,'), file: LF10, line: (s) => s.lineOf(LF10, 'fwhm_keV'), field: (/column \d+/), value: 'fwhm_keV', message: /fwhm_keV.*unit keV.*eV only/, expected: /^fwhm_eV$/ },
  { name: 'unknown column', edit: (s) => s.replace(LF10, 'shelf_fraction', 'shelf_frac'), file: LF10, line: (s) => s.lineOf(LF10, 'shelf_frac,'), value: 'shelf_frac', message: /unknown column/, expected: /line,energy_keV,centroid_keV/ },
  { name: 'missing column', edit: (s) => s.replace(LF10, ',efficiency,efficiency_err', ',efficiency'), file: LF10, line: (s) => s.lineOf(LF10, 'line,energy_keV'), message: /missing column efficiency_err/ },
  { name: 'value not a number', edit: (s) => s.replace(LF10, /^(Mn Ka,5\.8950,)[\d.]+/m, '$15.89x'), file: LF10, line: (s) => s.lineOf(LF10, '5.89x'), field: 'centroid_keV (column 14)', value: '5.89x', expected: /decimal number in keV/ },
  { name: 'wrong field count', edit: (s) => s.replace(LF10, /^(Ti Ka,.*)$/m, '$1,7'), file: LF10, line: (s) => s.lineOf(LF10, 'Ti Ka,'), message: /13 fields, the header 12/ },
  { name: 'FWHM below the Fano limit', edit: (s) => s.replace(LF10, /^(Mn Ka,[^,]*,[^,]*,[^,]*,)[\d.]+/m, '$1100.00'), file: LF10, line: (s) => s.lineOf(LF10, 'Mn Ka,'), field: 'fwhm_eV', value: 100, message: /Fano limit/, expected: /≥ 11\d\.\d eV/ }, // Fano limit 2.3548·√(F·w·E) (Fano, Phys. Rev. 72, 26 (1947)): ≈117 eV at Mn Kα for F = 0.115, w = 3.65 eV; ≈119 with the demo's 0.118, 3.68
  { name: 'line outside the energy grid', edit: (s) => s.replace(LF10, /^Cu Ka,8\.0411,8\.04\d+/m, 'Cu Ka,14.0000,14.00000'), file: LF10, line: (s) => s.lineOf(LF10, 'Cu Ka,'), field: 'energy_keV', value: 14, expected: /\[0\.2, 12\] keV/ },
  { name: 'centroid in eV instead of keV', edit: (s) => s.replace(LF10, /^(Mn Ka,5\.8950,)[\d.]+/m, '$15895.0'), file: LF10, line: (s) => s.lineOf(LF10, 'Mn Ka,'), field: /centroid_keV/, value: 5895, message: /far from the line energy/ },
  { name: 'efficiency without its error', edit: (s) => s.replace(LF10, /^(Mn Ka,.*),[0-9.]+$/m, '$1,'), file: LF10, line: (s) => s.lineOf(LF10, 'Mn Ka,'), field: /efficiency_err/, message: /together/ },
  { name: 'line listed twice', edit: (s) => s.replace(LF10, /^Mn Kb,/m, 'Mn Ka,'), file: LF10, line: (s) => s.lastLineStarting(LF10, 'Mn Ka,'), field: /^line/, value: 'Mn Ka', message: /twice/ },
  { name: 'negative error', edit: (s) => s.replace(LF10, /^(Al Ka,[^,]*,[^,]*,[^,]*,[^,]*,)[\d.]+/m, '$1-0.63'), file: LF10, line: (s) => s.lineOf(LF10, 'Al Ka,'), field: /fwhm_err_eV/, value: -0.63, expected: /> 0 eV/ },
  { name: 'too few lines to interpolate', edit: (s) => s.write(LF11B, s.read(LF11B).split('\n').filter((l) => !/^(Ti|Mn)/.test(l)).join('\n')), file: LF11B, message: /too few lines to interpolate tail/, expected: /at least 2/ },
  { name: 'unterminated quote', edit: (s) => s.replace(LF10, /^Al Ka,/m, '"Al Ka,'), file: LF10, line: (s) => s.lineOf(LF10, '"Al Ka'), message: /unterminated/ },
];

describe('loadContent rejects broken content trees with a precise KilnInputError', () => {
  let s: Scratch | null = null;
  afterEach(() => {
    s?.dispose();
    s = null;
  });

  it.each(CASES)('$name', async (c) => {
    s = scratchCopy();
    c.edit(s);
    const err = await loadContent(s.root).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err, 'no error thrown').toBeInstanceOf(KilnInputError);
    const e = err as KilnInputError;
    const w = e.where;
    expect(w.file, e.oneLine()).toBe(join(s.root, c.file));
    if (c.line) expect(w.line, e.oneLine()).toBe(c.line(s));
    if (typeof c.field === 'string') expect(w.field, e.oneLine()).toBe(c.field);
    else if (c.field) expect(w.field, e.oneLine()).toMatch(c.field);
    if ('value' in c) expect(w.value, e.oneLine()).toEqual(c.value);
    if (c.message) expect(e.message).toMatch(c.message);
    if (c.expected) expect(w.expected, e.oneLine()).toMatch(c.expected);
    // One line for the user, no stack trace in it.
    expect(e.oneLine()).not.toMatch(/\n|\bat .*\.ts:\d+/);
  });

  it('the CSV error names the column number of the bad cell', () => {
    // Cross-check of the "column 14" above: the character column of the cell in the edited line.
    const t = scratchCopy();
    try {
      t.replace(LF10, /^(Mn Ka,5\.8950,)[\d.]+/m, '$15.89x');
      expect(columnOf(t, LF10, '5.89x')).toBe(14);
    } finally {
      t.dispose();
    }
  });

  it('a missing content directory and a stray file are input errors', async () => {
    await expect(loadContent('/nonexistent/kiln-content')).rejects.toMatchObject({ name: 'KilnInputError', where: { file: '/nonexistent/kiln-content' } });
    const t = scratchCopy();
    try {
      writeFileSync(join(t.root, 'releases', 'notes.txt'), 'x');
      await expect(loadContent(t.root)).rejects.toMatchObject({ name: 'KilnInputError', where: { file: join(t.root, 'releases', 'notes.txt') } });
    } finally {
      t.dispose();
    }
  });

  it('never reads the reserved archive/ directory as input', async () => {
    const t = scratchCopy();
    try {
      mkdirSync(join(t.root, 'archive', '0.9.0'), { recursive: true });
      writeFileSync(join(t.root, 'archive', '0.9.0', 'release.yaml'), 'not: [valid');
      const tree = await loadContent(t.root);
      expect(tree.releases.map((r) => r.release.id)).toEqual(['1.0.0', '1.1.0', '2.0.0', '2.1.0']);
    } finally {
      t.dispose();
    }
  });
});
