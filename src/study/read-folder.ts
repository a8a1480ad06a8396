/**
 * The I/O side of loading: read a study folder into StudyFiles for the pure loadStudy.
 * Refuses manifest paths that leave the folder (also through symbolic links) and anything
 * that is not a regular file (directories, devices such as /dev/zero, FIFOs, sockets);
 * refuses files larger than MAX_INPUT_FILE_BYTES before reading them; computes SHA-256 of
 * every file read.
 *
 * Size policy: every file (manifest and CSV) may be at most MAX_INPUT_FILE_BYTES (64 MiB).
 * A file is parsed in memory (text, then rows), which takes several times its size; the limit
 * keeps a build within about 1–2 GB. Larger data sets are split into several files of the same
 * kind, which the manifest may list one after another.
 */
import { closeSync, constants, fstatSync, openSync, readFileSync, realpathSync } from 'node:fs';
import { join, relative, sep, isAbsolute } from 'node:path';
import { INPUT } from '../defaults.js';
import { isInsideFolder, sha256Hex, type StudyFiles } from './load.js';
import { MSG, issue } from './messages.js';
import { MANIFEST_NAME } from './schemas.js';
import type { Issue } from './types.js';

/** Largest file myofolio reads, in bytes (INPUT.maxFileBytes in src/defaults.ts). See the size policy above. */
export const MAX_INPUT_FILE_BYTES = INPUT.maxFileBytes;

type ReadResult = { ok: true; bytes: Uint8Array } | { ok: false; why: 'not-a-file' } | { ok: false; why: 'too-large'; size: number } | { ok: false; why: 'unreadable'; reason: string };

/**
 * Read one regular file without ever blocking or reading without end: opened with O_NONBLOCK
 * (a FIFO opens at once instead of waiting for a writer), checked with fstat on the open
 * descriptor (so the checked file is the read file), size-limited before reading.
 */
export function readRegularFile(full: string, limit = MAX_INPUT_FILE_BYTES): ReadResult {
  let fd: number;
  try {
    fd = openSync(full, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EISDIR') return { ok: false, why: 'not-a-file' };
    return { ok: false, why: 'unreadable', reason: code ?? String(err) };
  }
  try {
    const st = fstatSync(fd);
    if (!st.isFile()) return { ok: false, why: 'not-a-file' };
    if (st.size > limit) return { ok: false, why: 'too-large', size: st.size };
    const bytes = readFileSync(fd);
    // A file that grew after fstat (being written) is also refused.
    if (bytes.length > limit) return { ok: false, why: 'too-large', size: bytes.length };
    return { ok: true, bytes };
  } catch (err) {
    return { ok: false, why: 'unreadable', reason: (err as NodeJS.ErrnoException).code ?? String(err) };
  } finally {
    closeSync(fd);
  }
}

function insideRoot(root: string, real: string): boolean {
  const rel = relative(root, real);
  return rel !== '' && !isAbsolute(rel) && !rel.startsWith('..') && !rel.split(sep).includes('..');
}

/** Read the manifest and every file it names. Throws only when the folder itself cannot be read. */
export function readStudyFolder(dir: string): StudyFiles & { files: ReadonlyMap<string, Uint8Array>; readIssues: Issue[] } {
  const root = realpathSync(dir);
  const files = new Map<string, Uint8Array>();
  const sha256 = new Map<string, string>();
  const readIssues: Issue[] = [];

  // The manifest: a regular file inside the folder, within the size limit.
  let manifestBytes: Uint8Array = new Uint8Array(0);
  let manifestReal: string | undefined;
  try {
    manifestReal = realpathSync(join(root, MANIFEST_NAME));
  } catch {
    readIssues.push(issue(MSG.manifestMissing(MANIFEST_NAME), { file: MANIFEST_NAME }));
  }
  if (manifestReal !== undefined) {
    const got = insideRoot(root, manifestReal) ? readRegularFile(manifestReal) : ({ ok: false, why: 'not-a-file' } as const);
    if (got.ok) manifestBytes = got.bytes;
    else if (got.why === 'too-large') readIssues.push(issue(MSG.fileTooLarge(MANIFEST_NAME, got.size, MAX_INPUT_FILE_BYTES), { file: MANIFEST_NAME }));
    else if (got.why === 'unreadable') readIssues.push(issue(MSG.unreadable(MANIFEST_NAME, got.reason), { file: MANIFEST_NAME }));
    else readIssues.push(issue(MSG.notRegularManifest(MANIFEST_NAME), { file: MANIFEST_NAME }));
  }
  if (readIssues.length > 0) return { manifestPath: MANIFEST_NAME, manifest: manifestBytes, files, sha256, readIssues };

  let paths: unknown[] = [];
  try {
    const parsed = JSON.parse(new TextDecoder().decode(manifestBytes).replace(/^\uFEFF/, '')) as { files?: unknown };
    if (Array.isArray(parsed?.files)) paths = parsed.files.map((f) => (f as { path?: unknown } | null)?.path);
  } catch {
    // loadStudy reports the JSON error with its location.
  }
  paths.forEach((path, index) => {
    if (typeof path !== 'string' || files.has(path)) return;
    const jsonPath = `/files/${index}/path`;
    if (!isInsideFolder(path)) {
      readIssues.push(issue(MSG.pathOutside(path), { file: MANIFEST_NAME, jsonPath }));
      return;
    }
    const full = join(root, ...path.split('/'));
    let real: string;
    try {
      real = realpathSync(full);
    } catch {
      return; // missing: loadStudy reports it
    }
    if (!insideRoot(root, real)) {
      readIssues.push(issue(MSG.notRegularFile(path), { file: MANIFEST_NAME, jsonPath }));
      return;
    }
    const got = readRegularFile(real);
    if (!got.ok) {
      const text =
        got.why === 'too-large' ? MSG.fileTooLarge(path, got.size, MAX_INPUT_FILE_BYTES)
        : got.why === 'unreadable' ? MSG.unreadable(path, got.reason)
        : MSG.notRegularFile(path);
      readIssues.push(issue(text, { file: MANIFEST_NAME, jsonPath }));
      return;
    }
    const sha = sha256Hex(got.bytes);
    files.set(path, got.bytes);
    sha256.set(path, sha);
  });
  return { manifestPath: MANIFEST_NAME, manifest: manifestBytes, files, sha256, readIssues };
}
