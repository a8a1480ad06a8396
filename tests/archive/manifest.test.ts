import { describe, expect, it } from 'vitest';
import { ARCHIVE_SCHEMA, normaliseStudyPath, readArchiveManifest } from '../../src/archive/manifest.js';

const base = {
  title: 'Invented archive (synthetic)',
  lab: 'Invented Motor Lab',
  synthetic: true,
  studies: [
    { id: 'panel-2025', path: 'studies/panel-2025' },
    { id: 'remeasure-2025', path: 'studies/remeasure-2025' },
  ],
};

const read = (value: unknown) => readArchiveManifest(JSON.stringify(value, null, 2));
const codes = (value: unknown) => read(value).issues.map((i) => `${i.code} ${i.at.jsonPath}`);

describe('archive.json: a valid manifest', () => {
  it('reads title, lab, synthetic, description and the studies with normalised paths', () => {
    const out = read({ ...base, description: 'Two studies.', studies: [{ id: 'a', path: './studies/a/' }, { id: 'b', path: 'studies//b' }] });
    expect(out.issues).toEqual([]);
    expect(out.manifest).toEqual({
      title: base.title,
      lab: base.lab,
      synthetic: true,
      description: 'Two studies.',
      studies: [
        { id: 'a', path: 'studies/a', at: { file: 'archive.json', jsonPath: '/studies/0' } },
        { id: 'b', path: 'studies/b', at: { file: 'archive.json', jsonPath: '/studies/1' } },
      ],
    });
  });

  it('accepts a byte-order mark and an editor $schema pointer', () => {
    const out = readArchiveManifest(`\uFEFF${JSON.stringify({ $schema: '../schemas/archive.schema.json', ...base })}`);
    expect(out.issues).toEqual([]);
    expect(out.manifest?.studies).toHaveLength(2);
  });
});

describe('archive.json: refused', () => {
  it('refuses duplicate keys, naming the line, column and JSON path of the repeat', () => {
    const text = '{\n  "title": "A",\n  "lab": "L",\n  "synthetic": true,\n  "studies": [{ "id": "a", "path": "x", "path": "../y" }],\n  "title": "B"\n}';
    const out = readArchiveManifest(text, 'archive.json');
    expect(out.manifest).toBeUndefined();
    const dup = out.issues.filter((i) => i.code === 'archive.duplicate-key');
    // JSON.parse kept "../y" and "B"; both repeats are reported. Columns of the opening quotes counted
    // independently with Python's str.index on line 5 (28 and 41, 1-based).
    expect(dup.map((i) => i.at)).toEqual([
      { file: 'archive.json', line: 5, col: 41, jsonPath: '/studies/0/path' },
      { file: 'archive.json', line: 6, col: 3, jsonPath: '/title' },
    ]);
    expect(dup[0]?.message).toContain('first on line 5, column 28');
    expect(dup[0]?.fix).toMatch(/remove the other/);
    // The kept value (../y) is checked too: all problems in one run.
    expect(out.issues.map((i) => i.code)).toContain('archive.path-outside');
  });

  it('refuses a path escaping the archive with ..', () => {
    const out = read({ ...base, studies: [{ id: 'a', path: 'studies/../../elsewhere' }] });
    expect(out.manifest).toBeUndefined();
    expect(out.issues).toHaveLength(1);
    expect(out.issues[0]).toMatchObject({ severity: 'error', code: 'archive.path-outside', at: { file: 'archive.json', jsonPath: '/studies/0/path' } });
    expect(out.issues[0]?.fix).toMatch(/without "\.\."/);
  });

  it('refuses absolute paths (POSIX, Windows drive, home) and backslashes', () => {
    for (const p of ['/home/lab/study', 'C:/lab/study', 'c:study', '~/study']) {
      expect(normaliseStudyPath(p), p).toMatchObject({ problem: { code: 'archive.path-absolute' } });
    }
    expect(normaliseStudyPath('studies\\a')).toMatchObject({ problem: { code: 'archive.path-backslash' } });
  });

  it('refuses the archive folder itself and the releases folder (in any case)', () => {
    expect(normaliseStudyPath('.')).toMatchObject({ problem: { code: 'archive.path-is-archive' } });
    expect(normaliseStudyPath('./')).toMatchObject({ problem: { code: 'archive.path-is-archive' } });
    expect(normaliseStudyPath('releases/a')).toMatchObject({ problem: { code: 'archive.path-reserved' } });
    expect(normaliseStudyPath('Releases')).toMatchObject({ problem: { code: 'archive.path-reserved' } });
    // A folder whose name merely starts with "releases" is fine.
    expect(normaliseStudyPath('releases-old/a')).toEqual({ path: 'releases-old/a' });
    // '..' inside a name is not a parent step.
    expect(normaliseStudyPath('a..b/c')).toEqual({ path: 'a..b/c' });
  });

  it('refuses repeated ids and folders, also folders that differ only in case', () => {
    expect(
      codes({
        ...base,
        studies: [
          { id: 'a', path: 'studies/a' },
          { id: 'a', path: 'studies/b' },
          { id: 'c', path: './studies/a/' },
          { id: 'd', path: 'Studies/B' },
        ],
      }),
    ).toEqual(['archive.duplicate-id /studies/1/id', 'archive.duplicate-path /studies/2/path', 'archive.path-case /studies/3/path']);
  });

  it('warns about a study folder inside another and still returns the manifest', () => {
    const out = read({ ...base, studies: [{ id: 'a', path: 'studies/a' }, { id: 'b', path: 'studies/a/remeasure' }] });
    expect(out.issues.map((i) => `${i.severity} ${i.code} ${i.at.jsonPath}`)).toEqual(['warning archive.nested-study /studies/1/path']);
    expect(out.manifest?.studies.map((s) => s.id)).toEqual(['a', 'b']);
  });

  it('reports schema problems with paths and fixes, all in one run', () => {
    const out = read({ title: '', synthetic: 'yes', studies: [{ id: 'Panel 2025', path: 'a', extra: 1 }], colour: 'blue' });
    expect(out.manifest).toBeUndefined();
    expect(out.issues.map((i) => `${i.code} ${i.at.jsonPath}`).sort()).toEqual(
      [
        'archive.required /lab',
        'archive.unknown-field /colour',
        'archive.range /title',
        'archive.type /synthetic',
        'archive.unknown-field /studies/0/extra',
        'archive.study-id /studies/0/id',
      ].sort(),
    );
    const id = out.issues.find((i) => i.code === 'archive.study-id')!;
    expect(id.fix).toContain("'panel-2025'");
    expect(out.issues.find((i) => i.at.jsonPath === '/colour')!.fix).toContain("'studies'");
    for (const i of out.issues) expect(i.fix.length).toBeGreaterThan(10);
  });

  it('refuses an empty study list', () => {
    expect(codes({ ...base, studies: [] })).toEqual(['archive.no-studies /studies']);
  });

  it('reports a JSON syntax error with its line and column', () => {
    const out = readArchiveManifest('{\n  "title": "A",\n}', 'archive.json');
    expect(out.issues).toHaveLength(1);
    expect(out.issues[0]).toMatchObject({ code: 'archive.not-json', at: { file: 'archive.json', line: 3, col: 1 } });
  });
});

describe('schemas/archive.schema.json', () => {
  it('describes every field and allows no field it does not define', () => {
    const walk = (node: Record<string, unknown>, where: string) => {
      const props = node.properties as Record<string, Record<string, unknown>> | undefined;
      if (!props) return;
      expect(node.additionalProperties, `${where} additionalProperties`).toBe(false);
      for (const [name, sub] of Object.entries(props)) {
        expect(typeof sub.description, `${where}/${name} description`).toBe('string');
        walk(sub, `${where}/${name}`);
        if (sub.items) walk(sub.items as Record<string, unknown>, `${where}/${name}/items`);
      }
    };
    walk(ARCHIVE_SCHEMA, '');
    expect((ARCHIVE_SCHEMA as { $schema: string }).$schema).toBe('https://json-schema.org/draft/2020-12/schema');
  });
});
