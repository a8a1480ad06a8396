/** The archive's command-line edges: problems in archive.json located and explained, usage mistakes, output placement. */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-archive-cli-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

async function run(...argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let o = '';
  let e = '';
  const code = await main(argv, { stdout: { write: (s: string) => (o += s) }, stderr: { write: (s: string) => (e += s) }, cwd: root });
  return { code, out: o, err: e };
}

function archive(name: string, json: unknown, folders: string[] = []): string {
  const dir = join(root, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'archive.json'), typeof json === 'string' ? json : JSON.stringify(json, null, 2));
  for (const f of folders) mkdirSync(join(dir, f), { recursive: true });
  return name;
}

describe('myofolio check <archive-dir>', () => {
  it('locates each problem of archive.json by JSON path, with its fix', async () => {
    const a = archive('bad', { title: 'T', lab: 'L', synthetic: true, studies: [{ id: 'one', path: 'studies/one' }, { id: 'one', path: '../outside' }, { id: 'Two', path: 'studies/two' }] }, ['studies/one']);
    const r = await run('check', a);
    expect(r.code).toBe(1);
    expect(r.out).toContain("archive.json:/studies/1/id: error: The study id 'one' is already used by /studies/0.");
    expect(r.out).toContain("archive.json:/studies/1/path: error: The path '../outside' uses '..'");
    expect(r.out).toContain("archive.json:/studies/2/id: error: 'Two' is not a study id");
  });

  it('names a study folder that is missing, or has no study.json', async () => {
    const a = archive('missing', { title: 'T', lab: 'L', synthetic: true, studies: [{ id: 'one', path: 'studies/one' }, { id: 'two', path: 'studies/two' }] }, ['studies/one']);
    const r = await run('check', a);
    expect(r.code).toBe(1);
    expect(r.out).toContain("archive.json:/studies/0/path: error: The study folder 'studies/one' has no study.json.");
    expect(r.out).toContain("archive.json:/studies/1/path: error: The study folder 'studies/two' does not exist in the archive folder.");
  });

  it('reports a syntax error of archive.json with its line and column', async () => {
    const a = archive('syntax', '{\n  "title": "T",\n  "lab": "L"\n  "synthetic": true\n}\n');
    const r = await run('check', a);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/^archive\.json:4:\d+: error: The archive manifest is not valid JSON/m);
  });
});

describe('myofolio build and release, usage', () => {
  it('build refuses an output folder inside the archive folder, worded for an archive', async () => {
    const a = archive('placed', { title: 'T', lab: 'L', synthetic: true, studies: [{ id: 'one', path: 'studies/one' }] }, ['studies/one']);
    writeFileSync(join(root, a, 'studies', 'one', 'study.json'), '{}');
    const r = await run('build', a, '--out', `${a}/site`);
    expect(r.code).toBe(1);
    expect(r.err).toContain('is inside the archive folder');
    expect(r.err).toContain('fix:');
  });

  it('release needs a note, two arguments, and an archive folder', async () => {
    expect((await run('release', 'placed', 'one')).code).toBe(2);
    expect((await run('release', 'placed', 'one')).err).toContain('--note');
    expect((await run('release', 'placed', '--note', 'x')).code).toBe(2);
    const notArchive = await run('release', '.', 'one', '--note', 'x');
    expect(notArchive.code).toBe(1);
    expect(notArchive.err).toContain('has no archive.json');
  });

  it('release names the archive\'s ids for an unknown study, and asks for a build first', async () => {
    const unknown = await run('release', 'placed', 'nope', '--note', 'sent', '--out', 'nowhere');
    expect(unknown.code).toBe(1);
    expect(unknown.out).toContain("The archive has no study 'nope'.");
    expect(unknown.out).toContain("'one'");
    const unbuilt = await run('release', 'placed', 'one', '--note', 'sent', '--out', 'nowhere');
    expect(unbuilt.code).toBe(1);
    expect(unbuilt.out).toContain("Study 'one' has no built results in");
    expect(unbuilt.out).toContain('Nothing was released.');
  });
});
