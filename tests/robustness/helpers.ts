/**
 * Helpers for the robustness tests: temporary copies of the demo study (a small subset of its
 * files, so each check runs in well under a second), the CLI in-process and as a child process.
 */
import { spawn, spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { main } from '../../src/cli/main.js';

export const REPO = join(import.meta.dirname, '../..');
export const DEMO = join(REPO, 'data-demo');
export const LAUNCHER = join(REPO, 'dist/cli/myofolio.js');

/** A fresh temporary folder (remove with rmSync(..., { recursive: true }) in afterAll). */
export function tempRoot(tag: string): string {
  return mkdtempSync(join(tmpdir(), `myofolio-${tag}-`));
}

/** Demo files kept in the small copy (the three smallest, about 180 kB together). */
export const SMALL_FILES = ['atpase-rates.csv', 'motility-velocities.csv', 'force-pca.csv'] as const;

/** Copy the demo study into `dir`, keeping only `files` (default SMALL_FILES) in folder and manifest. */
export function copyDemo(dir: string, files: readonly string[] = SMALL_FILES): string {
  mkdirSync(dir, { recursive: true });
  const m = JSON.parse(readFileSync(join(DEMO, 'study.json'), 'utf8'));
  m.files = m.files.filter((f: { path: string }) => files.includes(f.path));
  delete m.$schema;
  writeFileSync(join(dir, 'study.json'), JSON.stringify(m, null, 2) + '\n');
  for (const f of files) copyFileSync(join(DEMO, f), join(dir, f));
  return dir;
}

export function readManifest(dir: string): Record<string, any> {
  return JSON.parse(readFileSync(join(dir, 'study.json'), 'utf8'));
}

export function writeManifest(dir: string, m: unknown): void {
  writeFileSync(join(dir, 'study.json'), JSON.stringify(m, null, 2) + '\n');
}

/** Lines of a text file (no trailing empty line). */
export function lines(file: string): string[] {
  return readFileSync(file, 'utf8').replace(/\n$/, '').split('\n');
}

export interface RunResult {
  code: number;
  out: string;
  err: string;
}

/** Run the CLI in this process (fast: modules stay loaded between runs). */
export async function runCli(argv: string[], cwd: string): Promise<RunResult> {
  let out = '';
  let err = '';
  const code = await main(argv, { stdout: { write: (s: string) => (out += s) }, stderr: { write: (s: string) => (err += s) }, cwd });
  return { code, out, err };
}

/** Run the CLI launcher as a child process (what a user runs), with a hard time limit. */
export function runChild(argv: string[], cwd: string, env: Record<string, string> = {}, timeoutMs = 60_000): RunResult {
  const r = spawnSync(process.execPath, [LAUNCHER, ...argv], { cwd, env: { ...process.env, ...env }, encoding: 'utf8', timeout: timeoutMs });
  return { code: r.status ?? -1, out: r.stdout ?? '', err: r.stderr ?? '' };
}

/** Start the launcher as a child process (for kill tests). */
export function spawnChild(argv: string[], cwd: string, env: Record<string, string> = {}) {
  return spawn(process.execPath, [LAUNCHER, ...argv], { cwd, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
}

/** SHA-256 of every file under `dir`, by relative path (sorted). */
export function hashTree(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string) => {
    for (const name of readdirSync(d).sort()) {
      const full = join(d, name);
      if (statSync(full).isDirectory()) walk(full);
      else out[relative(dir, full)] = createHash('sha256').update(readFileSync(full)).digest('hex');
    }
  };
  walk(dir);
  return out;
}

/** Text that looks like a stack trace or an internal crash. */
export const CRASH = /\n\s+at .+\(.*:\d+:\d+\)|\bTypeError\b|\bReferenceError\b|\bRangeError\b|Unhandled|ERR_[A-Z_]+|node:internal/;

export function cleanup(dir: string): void {
  rmSync(dir, { recursive: true, force: true });
}
