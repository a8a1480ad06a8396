/**
 * What the store keeps is keyed by a fingerprint of everything that computes it. The compiled tool
 * is copied to a temporary folder (dist/, schemas/, templates/, .eleventy.js, package files; the
 * libraries linked), a small study is built with one cache folder, then each of code, row schemas,
 * the manifest schema, templates, Eleventy configuration and library versions is changed in turn: the next build with
 * that cache must equal a build of the changed tool with an empty cache (output files and the
 * printed issues).
 */
import { execFileSync } from 'node:child_process';
import { cpSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { computeFingerprint, installedInputs } from '../../src/pipeline/fingerprint.js';
import { REPO, copyDemo, hashTree } from '../robustness/helpers.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-fingerprint-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** A copy of the compiled tool that resolves its libraries from this repository's node_modules. */
function copyTool(dir: string): string {
  for (const part of ['dist', 'schemas', 'templates', '.eleventy.js', 'package.json', 'package-lock.json']) cpSync(join(REPO, part), join(dir, part), { recursive: true });
  symlinkSync(join(REPO, 'node_modules'), join(dir, 'node_modules'));
  return dir;
}

/** Build `study` with the tool in `tool` and the cache in `cache`: output tree and printed lines (without the build time). */
function build(tool: string, study: string, cache: string, out: string) {
  rmSync(out, { recursive: true, force: true });
  const printed = execFileSync(process.execPath, [join(tool, 'dist', 'cli', 'myofolio.js'), 'build', study, '--out', out], {
    encoding: 'utf8',
    env: { ...process.env, XDG_CACHE_HOME: cache, SOURCE_DATE_EPOCH: '1740787200' },
  });
  return { tree: hashTree(out), printed: printed.replace(/ in [\d.]+ s\./, '.').replace(/Open .*/, '') };
}

const edit = (file: string, from: string | RegExp, to: string) => {
  const text = readFileSync(file, 'utf8');
  const next = text.replace(from, to);
  if (next === text) throw new Error(`no change made to ${file}`);
  writeFileSync(file, next);
};

describe('the store fingerprint', () => {
  it('covers the code folder, schemas, templates, Eleventy config and lockfiles of this installation', () => {
    const inputs = installedInputs();
    expect(inputs.folders.map((f) => relative(inputs.root, f)).sort()).toEqual(['schemas', 'src', 'templates']);
    expect(inputs.files.map((f) => relative(inputs.root, f))).toEqual(['.eleventy.js', 'package-lock.json', 'node_modules/.package-lock.json']);
    expect(computeFingerprint(inputs)).toMatch(/^[0-9a-f]{64}$/);
  });

  const changes: Array<[string, (tool: string) => void, boolean]> = [
    // The SVG post-processing changes, not the chart specs: stale SVGs would be served by spec alone.
    ['code (dist/)', (tool) => edit(join(tool, 'dist', 'charts', 'render.js'), 'focusable="false"', 'focusable="false" data-edited="1"'), true],
    // Velocities above 0.5 µm/s become implausible: a stale file reading would miss the warnings.
    // Row schemas live in their assay's folder and are compiled into dist/ with it.
    ['row schemas (dist/assays/)', (tool) => edit(join(tool, 'dist', 'assays', 'motility', 'motility-velocities.schema.json'), '"max": 20,', '"max": 0.5,'), true],
    // The manifest schema (schemas/): a description changes, which no page shows.
    ['the manifest schema (schemas/)', (tool) => edit(join(tool, 'schemas', 'manifest.schema.json'), '"Study title shown on every page."', '"Study title shown on every page (edited)."'), false],
    ['templates', (tool) => edit(join(tool, 'templates', 'variant.njk'), /\n$/, '\n<!-- edited -->\n'), true],
    ['Eleventy config', (tool) => edit(join(tool, '.eleventy.js'), 'export default function', '// edited\nexport default function'), false],
    ['library versions', (tool) => edit(join(tool, 'package-lock.json'), /"node_modules\/vega": \{\n(\s+)"version": "([^"]+)"/, '"node_modules/vega": {\n$1"version": "$2-edited"'), false],
  ];
  for (const [what, change, showsInOutput] of changes) {
    it(`after a change of ${what}, a build with the old cache equals a build with an empty cache`, () => {
      const dir = mkdtempSync(join(root, 'case-'));
      const tool = copyTool(join(dir, 'tool'));
      // One file of the demo study (its motility velocities): small, and read through the changed schema.
      const study = copyDemo(join(dir, 'study'), ['motility-velocities.csv']);
      const cache = join(dir, 'cache');
      const before = build(tool, study, cache, join(dir, 'out'));
      change(tool);
      const warm = build(tool, study, cache, join(dir, 'out'));
      const fresh = build(tool, study, join(dir, 'empty-cache'), join(dir, 'out-fresh'));
      expect(warm).toEqual(fresh);
      if (showsInOutput) expect(fresh).not.toEqual(before);
    }, 120_000);
  }
});
