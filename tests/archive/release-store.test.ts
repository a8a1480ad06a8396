/**
 * The releases folder on disk: written once and atomically, never replaced, every read verified
 * against the recorded SHA-256. Each test works in a temporary folder of its own.
 */
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync, cpSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { compareWithRelease } from '../../src/archive/changes.js';
import { sha256Hex } from '../../src/archive/release.js';
import { createRelease, listReleases, loadLatestRelease, loadRelease, moveIntoPlace } from '../../src/archive/release-store.js';
import { fakeSha, makeResults, type VariantSpec } from './study-results.js';

const roots: string[] = [];
function archiveDir(): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'myofolio-archive-test-'));
  roots.push(dir);
  return dir;
}
afterAll(() => {
  for (const dir of roots) {
    // Released files are read-only; their folders are not, so they can be removed.
    rmSync(dir, { recursive: true, force: true });
  }
});

const R403Q: VariantSpec = { hgvs: 'p.Arg403Gln', short: 'R403Q', residue: 403, overall: 'hypercontractile', metrics: { 'atpase.kcat': [1.38, 1.21, 1.55, 'increased'] } };
const v1 = () => makeResults({ title: 'Panel', variants: [R403Q] });
const bytesOf = (value: unknown) => new TextEncoder().encode(`${JSON.stringify(value)}\n`);
const request = (bytes: Uint8Array, date = '2026-03-02') => ({
  studyId: 'panel',
  results: { bytes },
  caveats: ['Research data, not a clinical test.'],
  note: 'sent to the cardiogenetics clinic',
  date,
});

describe('createRelease', () => {
  it('writes releases/<study>/<date>-<n>/ with the released bytes unchanged, the record, read-only, and nothing else', async () => {
    const dir = archiveDir();
    const bytes = bytesOf(v1());
    const out = await createRelease(dir, request(bytes));
    expect(out.issues).toEqual([]);
    expect(out.release?.folder).toBe('releases/panel/2026-03-02-1');
    const folder = path.join(dir, 'releases', 'panel', '2026-03-02-1');
    expect(readdirSync(path.join(dir, 'releases', 'panel'))).toEqual(['2026-03-02-1']); // no temporary folder left
    expect(readdirSync(folder).sort()).toEqual(['release.json', 'results.json']);
    expect(Buffer.compare(readFileSync(path.join(folder, 'results.json')), Buffer.from(bytes))).toBe(0);
    const record = JSON.parse(readFileSync(path.join(folder, 'release.json'), 'utf8'));
    expect(record).toEqual({
      schemaVersion: 1,
      id: '2026-03-02-1',
      study: 'panel',
      date: '2026-03-02',
      note: 'sent to the cardiogenetics clinic',
      toolVersion: '0.2.0',
      resultsSha256: sha256Hex(bytes),
      caveats: ['Research data, not a clinical test.'],
    });
    expect(statSync(path.join(folder, 'results.json')).mode & 0o777).toBe(0o444);
    expect(statSync(path.join(folder, 'release.json')).mode & 0o777).toBe(0o444);
  });

  it('copies a results.json file byte for byte, and a second release of the day gets the next number, leaving the first as it was', async () => {
    const dir = archiveDir();
    const first = bytesOf(v1());
    await createRelease(dir, request(first));
    const file = path.join(dir, 'results.json');
    const secondBytes = bytesOf(makeResults({ title: 'Panel', variants: [{ ...R403Q, overall: 'indeterminate' }] }));
    writeFileSync(file, secondBytes);
    const second = await createRelease(dir, { ...request(new Uint8Array()), results: { file } });
    expect(second.issues).toEqual([]);
    expect(second.release?.record.id).toBe('2026-03-02-2');
    expect(Buffer.compare(readFileSync(second.release!.resultsPath), Buffer.from(secondBytes))).toBe(0);
    expect(Buffer.compare(readFileSync(path.join(dir, 'releases/panel/2026-03-02-1/results.json')), Buffer.from(first))).toBe(0);
  });

  it('refuses bad input, writing nothing', async () => {
    const dir = archiveDir();
    const out = await createRelease(dir, { ...request(bytesOf(v1()), '2026-02-30'), note: '' });
    expect(out.release).toBeUndefined();
    expect(out.issues.map((i) => `${i.code} ${i.at.file} ${i.at.jsonPath}`)).toEqual(['release.date releases/panel /date', 'release.note releases/panel /note']);
    expect(readdirSync(path.join(dir, 'releases', 'panel'))).toEqual([]);
    const notResults = await createRelease(dir, request(new TextEncoder().encode('{"hello": 1}')));
    expect(notResults.issues[0]?.code).toBe('release.results-schema');
    expect(readdirSync(path.join(dir, 'releases', 'panel'))).toEqual([]);
    const noArchive = await createRelease(path.join(dir, 'missing'), request(bytesOf(v1())));
    expect(noArchive.issues.map((i) => i.code)).toEqual(['release.write-failed']);
    expect(existsSync(path.join(dir, 'missing'))).toBe(false);
    const badId = await createRelease(dir, { ...request(bytesOf(v1())), studyId: '../escape' });
    expect(badId.issues[0]?.code).toBe('release.study-id');
    expect(existsSync(path.join(dir, 'escape'))).toBe(false);
  });

  it('checks a results.json above the size limit by its first bytes only', async () => {
    const dir = archiveDir();
    const ok = await createRelease(dir, request(bytesOf(v1())), { schemaCheckMaxBytes: 0 });
    expect(ok.release?.record.toolVersion).toBe('0.2.0');
    const bad = await createRelease(dir, request(new TextEncoder().encode('{"tool": 1}')), { schemaCheckMaxBytes: 0 });
    expect(bad.issues[0]?.code).toBe('release.not-results');
  });
});

describe('never replacing a release', () => {
  it('moveIntoPlace refuses a final folder that exists, and leaves both folders as they were', async () => {
    const dir = archiveDir();
    const tmp = path.join(dir, 'tmp');
    const final = path.join(dir, 'final');
    mkdirSync(tmp);
    mkdirSync(final);
    writeFileSync(path.join(tmp, 'results.json'), 'new');
    writeFileSync(path.join(final, 'results.json'), 'released');
    expect(await moveIntoPlace(tmp, final)).toBe(false);
    expect(readFileSync(path.join(final, 'results.json'), 'utf8')).toBe('released');
    expect(readFileSync(path.join(tmp, 'results.json'), 'utf8')).toBe('new');
    // Even an empty folder of that name is left alone (rename(2) would replace an empty folder).
    rmSync(path.join(final, 'results.json'));
    expect(await moveIntoPlace(tmp, final)).toBe(false);
    rmSync(final, { recursive: true });
    expect(await moveIntoPlace(tmp, final)).toBe(true);
    expect(readFileSync(path.join(final, 'results.json'), 'utf8')).toBe('new');
  });

  it('takes the next number when a folder of the computed name exists', async () => {
    const dir = archiveDir();
    mkdirSync(path.join(dir, 'releases', 'panel', '2026-03-02-1'), { recursive: true });
    const out = await createRelease(dir, request(bytesOf(v1())));
    expect(out.release?.record.id).toBe('2026-03-02-2');
    expect(readdirSync(path.join(dir, 'releases', 'panel', '2026-03-02-1'))).toEqual([]);
  });
});

describe('listReleases and loadRelease', () => {
  it('lists releases oldest first and loads one with its results, verified', async () => {
    const dir = archiveDir();
    const results = v1();
    await createRelease(dir, request(bytesOf(results), '2026-03-02'));
    await createRelease(dir, request(bytesOf(results), '2025-11-20'));
    const listed = await listReleases(dir, 'panel');
    expect(listed.issues).toEqual([]);
    expect(listed.releases.map((r) => r.record.id)).toEqual(['2025-11-20-1', '2026-03-02-1']);
    const loaded = await loadRelease(dir, 'panel', '2026-03-02-1');
    expect(loaded.issues).toEqual([]);
    expect(loaded.release?.results).toEqual(JSON.parse(JSON.stringify(results)));
    const latest = await loadLatestRelease(dir, 'panel');
    expect(latest.release?.record.id).toBe('2026-03-02-1');
    expect(await listReleases(dir, 'other')).toEqual({ releases: [], issues: [] });
  });

  it('reports an altered results.json and serves neither it nor an older release in its place', async () => {
    const dir = archiveDir();
    await createRelease(dir, request(bytesOf(v1()), '2025-11-20'));
    await createRelease(dir, request(bytesOf(v1()), '2026-03-02'));
    const file = path.join(dir, 'releases/panel/2026-03-02-1/results.json');
    chmodSync(file, 0o644);
    writeFileSync(file, readFileSync(file, 'utf8').replace('"hypercontractile"', '"indeterminate"'));
    const listed = await listReleases(dir, 'panel');
    expect(listed.releases.map((r) => r.record.id)).toEqual(['2025-11-20-1']);
    expect(listed.issues.map((i) => `${i.code} ${i.at.file}`)).toEqual(['release.hash-mismatch releases/panel/2026-03-02-1/results.json']);
    expect(listed.issues[0]?.fix).toMatch(/never edited/);
    const latest = await loadLatestRelease(dir, 'panel');
    expect(latest.release).toBeUndefined();
    expect(latest.issues.map((i) => i.code)).toEqual(['release.hash-mismatch']);
  });

  it('reports unfinished, stray, moved and incomplete release folders', async () => {
    const dir = archiveDir();
    await createRelease(dir, request(bytesOf(v1())));
    const base = path.join(dir, 'releases', 'panel');
    mkdirSync(path.join(base, '.incomplete-abc123'));
    mkdirSync(path.join(base, 'notes'));
    cpSync(path.join(base, '2026-03-02-1'), path.join(base, '2026-03-03-1'), { recursive: true });
    mkdirSync(path.join(base, '2026-03-04-1'));
    const listed = await listReleases(dir, 'panel');
    expect(listed.releases.map((r) => r.record.id)).toEqual(['2026-03-02-1']);
    expect(listed.issues.map((i) => `${i.severity} ${i.code} ${i.at.file}`)).toEqual([
      'warning release.incomplete releases/panel/.incomplete-abc123',
      'error release.record-folder releases/panel/2026-03-03-1/release.json',
      'error release.missing-file releases/panel/2026-03-04-1/release.json',
      'warning release.stray-folder releases/panel/notes',
    ]);
  });
});

describe('a corrected CSV after a release, end to end through the store', () => {
  it('lists the changed call with its reason, and the released results.json stays byte-identical', async () => {
    const dir = archiveDir();
    const files = (sha: string) => [{ path: 'atpase-rates.csv', kind: 'atpase-rates', sha256: sha, rows: 40 }];
    const released = makeResults({ title: 'Panel', variants: [R403Q], files: files(fakeSha('v1')) });
    const releasedBytes = bytesOf(released);
    const made = await createRelease(dir, request(releasedBytes));
    // The lab corrects atpase-rates.csv; the rebuild calls R403Q indeterminate.
    const current = makeResults({ title: 'Panel', variants: [{ ...R403Q, overall: 'indeterminate', metrics: { 'atpase.kcat': [1.12, 0.98, 1.28, 'indeterminate'] } }], files: files(fakeSha('v2')) });
    const latest = await loadLatestRelease(dir, 'panel');
    const cmp = compareWithRelease('panel', current, latest.release!.results, latest.release!.record);
    expect(cmp.variants[0]?.changes[0]?.sentence).toBe(
      'Changed since the release of 2026-03-02 (note: sent to the cardiogenetics clinic): overall call was hypercontractile, now indeterminate; reason: corrected data in atpase-rates.csv.',
    );
    const onDisk = readFileSync(made.release!.resultsPath);
    expect(Buffer.compare(onDisk, Buffer.from(releasedBytes))).toBe(0);
    expect(sha256Hex(onDisk)).toBe(made.release!.record.resultsSha256);
  });
});
