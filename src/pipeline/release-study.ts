/**
 * releaseStudy: freeze a study's built results in the archive (`myofolio release`).
 *
 *   archive.json ──▶ the study          <out>/.myofolio-archive.json ──▶ the key it was built from
 *   the study's files now ──key──▶ equal to the built key? (else: build again first)
 *   <out>/studies/<id>/downloads/results.json + the caveats it went out with
 *     ──createRelease──▶ <archive>/releases/<id>/<yyyy-mm-dd>-<n>/{results.json, release.json}, read-only
 *
 * The release is made from the built results.json byte for byte, only when that build is what the
 * study's files say now; the study folder is never written.
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { ARCHIVE_MANIFEST_NAME } from '../archive/manifest.js';
import { ARCHIVE_MSG } from '../archive/messages.js';
import { type StoredRelease, createRelease } from '../archive/release-store.js';
import { RELEASES_DIR } from '../archive/release.js';
import { ARCHIVE_PATHS } from '../archive-site/paths.js';
import type { StudyResults } from '../results/types.js';
import { STANDARD_CAVEATS } from '../site/view-common.js';
import { issue } from '../study/messages.js';
import type { Issue } from '../study/types.js';
import { readArchive, studyReleases } from './archive-input.js';
import { archiveStudyKey, readArchiveState } from './build-archive.js';
import { installedFingerprint } from './fingerprint.js';

export interface ReleaseStudyRequest {
  studyId: string;
  note: string;
  /** YYYY-MM-DD. */
  date: string;
  /** The archive's built output folder (where `myofolio build` wrote it). */
  out: string;
  /** As for the build that is released (a key includes it). */
  sourceDateEpoch?: number;
  fingerprint?: string;
}

export async function releaseStudy(archiveDir: string, request: ReleaseStudyRequest): Promise<{ release?: StoredRelease; results?: StudyResults; issues: Issue[] }> {
  const read = readArchive(archiveDir);
  if (!read.manifest) return { issues: read.issues };
  const manifest = read.manifest;
  const ref = manifest.studies.find((s) => s.id === request.studyId);
  if (!ref) return { issues: [issue(ARCHIVE_MSG.releaseUnknownStudy(request.studyId, manifest.studies.map((s) => s.id)), { file: ARCHIVE_MANIFEST_NAME, jsonPath: '/studies' })] };
  const shownOut = request.out;
  const resultsFile = path.join(request.out, ...ARCHIVE_PATHS.studyRoot(ref.id).split('/'), 'downloads', 'results.json');
  const state = readArchiveState(request.out);
  const built = state?.studies[ref.id];
  if (!built || !existsSync(resultsFile)) return { issues: [issue(ARCHIVE_MSG.releaseNotBuilt(ref.id, shownOut), { file: RELEASES_DIR })] };

  // The build must be what the study's files (and its release history, and this tool) say now.
  const own = await studyReleases(archiveDir, ref.id);
  if (own.issues.some((i) => i.severity === 'error')) return { issues: own.issues };
  const latest = own.releases[own.releases.length - 1];
  const key = archiveStudyKey(archiveDir, manifest, ref, latest, { fingerprint: request.fingerprint ?? installedFingerprint(), sourceDateEpoch: request.sourceDateEpoch });
  if (key !== built.key) return { issues: [issue(ARCHIVE_MSG.releaseStaleBuild(ref.id, shownOut), { file: ref.path })] };

  let results: StudyResults;
  try {
    results = JSON.parse(readFileSync(resultsFile, 'utf8')) as StudyResults;
  } catch (err) {
    return { issues: [issue(ARCHIVE_MSG.releaseUnreadable(resultsFile, err instanceof Error ? err.message : String(err)), { file: RELEASES_DIR })] };
  }
  // The caveats the results go out with: those every report carries, then the study's own.
  const caveats = [...STANDARD_CAVEATS, ...results.study.caveats];
  const made = await createRelease(archiveDir, { studyId: ref.id, results: { file: resultsFile }, caveats, note: request.note, date: request.date });
  return { ...made, ...(made.release ? { results } : {}) };
}
