/**
 * The archive folder on disk: archive.json, its study folders and its releases, read and checked
 * (I/O; the rules are in src/archive/). Issues name files relative to the archive folder: a study's
 * own issues get the study's path in front ('studies/panel-2025/atpase-rates.csv:12:3').
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { ARCHIVE_MANIFEST_NAME, type ArchiveManifest, type ArchiveStudyRef, readArchiveManifest } from '../archive/manifest.js';
import { ARCHIVE_MSG } from '../archive/messages.js';
import { type StoredRelease, listReleases, loadRelease } from '../archive/release-store.js';
import type { StudyResults } from '../results/types.js';
import { loadStudy } from '../study/load.js';
import { issue } from '../study/messages.js';
import { readStudyFolder } from '../study/read-folder.js';
import { MANIFEST_NAME } from '../study/schemas.js';
import type { Issue } from '../study/types.js';

/** Does this folder hold an archive (an archive.json)? */
export function isArchiveFolder(dir: string): boolean {
  return existsSync(join(dir, ARCHIVE_MANIFEST_NAME));
}

/** A study folder inside the archive folder. */
export function studyDirOf(archiveDir: string, ref: ArchiveStudyRef): string {
  return join(archiveDir, ...ref.path.split('/'));
}

/** A study's issues with file names relative to the archive folder. */
export function underStudy(issues: readonly Issue[], ref: ArchiveStudyRef): Issue[] {
  return issues.map((i) => ({ ...i, at: { ...i.at, file: `${ref.path}/${i.at.file}` } }));
}

/** archive.json read and checked, and every study folder present with its study.json. */
export function readArchive(archiveDir: string): { manifest?: ArchiveManifest; issues: Issue[] } {
  let text: string;
  try {
    text = readFileSync(join(archiveDir, ARCHIVE_MANIFEST_NAME), 'utf8');
  } catch (err) {
    return { issues: [issue(ARCHIVE_MSG.unreadable(ARCHIVE_MANIFEST_NAME, (err as NodeJS.ErrnoException).code ?? String(err)), { file: ARCHIVE_MANIFEST_NAME })] };
  }
  const read = readArchiveManifest(text);
  if (!read.manifest) return { issues: read.issues };
  const issues = [...read.issues];
  for (const ref of read.manifest.studies) {
    const dir = studyDirOf(archiveDir, ref);
    const at = { ...ref.at, jsonPath: `${ref.at.jsonPath}/path` };
    if (!existsSync(dir) || !statSync(dir).isDirectory()) issues.push(issue(ARCHIVE_MSG.studyMissing(ref.path), at));
    else if (!existsSync(join(dir, MANIFEST_NAME))) issues.push(issue(ARCHIVE_MSG.studyNoManifest(ref.path, MANIFEST_NAME), at));
  }
  return issues.some((i) => i.severity === 'error') ? { issues } : { manifest: read.manifest, issues };
}

/** A study's releases, oldest first, each with its verified results; damaged releases are issues. */
export async function studyReleases(archiveDir: string, studyId: string): Promise<{ releases: Array<StoredRelease & { results: StudyResults }>; issues: Issue[] }> {
  const listed = await listReleases(archiveDir, studyId, { verify: false });
  const issues = [...listed.issues];
  const releases: Array<StoredRelease & { results: StudyResults }> = [];
  for (const r of listed.releases) {
    const loaded = await loadRelease(archiveDir, studyId, r.record.id);
    issues.push(...loaded.issues);
    if (loaded.release) releases.push({ record: loaded.release.record, folder: loaded.release.folder, resultsPath: loaded.release.resultsPath, results: loaded.release.results });
  }
  return { releases, issues };
}

/**
 * What a study's site in the archive is built from, as one SHA-256: the study's manifest and every
 * file it names (path and bytes), and `context` (the code fingerprint, the latest release, the
 * archive's title, the build time stamp). Equal keys give equal study sites, so a study whose key
 * is unchanged need not be built again. undefined when the folder cannot be read.
 */
export function studyInputKey(studyDir: string, context: unknown): string | undefined {
  let folder;
  try {
    folder = readStudyFolder(studyDir);
  } catch {
    return undefined;
  }
  const hash = createHash('sha256').update(JSON.stringify(context)).update('\0manifest\0').update(folder.manifest);
  for (const path of [...folder.files.keys()].sort()) hash.update(`\0${path}\0`).update(folder.files.get(path)!);
  hash.update(`\0issues\0${JSON.stringify(folder.readIssues)}`);
  return hash.digest('hex');
}

/** `myofolio check` of an archive: archive.json, every study as `check` reads it, every release verified. */
export async function checkArchive(archiveDir: string): Promise<{ issues: Issue[]; studies: number; releases: number }> {
  const read = readArchive(archiveDir);
  if (!read.manifest) return { issues: read.issues, studies: 0, releases: 0 };
  const issues = [...read.issues];
  let releases = 0;
  for (const ref of read.manifest.studies) {
    let files;
    try {
      files = readStudyFolder(studyDirOf(archiveDir, ref));
    } catch (err) {
      issues.push(issue(ARCHIVE_MSG.unreadable(ref.path, err instanceof Error ? err.message : String(err)), { ...ref.at, jsonPath: `${ref.at.jsonPath}/path` }));
      continue;
    }
    issues.push(...underStudy(loadStudy(files).issues, ref));
    const listed = await listReleases(archiveDir, ref.id);
    issues.push(...listed.issues);
    releases += listed.releases.length;
  }
  return { issues, studies: read.manifest.studies.length, releases };
}
