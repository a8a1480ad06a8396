/**
 * The I/O side of loading: read a study folder into StudyFiles for the pure loadStudy.
 * Refuses manifest paths that leave the folder (also through symbolic links) and anything
 * that is not a regular file; computes SHA-256 of every file read.
 */
import { readFileSync, realpathSync, statSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { isInsideFolder, sha256Hex, type StudyFiles } from './load.js';
import { MSG, issue } from './messages.js';
import { MANIFEST_NAME } from './schemas.js';
import type { Issue } from './types.js';

/** Read the manifest and every file it names. Throws only when the folder or manifest cannot be read. */
export function readStudyFolder(dir: string): StudyFiles & { readIssues: Issue[] } {
  const root = realpathSync(dir);
  const manifestBytes = readFileSync(join(root, MANIFEST_NAME));
  const files = new Map<string, Uint8Array>();
  const sha256 = new Map<string, string>();
  const readIssues: Issue[] = [];
  let paths: unknown[] = [];
  try {
    const parsed = JSON.parse(new TextDecoder().decode(manifestBytes).replace(/^\uFEFF/, '')) as { files?: unknown };
    if (Array.isArray(parsed.files)) paths = parsed.files.map((f) => (f as { path?: unknown })?.path);
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
    const rel = relative(root, real);
    if (rel.startsWith('..') || rel.split(sep).includes('..') || !statSync(real).isFile()) {
      readIssues.push(issue(MSG.notRegularFile(path), { file: MANIFEST_NAME, jsonPath }));
      return;
    }
    const bytes = readFileSync(real);
    files.set(path, bytes);
    sha256.set(path, sha256Hex(bytes));
  });
  return { manifestPath: MANIFEST_NAME, manifest: manifestBytes, files, sha256, readIssues };
}
