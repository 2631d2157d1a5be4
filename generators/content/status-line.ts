/**
 * The `status:` line of release.yaml as text: the one field Kiln itself changes in a release
 * file (publishing), so comments and layout stay as the team wrote them. Also the
 * status-independent form of release.yaml that a seal hashes, and the rule that a status only
 * moves forward once a release is archived. Pure.
 */
import { RELEASE_STATUSES } from './schema.ts';

export type ReleaseStatus = (typeof RELEASE_STATUSES)[number];

/** A top-level `status: value` line, optionally quoted, optionally with a comment. */
const STATUS_LINE_RE = /^status:[ \t]*(["']?)([a-z]+)\1[ \t]*(#.*)?$/m;

/** Placeholder of the status value in the hashed form (no status is spelt like this). */
const STATUS_PLACEHOLDER = '~';

/** The text with its status set to `status`; null when there is no plain status line to change. */
export function withStatus(text: string, status: ReleaseStatus): string | null {
  if (!STATUS_LINE_RE.test(text)) return null;
  return text.replace(STATUS_LINE_RE, (_m, _q, _v, comment: string | undefined) => `status: ${status}${comment ? ' ' + comment : ''}`);
}

/** release.yaml with its status value replaced by a placeholder: publishing does not change it. */
export function statusIndependentText(text: string): string {
  return text.replace(STATUS_LINE_RE, (_m, _q, _v, comment: string | undefined) => `status: ${STATUS_PLACEHOLDER}${comment ? ' ' + comment : ''}`);
}

/** Statuses an archived release may have, in the only order it may move through them. */
export const ARCHIVED_ORDER: readonly ReleaseStatus[] = ['published', 'superseded', 'withdrawn'];

/** May a release whose archive was sealed as `sealed` now carry `status`? */
export function isForwardOf(sealed: ReleaseStatus, status: ReleaseStatus): boolean {
  const from = ARCHIVED_ORDER.indexOf(sealed);
  const to = ARCHIVED_ORDER.indexOf(status);
  return from >= 0 && to >= from;
}
