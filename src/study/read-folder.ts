/**
 * The I/O side of loading: read a study folder into StudyFiles for the pure loadStudy.
 * Refuses manifest paths that leave the folder (also through symbolic links) and anything
 * that is not a regular file (directories, devices such as /dev/zero, FIFOs, sockets);
 * refuses files larger than MAX_INPUT_FILE_BYTES before reading them; computes SHA-256 of
 * every file read.
 *
 * With `known` (a build with a cache), a file whose identity (device, inode, size, modification
 * and status-change times in nanoseconds) matches a recorded one gets the recorded SHA-256 and
 * is read only if the loader asks for its bytes (it does not for a file whose digest it has);
 * read then, its SHA-256 must still be the recorded one. The status-change time changes with
 * every write and cannot be set back by a user, so this is the check make and git rely on. A
 * file changed shortly before it was read is not recorded, so that a second change stamped with
 * the same time cannot hide: within KNOWN_FILE_MIN_AGE_MS (3 s) when its times are whole
 * milliseconds (a file system with a coarse clock), within KNOWN_FILE_MIN_AGE_FINE_MS otherwise.
 *
 * Size policy: every file (manifest and CSV) may be at most MAX_INPUT_FILE_BYTES (64 MiB).
 * A file is parsed in memory (text, then rows), which takes several times its size; the limit
 * keeps a build within about 1–2 GB. Larger data sets are split into several files of the same
 * kind, which the manifest may list one after another.
 */
import { type BigIntStats, closeSync, constants, fstatSync, openSync, readFileSync, realpathSync } from 'node:fs';
import { join, relative, sep, isAbsolute } from 'node:path';
import { INPUT } from '../defaults.js';
import { isInsideFolder, sha256Hex, type StudyFiles } from './load.js';
import { MSG, issue } from './messages.js';
import { MANIFEST_NAME } from './schemas.js';
import type { Issue } from './types.js';

/** Largest file myofolio reads, in bytes (INPUT.maxFileBytes in src/defaults.ts). See the size policy above. */
export const MAX_INPUT_FILE_BYTES = INPUT.maxFileBytes;

type ReadResult = { ok: true; bytes: Uint8Array } | { ok: false; why: 'not-a-file' } | { ok: false; why: 'too-large'; size: number } | { ok: false; why: 'unreadable'; reason: string };

/** SHA-256 of files recorded by their identity (see the module comment); kept by the caller between builds. */
export interface KnownFiles {
  sha256(identity: string): string | undefined;
  record(identity: string, sha256: string): void;
}

/** A file younger than this (modified or its status changed) when read is not recorded in KnownFiles. */
export const KNOWN_FILE_MIN_AGE_MS = 3000;

/**
 * The same for a file whose times have sub-millisecond parts (ext4, XFS, Btrfs, APFS: stamps
 * from a clock that ticks every few milliseconds at most).
 */
export const KNOWN_FILE_MIN_AGE_FINE_MS = 100;

/**
 * May a file with these times be recorded in KnownFiles when read at `nowMs`? Not if it changed
 * within KNOWN_FILE_MIN_AGE_MS (times in whole milliseconds: a coarse clock) or
 * KNOWN_FILE_MIN_AGE_FINE_MS (finer times) before; `minAgeMs` overrides both.
 */
export function oldEnoughToRecord(st: Pick<BigIntStats, 'mtimeNs' | 'ctimeNs'>, nowMs: number, minAgeMs?: number): boolean {
  const newestNs = st.mtimeNs > st.ctimeNs ? st.mtimeNs : st.ctimeNs;
  const fine = st.mtimeNs % 1_000_000n !== 0n && st.ctimeNs % 1_000_000n !== 0n;
  return nowMs - Number(newestNs / 1_000_000n) >= (minAgeMs ?? (fine ? KNOWN_FILE_MIN_AGE_FINE_MS : KNOWN_FILE_MIN_AGE_MS));
}

function identity(real: string, st: BigIntStats): string {
  return JSON.stringify([real, String(st.dev), String(st.ino), String(st.size), String(st.mtimeNs), String(st.ctimeNs)]);
}

/** Files by path, some of them read only when asked for (their SHA-256 known already). */
class FilesRead extends Map<string, Uint8Array> {
  private readonly later = new Map<string, () => Uint8Array>();

  readLater(path: string, read: () => Uint8Array): void {
    this.later.set(path, read);
  }

  override has(path: string): boolean {
    return super.has(path) || this.later.has(path);
  }

  override get(path: string): Uint8Array | undefined {
    const read = this.later.get(path);
    if (read) {
      this.later.delete(path);
      super.set(path, read());
    }
    return super.get(path);
  }
}

/**
 * Read one regular file without ever blocking or reading without end: opened with O_NONBLOCK
 * (a FIFO opens at once instead of waiting for a writer), checked with fstat on the open
 * descriptor (so the checked file is the read file), size-limited before reading.
 */
export function readRegularFile(full: string, limit?: number): ReadResult;
/** With `known`: a file whose SHA-256 `known` gives (from its fstat) is not read; its SHA-256 comes back instead of its bytes. */
export function readRegularFile(full: string, limit: number, known: { sha256: (st: BigIntStats) => string | undefined }): ReadResult | { ok: true; sha256: string; bytes?: undefined };
export function readRegularFile(full: string, limit = MAX_INPUT_FILE_BYTES, known?: { sha256: (st: BigIntStats) => string | undefined }): ReadResult | { ok: true; sha256: string; bytes?: undefined } {
  let fd: number;
  try {
    fd = openSync(full, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EISDIR') return { ok: false, why: 'not-a-file' };
    return { ok: false, why: 'unreadable', reason: code ?? String(err) };
  }
  try {
    const st = fstatSync(fd, { bigint: true });
    if (!st.isFile()) return { ok: false, why: 'not-a-file' };
    if (st.size > BigInt(limit)) return { ok: false, why: 'too-large', size: Number(st.size) };
    const sha256 = known?.sha256(st);
    if (sha256 !== undefined) return { ok: true, sha256 };
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
export function readStudyFolder(dir: string, options: { known?: KnownFiles; knownMinAgeMs?: number } = {}): StudyFiles & { files: ReadonlyMap<string, Uint8Array>; readIssues: Issue[] } {
  const root = realpathSync(dir);
  const files = new FilesRead();
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
    const known = options.known;
    let id: string | undefined;
    let young = true;
    const got = readRegularFile(real, MAX_INPUT_FILE_BYTES, {
      sha256: (st) => {
        id = identity(real, st);
        young = !oldEnoughToRecord(st, Date.now(), options.knownMinAgeMs);
        return known?.sha256(id);
      },
    });
    if (!got.ok) {
      const text =
        got.why === 'too-large' ? MSG.fileTooLarge(path, got.size, MAX_INPUT_FILE_BYTES)
        : got.why === 'unreadable' ? MSG.unreadable(path, got.reason)
        : MSG.notRegularFile(path);
      readIssues.push(issue(text, { file: MANIFEST_NAME, jsonPath }));
      return;
    }
    if (got.bytes === undefined) {
      // Known by its identity: read if the loader asks for it, and then it must be the same file.
      const expected = got.sha256;
      files.readLater(path, () => {
        const again = readRegularFile(real);
        if (!again.ok || again.bytes === undefined || sha256Hex(again.bytes) !== expected) {
          throw new Error(`${path} changed while myofolio was reading the study. Build again once the file is written.`);
        }
        return again.bytes;
      });
      sha256.set(path, expected);
      return;
    }
    const sha = sha256Hex(got.bytes);
    files.set(path, got.bytes);
    sha256.set(path, sha);
    if (known && id !== undefined && !young) known.record(id, sha);
  });
  return { manifestPath: MANIFEST_NAME, manifest: manifestBytes, files, sha256, readIssues };
}
