import { describe, expect, it } from 'vitest';
import {
  compareReleaseIds,
  isCalendarDate,
  latestRelease,
  makeRelease,
  nextReleaseId,
  parseReleaseId,
  readReleaseRecord,
  releaseName,
  releasePaths,
  releaseRecordText,
  resultsHead,
  sha256Hex,
} from '../../src/archive/release.js';
import { makeResults } from './study-results.js';

const resultsText = () => `${JSON.stringify(makeResults({ variants: [{ hgvs: 'p.Arg403Gln', short: 'R403Q', overall: 'hypercontractile', metrics: { 'atpase.kcat': [1.5, 1.3, 1.7, 'increased'] } }] }))}\n`;

describe('release ids and layout', () => {
  it('numbers releases per day from 1', () => {
    expect(nextReleaseId('2026-03-02', [])).toBe('2026-03-02-1');
    expect(nextReleaseId('2026-03-02', ['2026-03-02-1', '2026-01-10-4', 'junk'])).toBe('2026-03-02-2');
    expect(nextReleaseId('2026-03-02', ['2026-03-02-9', '2026-03-02-10'])).toBe('2026-03-02-11');
  });

  it('orders by date, then by number as a number (10 after 9, which text order gets wrong)', () => {
    const ids = ['2026-03-02-10', '2025-12-31-1', '2026-03-02-9', '2026-03-02-1'];
    expect([...ids].sort(compareReleaseIds)).toEqual(['2025-12-31-1', '2026-03-02-1', '2026-03-02-9', '2026-03-02-10']);
    expect(latestRelease(ids.map((id) => ({ id })))?.id).toBe('2026-03-02-10');
    expect(latestRelease([])).toBeUndefined();
  });

  it('checks calendar dates (Gregorian leap years: 2024 yes, 2025 no, 1900 no, 2000 yes)', () => {
    expect(isCalendarDate('2024-02-29')).toBe(true);
    expect(isCalendarDate('2025-02-29')).toBe(false);
    expect(isCalendarDate('1900-02-29')).toBe(false);
    expect(isCalendarDate('2000-02-29')).toBe(true);
    expect(isCalendarDate('2025-13-01')).toBe(false);
    expect(isCalendarDate('2025-3-1')).toBe(false);
    expect(parseReleaseId('2025-02-29-1')).toBeUndefined();
    expect(parseReleaseId('2026-03-02-0')).toBeUndefined();
  });

  it('keeps releases in the archive, one folder per study and release', () => {
    expect(releasePaths('panel-2025', '2026-03-02-1')).toEqual({
      folder: 'releases/panel-2025/2026-03-02-1',
      results: 'releases/panel-2025/2026-03-02-1/results.json',
      record: 'releases/panel-2025/2026-03-02-1/release.json',
    });
  });

  it('names a release by its date, and by its id when it is not the first of its day', () => {
    expect(releaseName({ id: '2026-03-02-1', date: '2026-03-02', note: '' })).toBe('the release of 2026-03-02');
    expect(releaseName({ id: '2026-03-02-2', date: '2026-03-02', note: '' })).toBe('release 2026-03-02-2 (of 2026-03-02)');
  });
});

describe('makeRelease', () => {
  it('hashes with SHA-256 (FIPS 180-2 appendix B.1 example: "abc")', () => {
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256Hex(new TextEncoder().encode('abc'))).toBe(sha256Hex('abc'));
  });

  it('makes the record from the results text, a note, a date and the caveats', () => {
    const text = resultsText();
    const made = makeRelease({
      studyId: 'panel-2025',
      results: text,
      note: 'sent to the cardiogenetics clinic',
      date: '2026-03-02',
      caveats: ['Research data, not a clinical test.'],
      existingIds: ['2026-03-02-1'],
    });
    expect(made.problems).toEqual([]);
    expect(made.record).toEqual({
      schemaVersion: 1,
      id: '2026-03-02-2',
      study: 'panel-2025',
      date: '2026-03-02',
      note: 'sent to the cardiogenetics clinic',
      toolVersion: '0.2.0', // tool.version written by makeResults
      resultsSha256: sha256Hex(text),
      caveats: ['Research data, not a clinical test.'],
    });
    // Bytes and text of the same results hash alike: the hash is over the file's bytes.
    expect(makeRelease({ studyId: 'panel-2025', results: new TextEncoder().encode(text), note: 'n', date: '2026-03-02', caveats: [], existingIds: [] }).record?.resultsSha256).toBe(sha256Hex(text));
  });

  it('refuses what is not a results.json, and bad ids, dates, notes and caveats, naming each field', () => {
    const bad = makeRelease({ studyId: 'Panel 2025', results: resultsText(), note: ' ', date: '2026-02-30', caveats: [''], existingIds: [] });
    expect(bad.record).toBeUndefined();
    expect(bad.problems.map((p) => `${p.field} ${p.text.code}`)).toEqual(['study release.study-id', 'date release.date', 'note release.note', 'caveats/0 release.caveat']);
    const notJson = makeRelease({ studyId: 'a', results: '{"schemaVersion": 1', note: 'n', date: '2026-03-02', caveats: [], existingIds: [] });
    expect(notJson.problems.map((p) => p.text.code)).toEqual(['release.not-results']);
    const wrong = JSON.parse(resultsText());
    delete wrong.variants;
    const schema = makeRelease({ studyId: 'a', results: JSON.stringify(wrong), note: 'n', date: '2026-03-02', caveats: [], existingIds: [] });
    expect(schema.problems.map((p) => p.text.code)).toEqual(['release.results-schema']);
    expect(schema.problems[0]?.text.message).toContain('variants');
    const latin1 = makeRelease({ studyId: 'a', results: new Uint8Array([0x7b, 0xe9, 0x7d]), note: 'n', date: '2026-03-02', caveats: [], existingIds: [] });
    expect(latin1.problems[0]?.text.message).toContain('UTF-8');
  });
});

describe('release.json', () => {
  const record = makeRelease({ studyId: 'panel-2025', results: resultsText(), note: 'sent to the clinic', date: '2026-03-02', caveats: ['c'], existingIds: [] }).record!;

  it('round-trips through its text, which has a fixed key order', () => {
    const text = releaseRecordText(record);
    expect(Object.keys(JSON.parse(text))).toEqual(['schemaVersion', 'id', 'study', 'date', 'note', 'toolVersion', 'resultsSha256', 'caveats']);
    expect(readReleaseRecord(text)).toEqual({ record, problems: [] });
  });

  it('reports each damaged field with its JSON path', () => {
    const damaged = { ...record, resultsSha256: 'abc', date: '2026-03-03', extra: true } as Record<string, unknown>;
    delete damaged.note;
    const out = readReleaseRecord(JSON.stringify(damaged));
    expect(out.record).toBeUndefined();
    expect(out.problems.map((p) => p.jsonPath)).toEqual(['/note', '/resultsSha256', '/extra']);
    // With the other fields whole, a date that disagrees with the id is caught.
    const moved = readReleaseRecord(JSON.stringify({ ...record, date: '2026-03-03' }));
    expect(moved.problems.map((p) => p.jsonPath)).toEqual(['/date']);
    expect(readReleaseRecord('[').problems[0]?.text.code).toBe('release.record-not-json');
  });
});

describe('resultsHead', () => {
  it('reads the tool version from the first bytes of results.json as the build writes it', () => {
    expect(resultsHead(resultsText().slice(0, 200))).toEqual({ toolVersion: '0.2.0' });
    expect(resultsHead('{\n  "schemaVersion": 1,\n  "tool": { "name": "myofolio", "version": "1.0.0-rc.1" }')).toEqual({ toolVersion: '1.0.0-rc.1' });
  });

  it('refuses other JSON', () => {
    expect(resultsHead('{"tool": {"name": "myofolio", "version": "0.2.0"}, "schemaVersion": 1}')).toMatchObject({ problem: { code: 'release.not-results' } });
    expect(resultsHead('{"schemaVersion":1,"tool":{"name":"other","version":"1"}}')).toMatchObject({ problem: { code: 'release.not-results' } });
  });
});
