/** The jobs of a built release, read back from its model document (build and plan use the same). */
import type { ResolvedRelease } from '../content/types.ts';
import { XRAY_TABLE } from '../physics/data/xray-elements.ts';
import { jobsFromModel, modelDocumentOf } from '../model/document.ts';
import { parseModelDocument } from '../model/parse.ts';
import { MODEL_FILE } from '../model/types.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import { jobsOf } from './inputs.ts';
import type { DetectorJob } from './job.ts';

/**
 * The release's model document (canonical JSON) and the jobs read back from it: the build's own
 * products are made from the document, exactly as anything outside the build would remake them.
 * Each job also carries the document to rebuild its products through the case path (rebuild check).
 */
export function modelJobs(r: ResolvedRelease): { jobs: DetectorJob[]; model: { text: string; bytes: number; sha256: string } } {
  const own = jobsOf(r);
  const text = canonicalJson(modelDocumentOf(own, XRAY_TABLE)) + '\n';
  const sha256 = sha256Hex(text);
  const doc = parseModelDocument(text, `${r.release.id}/${MODEL_FILE}`);
  // How the checks judge (release status, stated tolerances) is the release's, not the model's.
  const settings = new Map(own.map((j) => [j.detector.id, j.checks]));
  const jobs = jobsFromModel(doc, sha256).map((j) => ({ ...j, rebuildFrom: doc, checks: settings.get(j.detector.id) }));
  return { jobs, model: { text, bytes: new TextEncoder().encode(text).length, sha256 } };
}
