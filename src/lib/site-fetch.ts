/**
 * Browser side of the split site data: each document fetched at most once per page, and a
 * detector joined from its documents only when one of its sections is opened or plotted.
 */
import { checksPath, epochPath, modelPath, profilesPath, siteDataBase, SUMMARY_FILE, supplementPath } from '../../generators/site-data/paths.ts';
import { joinModel, withSupplement, type JoinedDetector } from '../../generators/site-data/split.ts';
import type { DetectorModelDoc, DetectorSupplementDoc, ReleaseSummaryDoc } from '../../generators/site-data/types.ts';

const docs = new Map<string, Promise<unknown>>();

export function fetchJson<T>(url: string): Promise<T> {
  let p = docs.get(url);
  if (!p) {
    p = fetch(url).then((r) => {
      if (!r.ok) throw new Error(`${url}: HTTP ${r.status}`);
      return r.json();
    });
    docs.set(url, p);
    p.catch(() => docs.delete(url)); // a failed fetch may be retried
  }
  return p as Promise<T>;
}

/** A release's summary by its key; `id` becomes the key, so labels and data paths name the release unambiguously (instrument~id where ids are shared). */
export const fetchSummary = (releaseKey: string): Promise<ReleaseSummaryDoc> => fetchJson<ReleaseSummaryDoc>(siteDataBase(releaseKey) + SUMMARY_FILE).then((s) => ({ ...s, id: releaseKey }));

export interface DetectorParts {
  profiles?: boolean;
  checks?: boolean;
  /** Only these epochs (default all). */
  epochs?: string[];
}

/** One detector of a release from its documents under `base` (…/detectors/<id>/'s release base). */
export async function fetchDetector(releaseId: string, detector: string, parts: DetectorParts = {}): Promise<JoinedDetector> {
  const base = siteDataBase(releaseId);
  const model = await fetchJson<DetectorModelDoc>(base + modelPath(detector));
  const epochs = parts.epochs ? model.epochs.filter((e) => parts.epochs!.includes(e.id)) : model.epochs;
  const paths = [
    ...epochs.map((e) => epochPath(detector, e.id)),
    ...(parts.profiles === false ? [] : [profilesPath(detector)]),
    ...(parts.checks === false ? [] : [checksPath(detector)]),
  ];
  if (model.supplement) paths.push(supplementPath(detector));
  const got = new Map<string, unknown>(await Promise.all(paths.map(async (p) => [p, await fetchJson(base + p)] as const)));
  const joined = joinModel(model, <T,>(p: string) => got.get(p) as T, { matrix: false, profiles: parts.profiles, checks: parts.checks, epochs: parts.epochs });
  // An archive's curves computed at this build beside its published ones.
  return model.supplement ? { ...joined, site: withSupplement(joined.site, got.get(supplementPath(detector)) as DetectorSupplementDoc) } : joined;
}

/** Release key of a data address (".../data/releases/<key>/..."), as siteDataBase builds it. */
export function parseReleaseSrc(src: string): string | null {
  const m = /\/data\/releases\/([^/]+)\//.exec(src);
  return m ? decodeURIComponent(m[1]) : null;
}

/** Release id and detector id of a figure's data-spec-src (".../data/releases/<id>/detectors/<det>/"). */
export function parseDetectorSrc(src: string): { releaseId: string; detector: string } | null {
  const m = /\/data\/releases\/([^/]+)\/detectors\/([^/]+)\/$/.exec(src);
  return m ? { releaseId: decodeURIComponent(m[1]), detector: decodeURIComponent(m[2]) } : null;
}
