/**
 * Fingerprint of the tool's code: SHA-256 over the path and contents of every .ts/.js/.mjs/.json
 * file under src/, sorted by path, and of package-lock.json (the exact library versions).
 * Caches whose entries are computed by the code (fitted units, chart blocks) include it in their
 * keys, so an entry made by other code or other libraries is never served, whatever the version
 * number says. Read once per process (about a hundred small files).
 */
import { createHash } from 'node:crypto';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const srcDir = fileURLToPath(new URL('./', import.meta.url));
let fingerprint: string | undefined;
let siteFingerprintValue: string | undefined;

/** Files under a folder, recursively, sorted by path. */
function filesUnder(dir: string, name: RegExp): string[] {
  return readdirSync(dir, { withFileTypes: true })
    .flatMap((e) => (e.isDirectory() ? filesUnder(join(dir, e.name), name) : name.test(e.name) ? [join(dir, e.name)] : []))
    .sort();
}

/** The fingerprint as 64 hex digits (computed on first call). */
export function codeFingerprint(): string {
  if (fingerprint) return fingerprint;
  const hash = createHash('sha256');
  for (const file of filesUnder(srcDir, /\.(ts|js|mjs|json)$/)) hash.update(file.slice(srcDir.length)).update('\0').update(readFileSync(file)).update('\0');
  try {
    hash.update('package-lock.json\0').update(readFileSync(join(srcDir, '..', 'package-lock.json')));
  } catch {
    // no lockfile (an unpacked copy of src/): the sources alone
  }
  fingerprint = hash.digest('hex');
  return fingerprint;
}

/**
 * Fingerprint of everything that makes a page from its data: the code fingerprint, every file
 * under templates/ and the Eleventy configuration (.eleventy.js). Keys of cached pages include it.
 */
export function siteFingerprint(): string {
  if (siteFingerprintValue) return siteFingerprintValue;
  const root = join(srcDir, '..');
  const hash = createHash('sha256').update(codeFingerprint()).update('\0');
  const templates = join(root, 'templates');
  for (const file of filesUnder(templates, /./)) hash.update(file.slice(root.length)).update('\0').update(readFileSync(file)).update('\0');
  hash.update('.eleventy.js\0').update(readFileSync(join(root, '.eleventy.js')));
  siteFingerprintValue = hash.digest('hex');
  return siteFingerprintValue;
}
