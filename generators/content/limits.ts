/**
 * Size limits of content files, per kind (README "Limits"). Each is far above what a real
 * calibration needs (the demo's largest YAML is a few KiB, its largest CSV a few tens of KiB) and
 * far below what would hurt a build machine or a site page. Common practice, no source.
 */
const KIB = 1024;
const MIB = 1024 * KIB;

/** instrument.yaml, release.yaml. */
export const MAX_YAML_BYTES = 1 * MIB;
/** notes.md: rendered into the release page as it is. */
export const MAX_NOTES_BYTES = 1 * MIB;
/** mirror-area.csv, linefits/*.csv. */
export const MAX_CSV_BYTES = 16 * MIB;

export const LIMIT_NAMES = {
  yaml: 'the YAML file limit',
  notes: 'the release notes limit',
  csv: 'the CSV table limit',
} as const;
