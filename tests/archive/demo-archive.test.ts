/**
 * The committed demo archive data-demo-archive/ is what its seeded generator makes
 * (src/demo/archive-scenario.ts, src/demo/generate-archive.ts), is labelled synthetic, and holds
 * one verified release of the panel, made before the correction of one variant's ATPase rates.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readArchiveManifest } from '../../src/archive/manifest.js';
import { listReleases, loadRelease } from '../../src/archive/release-store.js';
import { DEMO_RELEASE, archiveManifest, archiveStudies, correctedLabel, releasedRates } from '../../src/demo/archive-scenario.js';
import { historySlug } from '../../src/archive-site/paths.js';

const DIR = join(import.meta.dirname, '../../data-demo-archive');

describe('demo archive data-demo-archive/', () => {
  it('archive.json is the generator\'s, valid, and says synthetic', () => {
    const text = readFileSync(join(DIR, 'archive.json'), 'utf8');
    expect(JSON.parse(text)).toEqual(archiveManifest());
    const read = readArchiveManifest(text);
    expect(read.issues).toEqual([]);
    expect(read.manifest!.synthetic).toBe(true);
    expect(read.manifest!.lab).toMatch(/invented/);
    expect(read.manifest!.studies.map((s) => s.id)).toEqual(['panel-2025', 'remeasure-2025', 'thin-2026']);
  });

  it('every study folder holds exactly the files the seeded scenarios make (the panel as corrected)', () => {
    for (const s of archiveStudies()) {
      const dir = join(DIR, ...s.path.split('/'));
      expect(readdirSync(dir).sort()).toEqual(['study.json', ...Object.keys(s.study.files)].sort());
      for (const [p, t] of Object.entries(s.study.files)) expect(readFileSync(join(dir, p), 'utf8'), `${s.id}/${p}`).toBe(t);
      expect(JSON.parse(readFileSync(join(dir, 'study.json'), 'utf8'))).toEqual({ ...s.study.manifest, $schema: '../../../schemas/manifest.schema.json' });
      expect(s.study.manifest.synthetic).toBe(true);
    }
  });

  it('the re-measuring study measures two panel variants again, and the third study another invented gene', () => {
    const studies = archiveStudies();
    expect(studies).toHaveLength(3);
    const [panel, remeasure, thin] = studies.map((s) => s.study.manifest as { variants: Array<{ hgvs?: string }>; genes: Array<{ symbol: string }> });
    const panelHgvs = new Set(panel!.variants.map((v) => v.hgvs));
    const again = remeasure!.variants.filter((v) => v.hgvs);
    expect(again).toHaveLength(2);
    expect(again.every((v) => panelHgvs.has(v.hgvs))).toBe(true);
    expect(thin!.genes[0]?.symbol).toBe('ZZTNT3');
    expect(panel!.genes[0]?.symbol).toBe('ZZMYO1');
  });

  it('the correction changes only the corrected variant\'s rows', () => {
    const corrected = archiveStudies()[0]?.study.files['atpase-rates.csv'] ?? '';
    const before = releasedRates(corrected).split('\n');
    const after = corrected.split('\n');
    const differing = after.filter((line, i) => line !== before[i]);
    expect(differing.length).toBeGreaterThan(10);
    expect(differing.every((line) => line.startsWith(`${correctedLabel()},`))).toBe(true);
  });

  it('holds one release of the panel, its results.json intact, from before the correction', async () => {
    const listed = await listReleases(DIR, DEMO_RELEASE.study);
    expect(listed.issues).toEqual([]);
    expect(listed.releases.map((r) => [r.record.id, r.record.note])).toEqual([['2025-03-14-1', DEMO_RELEASE.note]]);
    const loaded = await loadRelease(DIR, DEMO_RELEASE.study, '2025-03-14-1');
    expect(loaded.issues).toEqual([]);
    const v = loaded.release!.results.variants.find((x) => x.short === correctedLabel())!;
    expect(v.overall.call).toBe('hypercontractile');
    const rates = loaded.release!.results.provenance.files.find((f) => f.path === 'atpase-rates.csv')!;
    expect(rates.sha256).not.toBe(
      // The corrected file's SHA-256 differs from the released one.
      (await import('node:crypto')).createHash('sha256').update(readFileSync(join(DIR, 'studies', 'panel-2025', 'atpase-rates.csv'))).digest('hex'),
    );
  });
});

describe('historySlug', () => {
  it('gives distinct page names to changes a plain slug would merge', () => {
    // HGVS forms (HGVS nomenclature, protein: '*' stop, '=' unchanged, '?' unknown); common practice, no source for the spelling.
    const names = ['p.Arg58*', 'p.Arg58=', 'p.Arg58?', 'p.Arg58Trp'].map((h) => historySlug('ZZMYO1', h));
    expect(new Set(names).size).toBe(4);
    expect(historySlug('ZZMYO1', 'p.Arg58Trp')).toBe('zzmyo1-p-arg58trp');
  });
});
