/**
 * The releases folder of an archive, on disk (I/O; the rules and the record are in release.ts).
 *
 *   <archive>/releases/<study-id>/<yyyy-mm-dd>-<n>/results.json   released bytes (read-only, 0444)
 *   <archive>/releases/<study-id>/<yyyy-mm-dd>-<n>/release.json   ReleaseRecord (read-only, 0444)
 *
 * Writing a release is all or nothing and happens once: both files are written into a new
 * temporary folder beside the final one (`.incomplete-…`), flushed to disk, and the folder is then
 * renamed to its final name. rename(2) onto an existing non-empty folder fails, so a release folder
 * is never replaced, even by two releases racing for the same number (the later one takes the next
 * number). Nothing here deletes anything but its own temporary folder.
 *
 * Reading checks every results.json against the SHA-256 in its release.json: an altered release is
 * reported as an issue and never served. Paths in issues are relative to the archive folder.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { chmod, copyFile, lstat, mkdir, mkdtemp, open, readdir, readFile, rename, rm, stat, unlink, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { StudyResults } from '../results/types.js';
import { issue } from '../study/messages.js';
import type { Issue } from '../study/types.js';
import { ARCHIVE_MSG } from './messages.js';
import {
  checkResultsText,
  compareReleaseIds,
  isStudyId,
  makeReleaseRecord,
  parseReleaseId,
  readReleaseRecord,
  releasePaths,
  releaseRecordText,
  resultsHead,
  RELEASE_RECORD_FILE,
  RELEASE_RESULTS_FILE,
  RELEASES_DIR,
  type ReleaseRecord,
} from './release.js';

/** Prefix of the temporary folder of a release being written. */
const INCOMPLETE_PREFIX = '.incomplete-';

/**
 * Results up to this size are parsed and checked against schemas/results.schema.json before they
 * are released; larger ones (10,000-variant studies, beyond V8's longest string) are checked by
 * their first bytes only (resultsHead), as the build wrote them.
 */
export const RELEASE_SCHEMA_CHECK_MAX_BYTES = 256 * 1024 * 1024;

/** How many times a release takes the next number when another release took its number meanwhile. */
const RENUMBER_ATTEMPTS = 5;

/** A release found in the archive. */
export interface StoredRelease {
  record: ReleaseRecord;
  /** Folder relative to the archive folder, with forward slashes. */
  folder: string;
  /** Absolute path of the released results.json (for the caller to read). */
  resultsPath: string;
}

export interface ReleaseRequest {
  studyId: string;
  /** The results.json to release: a file (copied byte for byte), or its bytes. */
  results: { file: string } | { bytes: Uint8Array };
  caveats: readonly string[];
  note: string;
  /** YYYY-MM-DD, chosen at the edge (the CLI's clock or its --date). */
  date: string;
}

const posix = (p: string) => p.split(path.sep).join('/');

function reasonOf(err: unknown): string {
  const e = err as NodeJS.ErrnoException;
  return e?.code ? `${e.code}${e.syscall ? ` (${e.syscall})` : ''}` : String((err as Error)?.message ?? err);
}

/** SHA-256 of a file, read as a stream (files may be larger than one string or buffer may hold). */
export async function sha256OfFile(file: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

async function readHead(file: string, bytes = 4096): Promise<string> {
  const handle = await open(file, 'r');
  try {
    const buf = Buffer.alloc(bytes);
    const { bytesRead } = await handle.read(buf, 0, bytes, 0);
    return buf.subarray(0, bytesRead).toString('utf8');
  } finally {
    await handle.close();
  }
}

async function syncFile(file: string): Promise<void> {
  const handle = await open(file, 'r');
  try {
    await handle.sync();
  } finally {
    await handle.close();
  }
}

/** Flush a folder's entries (the rename) to disk; some systems cannot open folders for this, which is harmless. */
async function syncFolder(folder: string): Promise<void> {
  try {
    await syncFile(folder);
  } catch {
    /* not supported here */
  }
}

function studyFolder(archiveDir: string, studyId: string): string {
  return path.join(archiveDir, RELEASES_DIR, studyId);
}

async function existingIds(archiveDir: string, studyId: string): Promise<string[]> {
  try {
    return (await readdir(studyFolder(archiveDir, studyId))).filter((name) => parseReleaseId(name) !== undefined);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return [];
    throw err;
  }
}

/**
 * Rename the finished temporary folder to its final name, never replacing anything: false when the
 * final name exists (checked first, and by rename(2) itself, which fails on a non-empty folder, for
 * a folder made in between).
 */
export async function moveIntoPlace(tmp: string, final: string): Promise<boolean> {
  try {
    await lstat(final);
    return false;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
  }
  try {
    await rename(tmp, final);
    return true;
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOTEMPTY' || code === 'EEXIST') return false;
    throw err;
  }
}

/**
 * Release a study's results: copy results.json into a new release folder with its record.
 * Returns the release, or the issues that stopped it (then nothing was written).
 */
export async function createRelease(
  archiveDir: string,
  request: ReleaseRequest,
  options: { schemaCheckMaxBytes?: number } = {},
): Promise<{ release?: StoredRelease; issues: Issue[] }> {
  const schemaCheckMaxBytes = options.schemaCheckMaxBytes ?? RELEASE_SCHEMA_CHECK_MAX_BYTES;
  const where = (p: string, jsonPath?: string) => ({ file: p, ...(jsonPath ? { jsonPath } : {}) });
  if (!isStudyId(request.studyId)) return { issues: [issue(ARCHIVE_MSG.releaseStudyId(request.studyId), where(RELEASES_DIR))] };
  const parent = studyFolder(archiveDir, request.studyId);
  const parentRel = `${RELEASES_DIR}/${request.studyId}`;
  let tmp: string | undefined;
  try {
    // The archive folder must exist already (it holds archive.json); only releases/<study>/ is made here.
    if (!(await stat(archiveDir)).isDirectory()) throw Object.assign(new Error('the archive folder is not a folder'), { code: 'ENOTDIR' });
    await mkdir(parent, { recursive: true });
    tmp = await mkdtemp(path.join(parent, INCOMPLETE_PREFIX));
    const results = path.join(tmp, RELEASE_RESULTS_FILE);

    // 1. The released bytes, and what they are.
    if ('file' in request.results) await copyFile(request.results.file, results);
    else await writeFile(results, request.results.bytes, { flag: 'wx' });
    await syncFile(results);
    const size = (await stat(results)).size;
    let toolVersion: string;
    if (size <= schemaCheckMaxBytes) {
      const text = (await readFile(results, 'utf8')).replace(/^\uFEFF/, '');
      const checked = checkResultsText(text);
      if (!checked.results) return { issues: checked.problems.map((p) => issue(p, where(`${parentRel}/${RELEASE_RESULTS_FILE}`))) };
      toolVersion = checked.results.tool.version;
    } else {
      const head = resultsHead(await readHead(results));
      if ('problem' in head) return { issues: [issue(head.problem, where(`${parentRel}/${RELEASE_RESULTS_FILE}`))] };
      toolVersion = head.toolVersion;
    }
    const resultsSha256 = await sha256OfFile(results);

    // 2. The record, and the rename that makes the release; the next number when ours was taken.
    for (let attempt = 0; attempt < RENUMBER_ATTEMPTS; attempt++) {
      const made = makeReleaseRecord({
        studyId: request.studyId,
        date: request.date,
        note: request.note,
        caveats: request.caveats,
        toolVersion,
        resultsSha256,
        existingIds: await existingIds(archiveDir, request.studyId),
      });
      // The field names the request's part at fault (date, note, caveats/<i>), under the study's releases folder.
      if (!made.record) return { issues: made.problems.map((p) => issue(p.text, where(parentRel, `/${p.field}`))) };
      const record = made.record;
      const paths = releasePaths(request.studyId, record.id);
      const recordFile = path.join(tmp, RELEASE_RECORD_FILE);
      await unlink(recordFile).catch(() => undefined);
      await writeFile(recordFile, releaseRecordText(record), { flag: 'wx' });
      await syncFile(recordFile);
      await chmod(results, 0o444);
      await chmod(recordFile, 0o444);
      const final = path.join(archiveDir, ...paths.folder.split('/'));
      if (!(await moveIntoPlace(tmp, final))) continue;
      tmp = undefined;
      await syncFolder(parent);
      return { release: { record, folder: paths.folder, resultsPath: path.join(final, RELEASE_RESULTS_FILE) }, issues: [] };
    }
    return { issues: [issue(ARCHIVE_MSG.releaseWriteFailed(parentRel, 'other releases of the same day kept taking the next number'), where(parentRel))] };
  } catch (err) {
    return { issues: [issue(ARCHIVE_MSG.releaseWriteFailed(parentRel, reasonOf(err)), where(parentRel))] };
  } finally {
    if (tmp) await rm(tmp, { recursive: true, force: true });
  }
}

/**
 * The releases of one study, oldest first, each checked: its record is whole, names this study and
 * this folder, and (with `verify`, the default) its results.json has the recorded SHA-256. Releases
 * that fail a check are left out and reported as issues.
 */
export async function listReleases(archiveDir: string, studyId: string, options: { verify?: boolean } = {}): Promise<{ releases: StoredRelease[]; issues: Issue[] }> {
  const verify = options.verify ?? true;
  const issues: Issue[] = [];
  const releases: StoredRelease[] = [];
  if (!isStudyId(studyId)) return { releases, issues: [issue(ARCHIVE_MSG.releaseStudyId(studyId), { file: RELEASES_DIR })] };
  let names: string[];
  try {
    names = await readdir(studyFolder(archiveDir, studyId));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return { releases, issues };
    return { releases, issues: [issue(ARCHIVE_MSG.releaseUnreadable(`${RELEASES_DIR}/${studyId}`, reasonOf(err)), { file: `${RELEASES_DIR}/${studyId}` })] };
  }
  for (const name of names.sort()) {
    const rel = `${RELEASES_DIR}/${studyId}/${name}`;
    const abs = path.join(studyFolder(archiveDir, studyId), name);
    if (name.startsWith(INCOMPLETE_PREFIX)) {
      issues.push(issue(ARCHIVE_MSG.releaseIncomplete(rel), { file: rel }));
      continue;
    }
    if (!(await lstat(abs)).isDirectory()) continue;
    if (!parseReleaseId(name)) {
      issues.push(issue(ARCHIVE_MSG.releaseStrayFolder(rel), { file: rel }));
      continue;
    }
    const checked = await checkRelease(abs, rel, studyId, name, verify);
    issues.push(...checked.issues);
    if (checked.record) releases.push({ record: checked.record, folder: posix(rel), resultsPath: path.join(abs, RELEASE_RESULTS_FILE) });
  }
  releases.sort((a, b) => compareReleaseIds(a.record.id, b.record.id));
  return { releases, issues };
}

async function checkRelease(abs: string, rel: string, studyId: string, id: string, verify: boolean): Promise<{ record?: ReleaseRecord; issues: Issue[] }> {
  const recordRel = `${rel}/${RELEASE_RECORD_FILE}`;
  const resultsRel = `${rel}/${RELEASE_RESULTS_FILE}`;
  let text: string;
  try {
    text = await readFile(path.join(abs, RELEASE_RECORD_FILE), 'utf8');
  } catch (err) {
    const missing = (err as NodeJS.ErrnoException).code === 'ENOENT';
    return { issues: [issue(missing ? ARCHIVE_MSG.releaseMissingFile(RELEASE_RECORD_FILE) : ARCHIVE_MSG.releaseUnreadable(recordRel, reasonOf(err)), { file: recordRel })] };
  }
  const read = readReleaseRecord(text);
  if (!read.record) return { issues: read.problems.map((p) => issue(p.text, { file: recordRel, jsonPath: p.jsonPath })) };
  const record = read.record;
  if (record.study !== studyId || record.id !== id) return { issues: [issue(ARCHIVE_MSG.recordFolderMismatch(rel, record.study, record.id), { file: recordRel })] };
  if (verify) {
    let found: string;
    try {
      found = await sha256OfFile(path.join(abs, RELEASE_RESULTS_FILE));
    } catch (err) {
      const missing = (err as NodeJS.ErrnoException).code === 'ENOENT';
      return { issues: [issue(missing ? ARCHIVE_MSG.releaseMissingFile(RELEASE_RESULTS_FILE) : ARCHIVE_MSG.releaseUnreadable(resultsRel, reasonOf(err)), { file: resultsRel })] };
    }
    if (found !== record.resultsSha256) return { issues: [issue(ARCHIVE_MSG.releaseHashMismatch(record.resultsSha256, found), { file: resultsRel })] };
  }
  return { record, issues: [] };
}

/**
 * One release with its results, verified: the bytes read are the bytes hashed, so what is returned
 * is exactly what was released.
 */
export async function loadRelease(
  archiveDir: string,
  studyId: string,
  releaseId: string,
): Promise<{ release?: StoredRelease & { results: StudyResults; bytes: Buffer }; issues: Issue[] }> {
  if (!isStudyId(studyId)) return { issues: [issue(ARCHIVE_MSG.releaseStudyId(studyId), { file: RELEASES_DIR })] };
  if (!parseReleaseId(releaseId)) return { issues: [issue(ARCHIVE_MSG.releaseStrayFolder(`${RELEASES_DIR}/${studyId}/${releaseId}`), { file: `${RELEASES_DIR}/${studyId}` })] };
  const paths = releasePaths(studyId, releaseId);
  const abs = path.join(archiveDir, ...paths.folder.split('/'));
  const checked = await checkRelease(abs, paths.folder, studyId, releaseId, false);
  if (!checked.record) return { issues: checked.issues };
  let bytes: Buffer;
  try {
    bytes = await readFile(path.join(abs, RELEASE_RESULTS_FILE));
  } catch (err) {
    const missing = (err as NodeJS.ErrnoException).code === 'ENOENT';
    return { issues: [issue(missing ? ARCHIVE_MSG.releaseMissingFile(RELEASE_RESULTS_FILE) : ARCHIVE_MSG.releaseUnreadable(paths.results, reasonOf(err)), { file: paths.results })] };
  }
  const found = createHash('sha256').update(bytes).digest('hex');
  if (found !== checked.record.resultsSha256) return { issues: [issue(ARCHIVE_MSG.releaseHashMismatch(checked.record.resultsSha256, found), { file: paths.results })] };
  const parsed = checkResultsText(bytes.toString('utf8').replace(/^\uFEFF/, ''));
  if (!parsed.results) return { issues: parsed.problems.map((p) => issue(p, { file: paths.results })) };
  return { release: { record: checked.record, folder: paths.folder, resultsPath: path.join(abs, RELEASE_RESULTS_FILE), results: parsed.results, bytes }, issues: [] };
}

/** The latest release of a study with its results (verified), or none; issues of damaged releases come with it. */
export async function loadLatestRelease(archiveDir: string, studyId: string): ReturnType<typeof loadRelease> {
  const listed = await listReleases(archiveDir, studyId, { verify: false });
  const latest = listed.releases[listed.releases.length - 1];
  if (!latest) return { issues: listed.issues };
  const loaded = await loadRelease(archiveDir, studyId, latest.record.id);
  return { ...loaded, issues: [...listed.issues, ...loaded.issues] };
}
