/**
 * Worker threads start without this process's `--import tsx` (worker-boot.mjs registers tsx after
 * importing the worker's preloads by Node's own loader, which is much faster for vega and
 * vega-lite), and still start when this process has options a worker may not be given.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { workerExecArgv } from '../../src/charts/pool.js';

const repo = fileURLToPath(new URL('../../', import.meta.url));
// Under the repository (test-output/ is not committed), so that the scripts find its packages.
mkdirSync(join(repo, 'test-output'), { recursive: true });
const dir = mkdtempSync(join(repo, 'test-output', 'worker-start-'));
// ES modules, as the repository's own TypeScript.
writeFileSync(join(dir, 'package.json'), '{ "type": "module" }\n');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('workerExecArgv', () => {
  it('leaves out the options that register tsx, and keeps the others in order', () => {
    expect(workerExecArgv(['--import', 'tsx', '--max-old-space-size=900'])).toEqual(['--max-old-space-size=900']);
    expect(workerExecArgv(['--conditions=x', '--import=tsx'])).toEqual(['--conditions=x']);
    expect(workerExecArgv(['--import', 'other', '--import', 'tsx'])).toEqual(['--import', 'other']);
    expect(workerExecArgv([])).toEqual([]);
  });
});

describe('startWorker from a process run with --import tsx', () => {
  // A worker script in TypeScript (so tsx must be registered in the worker) that imports its
  // preload (vega) and reports its options.
  const workerScript = join(dir, 'report.ts');
  writeFileSync(
    workerScript,
    `import { parentPort } from 'node:worker_threads';\nimport * as vega from 'vega';\nconst typed: string = typeof vega.View;\nparentPort?.postMessage({ execArgv: process.execArgv, typed });\n`,
  );
  const parent = join(dir, 'parent.ts');
  writeFileSync(
    parent,
    `import { startWorker } from ${JSON.stringify(pathToFileURL(join(repo, 'src/charts/pool.ts')).href)};\n` +
      `const w = startWorker(new URL(${JSON.stringify(pathToFileURL(workerScript).href)}), undefined, ['vega']);\n` +
      `w.on('message', (m) => { console.log(JSON.stringify(m)); void w.terminate(); });\n` +
      `w.on('error', (e) => { console.error(e); process.exitCode = 1; });\n`,
  );
  // vega resolves from the repository's node_modules: run the parent from there.
  const run = (args: string[]) => JSON.parse(execFileSync(process.execPath, [...args, parent], { cwd: repo, encoding: 'utf8' }).trim()) as { execArgv: string[]; typed: string };

  it('the worker gets no --import tsx, registers tsx itself and runs TypeScript importing its preload', () => {
    const got = run(['--import', 'tsx']);
    expect(got.execArgv).toEqual([]);
    expect(got.typed).toBe('function');
  }, 60_000);

  it('with a V8 option a worker may not be given, the worker inherits every option and still starts', () => {
    const got = run(['--import', 'tsx', '--max-old-space-size=900']);
    expect(got.execArgv).toEqual(['--import', 'tsx', '--max-old-space-size=900']);
    expect(got.typed).toBe('function');
  }, 60_000);
});
