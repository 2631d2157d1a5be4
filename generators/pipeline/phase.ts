/**
 * Test hook: `KILN_STOP_AT=<phase>` makes the process kill itself with SIGKILL when it reaches
 * that named phase, so crash tests can cut a build, site build or publish at an exact moment
 * instead of at a random time. Read only here; unset in normal use (DEVELOPERS.md lists the phases).
 */
export const STOP_ENV = 'KILN_STOP_AT';

/** Every named phase, in the order a step reaches them. */
export const PHASES = [
  'build:verified', // content loaded, archives verified, nothing written yet
  'build:staged', // the complete output is in its staging directory
  'build:swap', // between the two renames of the swap (the old output moved aside)
  'site:staged', // the site is built into its staging directory
  'site:swap', // between the two renames of the site's swap
  'publish:built', // the release is built in a temporary directory
  'publish:staged', // the archive is complete in its staging directory in content/archive
  'publish:archived', // the archive is in place, release.yaml not yet changed
  'publish:supersede-temp', // the superseded release's new release.yaml is beside the old one, not yet renamed
  'publish:status-temp', // the new release.yaml is written beside the old one, not yet renamed
] as const;
export type Phase = (typeof PHASES)[number];

export function reached(phase: Phase): void {
  if (process.env[STOP_ENV] === phase) process.kill(process.pid, 'SIGKILL');
}
