/**
 * Fingerprint of everything that computes what the store keeps (src/pipeline/store.ts): the
 * running code (the compiled dist/ folder, or src/ when run from the sources, which holds the
 * assays' row schemas), the manifest and results schemas (schemas/), the templates (templates/),
 * the Eleventy configuration (.eleventy.js) and the installed library versions (package-lock.json
 * and npm's record of node_modules, node_modules/.package-lock.json). SHA-256 over each file's path and bytes, in sorted order.
 * An entry made by other code, schemas, templates, configuration or libraries is never served.
 */
import { createHash } from 'node:crypto';
import { readFileSync, readdirSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

/** What the fingerprint reads: folders (every file under them) and single files. */
export interface FingerprintInputs {
  /** Root the paths are hashed relative to. */
  root: string;
  folders: string[];
  files: string[];
}

/** The inputs of this installation: the folder holding this code and the package root's parts. */
export function installedInputs(): FingerprintInputs {
  const code = fileURLToPath(new URL('../', import.meta.url));
  const root = join(code, '..');
  return {
    root,
    folders: [code, join(root, 'schemas'), join(root, 'templates')],
    files: [join(root, '.eleventy.js'), join(root, 'package-lock.json'), join(root, 'node_modules', '.package-lock.json')],
  };
}

function filesUnder(dir: string): string[] {
  let entries;
  try {
    entries = readdirSync(dir, { withFileTypes: true });
  } catch {
    return [];
  }
  return entries.flatMap((e) => (e.isDirectory() ? filesUnder(join(dir, e.name)) : e.isFile() ? [join(dir, e.name)] : []));
}

/** SHA-256 (hex) over the inputs' files: relative path, NUL, bytes, NUL; a missing file counts as absent. */
export function computeFingerprint(inputs: FingerprintInputs): string {
  const hash = createHash('sha256');
  const files = [...inputs.folders.flatMap(filesUnder), ...inputs.files].map((f) => [relative(inputs.root, f), f] as const).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  for (const [name, full] of files) {
    let bytes: Buffer;
    try {
      bytes = readFileSync(full);
    } catch {
      hash.update(`${name}\0absent\0`);
      continue;
    }
    hash.update(`${name}\0`).update(bytes).update('\0');
  }
  return hash.digest('hex');
}

let installed: string | undefined;

/** The fingerprint of this installation, computed once per process. */
export function installedFingerprint(): string {
  installed ??= computeFingerprint(installedInputs());
  return installed;
}
