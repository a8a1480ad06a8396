import { execFileSync } from 'node:child_process';
import { appendFileSync, cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import { memoryWarning } from '../../src/cli/commands/build.js';
import { invocation, withCommand } from '../../src/cli/invocation.js';

const REPO = join(import.meta.dirname, '../..');
const root = mkdtempSync(join(tmpdir(), 'myofolio-cli-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

async function run(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const code = await main(argv, { stdout: { write: (s: string) => (out += s) }, stderr: { write: (s: string) => (err += s) }, cwd: root });
  return { code, out, err };
}

describe('myofolio CLI', () => {
  it('--version prints the package.json version', async () => {
    const pkg = JSON.parse(readFileSync(join(REPO, 'package.json'), 'utf8'));
    expect(await run('--version')).toEqual({ code: 0, out: `${pkg.version}\n`, err: '' });
  });

  it('--help lists the commands', async () => {
    const r = await run('--help');
    expect(r.code).toBe(0);
    expect(r.out).toContain('init <dir>');
    expect(r.out).toContain('check <study-dir>');
  });

  it('usage errors exit 2', async () => {
    expect((await run()).code).toBe(2);
    const unknown = await run('frobnicate');
    expect(unknown.code).toBe(2);
    expect(unknown.err).toContain("unknown command 'frobnicate'");
    expect((await run('check')).code).toBe(2);
    expect((await run('check', 'a', 'b')).code).toBe(2);
    expect((await run('init', '--force', 'x')).code).toBe(2);
  });

  it('init writes a starter folder with a field guide, prints the next command, and refuses a non-empty folder', async () => {
    const r = await run('init', 'starter');
    expect(r.code).toBe(0);
    expect(r.out).toContain('myofolio check starter');
    expect(readdirSync(join(root, 'starter')).sort()).toEqual([
      'atpase-nadh.csv', 'atpase-rates.csv', 'force-pca.csv', 'motility-tracks.csv', 'motility-velocities.csv', 'study-guide.md', 'study.json', 'turnover.csv',
    ]);
    expect(readFileSync(join(root, 'starter', 'atpase-rates.csv'), 'utf8')).toContain('# actin (required): Actin concentration in the well. Units: M, mM, µM, nM.');
    const guide = readFileSync(join(root, 'starter', 'study-guide.md'), 'utf8');
    expect(guide).toContain('| `variants` | yes | The wild type and every variant measured. |');
    expect(guide).toContain('## `turnover`: Single turnover');
    const again = await run('init', 'starter');
    expect(again.code).toBe(1);
    expect(again.err).toContain('is not empty');
  });

  it('init --assays writes only the chosen kinds, listed in the manifest and the guide', async () => {
    const r = await run('init', 'chosen', '--assays', 'force,atpase-rates');
    expect(r.code, r.err).toBe(0);
    expect(readdirSync(join(root, 'chosen')).sort()).toEqual(['atpase-rates.csv', 'force-pca.csv', 'study-guide.md', 'study.json']);
    const m = JSON.parse(readFileSync(join(root, 'chosen', 'study.json'), 'utf8'));
    expect(m.files).toEqual([{ path: 'atpase-rates.csv', kind: 'atpase-rates' }, { path: 'force-pca.csv', kind: 'force-pca' }]);
    const guide = readFileSync(join(root, 'chosen', 'study-guide.md'), 'utf8');
    expect(guide).toContain('`force-pca`: Force–pCa');
    expect(guide).not.toContain('`turnover`: Single turnover');
    const bad = await run('init', 'nope', '--assays', 'forse');
    expect(bad.code).toBe(2);
    expect(bad.err).toContain("'forse' is not an input kind or assay. Did you mean 'force'?");
    expect(existsSync(join(root, 'nope'))).toBe(false);
  });

  it('messages name the command as the user can run it', async () => {
    let out = '';
    const code = await main(['init', 'named'], { stdout: { write: (s: string) => (out += s) }, stderr: { write: () => {} }, cwd: root, command: 'npx myofolio' });
    expect(code).toBe(0);
    expect(out).toContain('\n  npx myofolio check named\n');
    expect(invocation({ npm_command: 'exec' }, join(REPO, 'dist/cli/myofolio.js'), REPO)).toBe('npx myofolio');
    expect(invocation({ PATH: '' }, join(REPO, 'dist/cli/myofolio.js'), REPO)).toBe('node dist/cli/myofolio.js');
    expect(invocation({ PATH: '' }, join(REPO, 'dist/cli/myofolio.js'), root)).toBe(`node ${join(REPO, 'dist/cli/myofolio.js')}`);
    // A link named myofolio on the PATH that leads to this launcher: the bare name works.
    const bin = join(root, 'bin');
    mkdirSync(bin);
    symlinkSync(join(REPO, 'dist/cli/myofolio.js'), join(bin, 'myofolio'));
    expect(invocation({ PATH: bin }, join(REPO, 'dist/cli/myofolio.js'), root)).toBe('myofolio');
    expect(withCommand("Create study.json (run 'myofolio init <dir>' for a starter).", 'npx myofolio')).toBe("Create study.json (run 'npx myofolio init <dir>' for a starter).");
  });

  it('a fresh starter fails check with one error per thing to add', async () => {
    await run('init', 'fresh');
    const r = await run('check', 'fresh');
    expect(r.code).toBe(1);
    expect(r.out).toContain('study.json:/files: error: The study has no data: none of its 6 files holds a data row');
    expect(r.out).toContain('study.json:/variants: error: The manifest declares only the wild type');
    // The one no-data error stands for each file's "header but no rows".
    expect(r.out).not.toContain('header but no data rows');
    expect(r.out).toMatch(/^2 error\(s\), 0 warning\(s\)\.$/m);
  });

  it('a starter filled in passes check with no problems', async () => {
    await run('init', 'filled');
    const dir = join(root, 'filled');
    const m = JSON.parse(readFileSync(join(dir, 'study.json'), 'utf8'));
    m.genes[0] = { symbol: 'ZZG1', sequence: 'MRKAEL', domains: [{ name: 'head', start: 1, end: 6 }] };
    m.variants.push({ hgvs: 'R2Q' });
    writeFileSync(join(dir, 'study.json'), JSON.stringify(m, null, 2));
    const rows: Record<string, string[]> = {
      'atpase-rates.csv': ['WT,w1,B1,0,0.03,a', 'WT,w1,B1,50,2.6,a', 'R2Q,p1,B1,0,0.04,a', 'R2Q,p1,B1,50,3.1,a'],
      'atpase-nadh.csv': [',,B1,actin-only,A1,50,0,0,0.9,0.5', 'WT,w1,B1,sample,A2,50,0.05,0,0.9,0.5', 'R2Q,p1,B1,sample,A3,50,0.05,0,0.9,0.5'],
      'motility-velocities.csv': ['WT,w1,B1,m1,f1,0.8', 'R2Q,p1,B1,m1,f1,0.9'],
      'motility-tracks.csv': ['WT,w1,B1,m1,f1,0,1.0,1.0', 'WT,w1,B1,m1,f1,0.2,1.2,1.0', 'R2Q,p1,B1,m1,f1,0,3.0,3.0'],
      'force-pca.csv': ['WT,w1,B1,9,1.5,', 'WT,w1,B1,4.5,31,', 'R2Q,p1,B1,4.5,33,'],
      'turnover.csv': ['WT,w1,B1,t1,0,100', 'WT,w1,B1,t1,10,90', 'R2Q,p1,B1,t1,0,100'],
    };
    for (const [file, lines] of Object.entries(rows)) appendFileSync(join(dir, file), lines.join('\n') + '\n');
    const r = await run('check', 'filled');
    // Only the analysis's note that without known controls no evidence level is reachable.
    expect(r.out.split('\n').filter((l) => l.includes(': error:') || l.includes(': warning:')).map((l) => l.split(': ').slice(0, 2).join(': '))).toEqual(['study.json:/variants: warning']);
    expect(r.out).toContain('no functional evidence level (PS3 or BS3) can be reached');
    expect(r.code).toBe(0);
  });

  it('build --no-cache neither reads nor writes the cache folder; a build without it does', async () => {
    const before = process.env.XDG_CACHE_HOME;
    const epoch = process.env.SOURCE_DATE_EPOCH;
    const cache = join(root, 'nocache-home');
    process.env.XDG_CACHE_HOME = cache;
    process.env.SOURCE_DATE_EPOCH = '1740787200';
    try {
      cpSync(join(REPO, 'data-demo'), join(root, 'nocache-study'), { recursive: true });
      const fresh = await run('build', 'nocache-study', '--out', 'nocache-site', '--no-cache');
      expect(fresh.code).toBe(0);
      expect(existsSync(cache)).toBe(false);
      const cached = await run('build', 'nocache-study', '--out', 'nocache-site2');
      expect(cached.code).toBe(0);
      expect(readdirSync(join(cache, 'myofolio')).length).toBeGreaterThan(0);
      // The same site either way, byte for byte (README).
      const files = (dir: string) => (readdirSync(join(root, dir), { recursive: true }) as string[]).filter((f) => f.includes('.')).sort();
      expect(files('nocache-site').length).toBeGreaterThan(50);
      expect(files('nocache-site2')).toEqual(files('nocache-site'));
      const differ = files('nocache-site').filter((f) => !readFileSync(join(root, 'nocache-site', f)).equals(readFileSync(join(root, 'nocache-site2', f))));
      expect(differ).toEqual([]);
    } finally {
      if (before === undefined) delete process.env.XDG_CACHE_HOME;
      else process.env.XDG_CACHE_HOME = before;
      if (epoch === undefined) delete process.env.SOURCE_DATE_EPOCH;
      else process.env.SOURCE_DATE_EPOCH = epoch;
    }
  }, 120_000);

  it('check prints file:line:col: severity: message — fix and exits 1 on errors', async () => {
    await run('init', 'broken');
    const dir = join(root, 'broken');
    appendFileSync(join(dir, 'atpase-rates.csv'), 'WT,w1,B1,-3,0.03,a\n');
    const r = await run('check', 'broken');
    expect(r.code).toBe(1);
    // The header is line 9 of the template (8 comment lines), so the row is line 10; actin is column 4.
    expect(r.out).toContain("atpase-rates.csv:10:4: error: -3 in 'actin' is out of range: it must be >= 0. — Correct the value; actin must be >= 0.");
    // And the starter still declares only WT.
    expect(r.out).toMatch(/2 error\(s\), \d+ warning\(s\)\.\n$/);
  });

  it('check names manifest problems by JSON path', async () => {
    await run('init', 'badmanifest');
    const dir = join(root, 'badmanifest');
    const m = JSON.parse(readFileSync(join(dir, 'study.json'), 'utf8'));
    m.variants.push({ hgvs: 'Q9' });
    writeFileSync(join(dir, 'study.json'), JSON.stringify(m));
    const r = await run('check', 'badmanifest');
    expect(r.code).toBe(1);
    expect(r.out).toContain("study.json:/variants/1/hgvs: error: 'Q9' is not a protein change myofolio understands");
  });

  it('check on a folder without a manifest, or a missing folder, exits 1', async () => {
    mkdirSync(join(root, 'empty'));
    const r = await run('check', 'empty');
    expect(r.code).toBe(1);
    expect(r.out).toContain("study.json: error: The study folder has no manifest 'study.json'.");
    expect((await run('check', 'nowhere')).code).toBe(1);
  });

  it('the demo study passes check', async () => {
    const r = await run('check', join(REPO, 'data-demo'));
    expect(r.out).not.toContain(': error:');
    expect(r.code).toBe(0);
  });

  it('the launcher runs under node and sets the exit code', () => {
    const out = execFileSync(process.execPath, [join(REPO, 'dist/cli/myofolio.js'), '--version'], { encoding: 'utf8' });
    expect(out.trim()).toMatch(/^\d+\.\d+\.\d+/);
    let code = 0;
    try {
      execFileSync(process.execPath, [join(REPO, 'dist/cli/myofolio.js'), 'nonsense'], { encoding: 'utf8', stdio: 'pipe' });
    } catch (e) {
      code = (e as { status: number }).status;
    }
    expect(code).toBe(2);
  });
});

describe('memory warning before a very large build', () => {
  it('warns with the fix when the CSV files would need more heap than the limit, and not otherwise', () => {
    const dir = mkdtempSync(join(tmpdir(), 'myofolio-mem-'));
    try {
      mkdirSync(join(dir, 'sub'));
      writeFileSync(join(dir, 'a.csv'), 'x'.repeat(1000));
      writeFileSync(join(dir, 'sub', 'b.CSV'), 'x'.repeat(24));
      writeFileSync(join(dir, 'notes.txt'), 'x'.repeat(100_000));
      // 1,024 bytes of CSV × HEAP_PER_CSV_BYTE = 8,192 bytes needed.
      expect(memoryWarning(dir, 8192 / 0.9 + 1)).toBe('');
      const text = memoryWarning(dir, 8000);
      expect(text).toContain('NODE_OPTIONS=--max-old-space-size=1024');
      expect(text).toContain('warning');
      expect(memoryWarning(join(dir, 'missing'), 1)).toBe('');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
