/**
 * The archive end to end, through the command line as a lab uses it: build the demo archive's three
 * studies with the panel's ATPase rates as first recorded, release the panel, correct the CSV, build
 * again. The corrected variant's call changes, and the CLI output, the study's changes page and the
 * variant's report all say so, while the released results.json stays byte for byte what was released.
 * Then: an unchanged rebuild reuses everything, a change to one study rebuilds that study alone, a
 * stale build is not released, an altered release stops the build. Expected calls are the demo's
 * design (src/demo/archive-scenario.ts), not measured facts.
 */
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_RELEASE, archiveManifest, archiveStudies, correctedLabel, releasedRates } from '../../src/demo/archive-scenario.js';
import { main } from '../../src/cli/main.js';
import { sha256Hex } from '../../src/archive/release.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-archive-'));
const archive = join(root, 'archive');
const out = join(root, 'site');
const store = join(root, 'store');
const savedCache = process.env.XDG_CACHE_HOME;
afterAll(() => {
  if (savedCache === undefined) delete process.env.XDG_CACHE_HOME;
  else process.env.XDG_CACHE_HOME = savedCache;
  rmSync(root, { recursive: true, force: true });
});

async function run(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let o = '';
  let e = '';
  const code = await main(argv, { stdout: { write: (s: string) => (o += s) }, stderr: { write: (s: string) => (e += s) }, cwd: root });
  return { code, out: o, err: e };
}

/** Every file of a folder with its bytes' SHA-256, by relative path. */
function snapshot(dir: string): Record<string, string> {
  const files: Record<string, string> = {};
  for (const name of readdirSync(dir, { recursive: true }) as string[]) {
    const full = join(dir, name);
    try {
      files[name] = sha256Hex(readFileSync(full));
    } catch {
      // a folder
    }
  }
  return files;
}

const studies = archiveStudies();
const panel = studies.find((s) => s.id === DEMO_RELEASE.study)!;
const panelDir = join(archive, ...panel.path.split('/'));
const label = correctedLabel(); // 'S203V'
const reportOf = (name: string) => readFileSync(join(out, 'studies', 'panel-2025', 'variants', `zzmyo1-${name.toLowerCase()}.html`), 'utf8');
const text = (html: string) => html.replace(/<[^>]+>/g, ' ').replace(/&#39;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&').replace(/\s+/g, ' ');

let firstBuild: Awaited<ReturnType<typeof run>>;
let releaseRun: Awaited<ReturnType<typeof run>>;
let releasedBytes: Buffer;
let builtBytesAtRelease: Buffer;
let secondBuild: Awaited<ReturnType<typeof run>>;
let panelFolderBefore: Record<string, string>;

beforeAll(async () => {
  process.env.XDG_CACHE_HOME = store;
  mkdirSync(archive, { recursive: true });
  writeFileSync(join(archive, 'archive.json'), JSON.stringify(archiveManifest(), null, 2));
  for (const s of studies) {
    const dir = join(archive, ...s.path.split('/'));
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, 'study.json'), JSON.stringify(s.study.manifest, null, 2));
    for (const [p, t] of Object.entries(s.study.files)) writeFileSync(join(dir, p), s === panel && p === 'atpase-rates.csv' ? releasedRates(t) : t);
  }
  firstBuild = await run('build', 'archive', '--out', 'site');
  builtBytesAtRelease = readFileSync(join(out, 'studies', 'panel-2025', 'downloads', 'results.json'));
  releaseRun = await run('release', 'archive', 'panel-2025', '--note', DEMO_RELEASE.note, '--date', DEMO_RELEASE.date, '--out', 'site');
  releasedBytes = readFileSync(join(archive, 'releases', 'panel-2025', '2025-03-14-1', 'results.json'));
  // The correction, after the release.
  writeFileSync(join(panelDir, 'atpase-rates.csv'), panel.study.files['atpase-rates.csv'] ?? '');
  panelFolderBefore = snapshot(panelDir);
  secondBuild = await run('build', 'archive', '--out', 'site');
}, 240_000);

describe('an archive: release, then a corrected CSV', () => {
  it('builds, and releases the built results with their caveats and SHA-256, in the archive only', () => {
    expect(firstBuild.code, firstBuild.out + firstBuild.err).toBe(0);
    expect(firstBuild.out).toContain('Built the archive: 3 studies (3 built');
    expect(releaseRun.code, releaseRun.out + releaseRun.err).toBe(0);
    expect(releaseRun.out).toContain('Released study panel-2025');
    expect(releasedBytes.equals(builtBytesAtRelease)).toBe(true);
    const record = JSON.parse(readFileSync(join(archive, 'releases', 'panel-2025', '2025-03-14-1', 'release.json'), 'utf8'));
    expect(record.note).toBe('sent to the cardiogenetics clinic');
    expect(record.resultsSha256).toBe(sha256Hex(releasedBytes));
    expect(record.caveats.some((c: string) => /not a clinical test/.test(c))).toBe(true);
    // Nothing was written into the study folder (its files are its CSVs and manifest only).
    expect(Object.keys(panelFolderBefore).sort()).toEqual(['atpase-rates.csv', 'motility-velocities.csv', 'study.json']);
  });

  it('the released call of the corrected variant was hypercontractile (the rates were too high)', () => {
    const released = JSON.parse(releasedBytes.toString('utf8'));
    const v = released.variants.find((x: { short: string }) => x.short === label);
    expect(v.overall.call).toBe('hypercontractile');
  });

  const line = `${label} (ZZMYO1 p.Ser203Val): Changed since the release of 2025-03-14 (note: sent to the cardiogenetics clinic): overall call was hypercontractile, now within WT range`;

  it('the CLI prints the change at the end of the build, with the corrected file as its reason', () => {
    expect(secondBuild.code, secondBuild.out + secondBuild.err).toBe(0);
    const tail = secondBuild.out.slice(secondBuild.out.indexOf('Study panel-2025, compared with its latest release'));
    expect(tail).toContain('1 variant changed');
    expect(tail).toContain(line);
    expect(tail).toContain('reason: corrected data in atpase-rates.csv');
    // Only the panel changed: the other studies were reused.
    expect(secondBuild.out).toContain('(1 built: panel-2025; 2 unchanged, reused)');
  });

  it('the changes page and the variant report say so; an unchanged variant has no change line', () => {
    const changes = text(readFileSync(join(out, 'changes', 'panel-2025.html'), 'utf8'));
    expect(changes).toContain('overall call was hypercontractile, now within WT range');
    expect(changes).toContain('corrected data in atpase-rates.csv');
    expect(changes).toContain('Since the release of 2025-03-14 (note: sent to the cardiogenetics clinic): 1 variant changed');
    const report = text(reportOf(label));
    expect(report).toContain('Changed since the release of 2025-03-14 (note: sent to the cardiogenetics clinic): overall call was hypercontractile, now within WT range');
    expect(report).toContain('History of this variant across the archive');
    expect(text(reportOf('S166E'))).not.toContain('Changed since the release');
  });

  it('the released results.json is byte for byte what was released, and its hash is checked', async () => {
    const now = readFileSync(join(archive, 'releases', 'panel-2025', '2025-03-14-1', 'results.json'));
    expect(now.equals(releasedBytes)).toBe(true);
    const downloaded = readFileSync(join(out, 'releases', 'panel-2025', '2025-03-14-1', 'results.json'));
    expect(downloaded.equals(releasedBytes)).toBe(true);
    const check = await run('check', 'archive');
    expect(check.code, check.out).toBe(0);
    expect(check.out).toContain('Archive: 3 studies, 1 release');
  });

  it('the archive pages: home with every study and the discordant variant, histories, genes, and links both ways', () => {
    const home = text(readFileSync(join(out, 'index.html'), 'utf8'));
    expect(home).toContain('Synthetic demonstration data');
    expect(home).toContain('not a clinical test');
    for (const s of studies) expect(home).toContain(s.study.manifest.title as string);
    expect(home).toContain('Discordant variants (1)');
    expect(home).toContain('ZZMYO1 p.Leu236Asn');
    const discordant = text(readFileSync(join(out, 'variants', 'zzmyo1-p-leu236asn.html'), 'utf8'));
    expect(discordant).toContain('Discordant between the 2 studies');
    expect(readFileSync(join(out, 'variants', 'zzmyo1-p-leu236asn.html'), 'utf8')).toMatch(/<svg[^>]*role="img"/);
    const concordant = text(readFileSync(join(out, 'variants', 'zzmyo1-p-glu91pro.html'), 'utf8'));
    expect(concordant).toContain('Concordant: the 2 studies');
    expect(existsSync(join(out, 'genes', 'zztnt3.html'))).toBe(true);
    // From a study page back to the archive, and from the history to the study's report.
    expect(readFileSync(join(out, 'studies', 'thin-2026', 'index.html'), 'utf8')).toMatch(/href="(\.\/)?\.\.\/\.\.\/index\.html"/);
    expect(readFileSync(join(out, 'studies', 'thin-2026', 'variants', 'zztnt3-t74h.html'), 'utf8')).toContain('href="../../../variants/zztnt3-p-thr74his.html"');
    expect(readFileSync(join(out, 'variants', 'zzmyo1-p-leu236asn.html'), 'utf8')).toContain('href="../studies/remeasure-2025/variants/zzmyo1-l236n.html"');
  });
});

describe('an archive rebuilt', () => {
  it('unchanged: every study and every page reused', async () => {
    const r = await run('build', 'archive', '--out', 'site');
    expect(r.code, r.out + r.err).toBe(0);
    expect(r.out).toContain('(0 built; 3 unchanged, reused)');
    expect(r.out).toMatch(/\((0) written, \d+ unchanged\)/);
  }, 120_000);

  it('after one study changed: that study alone, and only the archive pages that show it', async () => {
    const dir = join(archive, 'studies', 'thin-2026');
    const csv = readFileSync(join(dir, 'force-pca.csv'), 'utf8');
    writeFileSync(join(dir, 'force-pca.csv'), csv.replace('# Synthetic data', '# Synthetic data (comment edited)'));
    const r = await run('build', 'archive', '--out', 'site');
    expect(r.code, r.out + r.err).toBe(0);
    expect(r.out).toContain('(1 built: thin-2026; 2 unchanged, reused)');
    const m = /(\d+) archive pages \((\d+) written, (\d+) unchanged\)/.exec(r.out)!;
    // Its histories, its gene page, its changes page and the home page at most; never the ZZMYO1 pages.
    expect(Number(m[2])).toBeLessThanOrEqual(5 + 3);
    expect(Number(m[3])).toBeGreaterThan(10);
  }, 120_000);

  it('a stale build is not released: the files changed since the build', async () => {
    const dir = join(archive, 'studies', 'remeasure-2025');
    const csv = readFileSync(join(dir, 'motility-velocities.csv'), 'utf8');
    writeFileSync(join(dir, 'motility-velocities.csv'), csv.replace('# Synthetic data', '# Synthetic data (edited)'));
    const r = await run('release', 'archive', 'remeasure-2025', '--note', 'sent again', '--date', '2025-10-01', '--out', 'site');
    expect(r.code).toBe(1);
    expect(r.out).toContain('changed since the archive');
    expect(existsSync(join(archive, 'releases', 'remeasure-2025'))).toBe(false);
  });

  it('an altered release stops the build and the previous output stays', async () => {
    const file = join(archive, 'releases', 'panel-2025', '2025-03-14-1', 'results.json');
    const before = readFileSync(join(out, 'index.html'));
    chmodSync(file, 0o644);
    writeFileSync(file, Buffer.concat([releasedBytes.subarray(0, releasedBytes.length - 1), Buffer.from(' \n')]));
    try {
      const r = await run('build', 'archive', '--out', 'site');
      expect(r.code).toBe(1);
      expect(r.out).toContain('releases/panel-2025/2025-03-14-1/results.json');
      expect(r.out).toContain('altered after release');
      expect(readFileSync(join(out, 'index.html')).equals(before)).toBe(true);
    } finally {
      writeFileSync(file, releasedBytes);
    }
  }, 120_000);
});
