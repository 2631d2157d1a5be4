/**
 * A release is identified by its instrument and its id: two instruments of one content tree may
 * both have a release 1.0.0. Its key, the name of its folder under releases/, is the place it
 * takes everywhere (build output, archive, site URLs, job ids): either the bare id (the layout
 * of a tree with one instrument) or `<instrument>~<id>`. "~" is in neither an instrument id nor
 * a semantic version, and is never percent-encoded in a URL (RFC 3986 unreserved).
 */
import { KilnInputError } from '../errors.ts';

export const RELEASE_KEY_SEPARATOR = '~';

/** The qualified name of a release, accepted by every verb whatever the folder layout. */
export const qualifiedReleaseName = (instrument: string, id: string): string => `${instrument}${RELEASE_KEY_SEPARATOR}${id}`;

/** The release id part of a key. */
export const idOfKey = (key: string): string => key.slice(key.lastIndexOf(RELEASE_KEY_SEPARATOR) + 1);

/** The folder names a release of this instrument and id may have. */
export const allowedReleaseKeys = (instrument: string, id: string): string[] => [id, qualifiedReleaseName(instrument, id)];

export interface NamedRelease {
  key: string;
  id: string;
  instrument: string;
}

/**
 * The release a user named: its key, its qualified name, or its bare id when only one
 * instrument has a release of that id. An unknown or ambiguous name is an input error listing
 * the candidates (exit 2).
 */
export function findReleaseByName<T extends NamedRelease>(releases: readonly T[], name: string, where: { file: string; field?: string }): T {
  // A bare id used by several instruments is ambiguous even where one of them keeps it as its folder name.
  const byId = releases.filter((r) => r.id === name);
  if (byId.length > 1)
    throw new KilnInputError(`release id ${name} is used by ${byId.length} instruments`, {
      ...where,
      value: name,
      // Sorted, so the message is the same whether the list came from the content tree (oldest first) or the index (newest first).
      expected: `an instrument-qualified name: ${byId.map((r) => qualifiedReleaseName(r.instrument, r.id)).sort().join(', ')}`,
    });
  const exact = releases.find((r) => r.key === name || qualifiedReleaseName(r.instrument, r.id) === name);
  if (exact) return exact;
  if (byId.length === 1) return byId[0];
  throw new KilnInputError('no such release', {
    ...where,
    value: name,
    expected: `one of ${releases.map((r) => qualifiedReleaseName(r.instrument, r.id)).join(', ') || '(no release in the content tree)'} (or a bare id where only one instrument uses it)`,
  });
}
