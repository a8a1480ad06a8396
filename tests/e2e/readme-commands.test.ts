/**
 * The README's "Using it on your own study" commands, run as written (through the real launcher)
 * in a temporary folder: init → check → build must all succeed on the starter study.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { appendFileSync, existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const launcher = path.resolve('dist/cli/myofolio.js');

/** Fill a starter study with an invented gene, one variant and a few rows per file it holds (invented values; common practice, no source). */
function fillStarter(dir: string): void {
  const m = JSON.parse(readFileSync(path.join(dir, 'study.json'), 'utf8'));
  m.genes[0] = { symbol: 'ZZG1', sequence: 'MRKAEL', domains: [] };
  m.variants.push({ hgvs: 'R2Q' });
  writeFileSync(path.join(dir, 'study.json'), JSON.stringify(m, null, 2));
  const rows: Record<string, string[]> = {
    'atpase-rates.csv': ['WT', 'R2Q'].flatMap((v, k) => [0, 5, 10, 20, 40, 80].map((a) => `${v},${v}-1,B1,${a},${(0.03 + (5 + k) * a / (30 + a)).toFixed(3)},w1`)),
    'force-pca.csv': ['WT', 'R2Q'].flatMap((v) => [9, 6.5, 6, 5.75, 5.5, 5, 4.5].map((p, i) => `${v},${v}-1,B1,${p},${(1 + 30 * i / 6).toFixed(2)},r1`)),
  };
  for (const f of m.files as Array<{ path: string }>) appendFileSync(path.join(dir, f.path), `${(rows[f.path] ?? []).join('\n')}\n`);
}

describe('README usage commands', () => {
  it('init, check and build a starter study as the README shows', () => {
    const readme = readFileSync('README.md', 'utf8');
    const commands = readme
      .split('\n')
      .map((l) => l.trim())
      .filter((l) => l.startsWith('node dist/cli/myofolio.js '))
      .map((l) => l.replace(/\s+#.*$/, '').split(/\s+/).slice(2));
    expect(commands.map((c) => c[0])).toEqual(['init', 'check', 'build']);
    const dir = mkdtempSync(path.join(os.tmpdir(), 'myofolio-readme-'));
    for (const args of commands) {
      // execFileSync throws on a non-zero exit code, with the output in the error.
      execFileSync(process.execPath, [launcher, ...args], { cwd: dir, encoding: 'utf8', env: { ...process.env, XDG_CACHE_HOME: path.join(dir, 'cache') } });
      // "…fill in study.json and the CSV files…" (an empty starter is refused by check, saying what to add).
      if (args[0] === 'init') fillStarter(path.join(dir, args[1] ?? '.'));
    }
    expect(existsSync(path.join(dir, 'my-study', 'study.json'))).toBe(true);
    expect(existsSync(path.join(dir, 'my-study-site', 'index.html'))).toBe(true);
  });
});
