/**
 * Releases, the pure part: a lab releases a study's results when it shares them (e.g. "sent to the
 * cardiogenetics clinic"). A release freezes that build's results.json byte for byte, with its
 * caveats and its SHA-256, in the archive folder, never in the study folder:
 *
 *   <archive>/releases/<study-id>/<yyyy-mm-dd>-<n>/results.json   the released bytes, unchanged
 *   <archive>/releases/<study-id>/<yyyy-mm-dd>-<n>/release.json   the ReleaseRecord below
 *
 * n counts the study's releases of that day from 1. A release folder is written once, complete,
 * under a temporary name and then renamed (src/archive/release-store.ts); it is never rewritten,
 * and a folder that exists already is refused. Every reader checks results.json against the
 * recorded SHA-256, so an altered release is reported, never served.
 *
 * Everything here is pure (node:crypto's SHA-256 is deterministic).
 */
import { createHash } from 'node:crypto';
import { Ajv2020 } from 'ajv/dist/2020.js';
import type { ValidateFunction } from 'ajv';
import archiveSchema from '../../schemas/archive.schema.json' with { type: 'json' };
import resultsSchema from '../../schemas/results.schema.json' with { type: 'json' };
import type { StudyResults } from '../results/types.js';
import type { MessageText } from '../study/messages.js';
import { ARCHIVE_MSG } from './messages.js';

/** The archive's folder of releases (reserved: no study folder may lie in it). */
export const RELEASES_DIR = 'releases';
export const RELEASE_RESULTS_FILE = 'results.json';
export const RELEASE_RECORD_FILE = 'release.json';

/** Study ids as archive.json allows them (read from schemas/archive.schema.json, one source). */
export const STUDY_ID_PATTERN = new RegExp(
  (archiveSchema as { properties: { studies: { items: { properties: { id: { pattern: string } } } } } }).properties.studies.items.properties.id.pattern,
);

/** What a page or a change sentence needs to name a release. */
export interface ReleaseRef {
  /** '<yyyy-mm-dd>-<n>', e.g. '2026-03-02-1'. */
  id: string;
  /** YYYY-MM-DD. */
  date: string;
  /** Why or with whom the results were shared. */
  note: string;
}

/** release.json: what was released, when, why, by which tool version, and the released bytes' SHA-256. */
export interface ReleaseRecord extends ReleaseRef {
  schemaVersion: 1;
  /** Study id in archive.json. */
  study: string;
  /** tool.version of the released results. */
  toolVersion: string;
  /** SHA-256 (hex) of the released results.json bytes. */
  resultsSha256: string;
  /** The caveats that went out with the results, as they were worded then. */
  caveats: string[];
}

/** Paths of one release, relative to the archive folder, with forward slashes. */
export interface ReleasePaths {
  folder: string;
  results: string;
  record: string;
}

/** Is this a study id as archive.json allows it? */
export function isStudyId(id: string): boolean {
  return STUDY_ID_PATTERN.test(id);
}

/**
 * Is this a real calendar date written YYYY-MM-DD (proleptic Gregorian, as ISO 8601)?
 * @example isCalendarDate('2024-02-29') // true (leap year)
 * @example isCalendarDate('2025-02-29') // false
 */
export function isCalendarDate(text: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const t = new Date(Date.UTC(y, mo - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
}

/** Split a release id into its date and day number; undefined when it is not one. */
export function parseReleaseId(id: string): { date: string; n: number } | undefined {
  const m = /^(\d{4}-\d{2}-\d{2})-([1-9]\d{0,3})$/.exec(id);
  const [, date, n] = m ?? [];
  if (date === undefined || n === undefined || !isCalendarDate(date)) return undefined;
  return { date, n: Number(n) };
}

/** Order of releases: by date, then by day number (release ids sort as text only up to 9 a day). */
export function compareReleaseIds(a: string, b: string): number {
  const pa = parseReleaseId(a);
  const pb = parseReleaseId(b);
  if (!pa || !pb) return a < b ? -1 : a > b ? 1 : 0;
  return pa.date < pb.date ? -1 : pa.date > pb.date ? 1 : pa.n - pb.n;
}

/** The latest release of a list (by date, then day number); undefined for none. */
export function latestRelease<T extends { id: string }>(releases: readonly T[]): T | undefined {
  let best: T | undefined;
  for (const r of releases) if (!best || compareReleaseIds(r.id, best.id) > 0) best = r;
  return best;
}

/**
 * The id of a new release on `date`: the date and one more than the highest number that day.
 * @example nextReleaseId('2026-03-02', ['2026-03-02-1', '2026-01-10-1']) // '2026-03-02-2'
 */
export function nextReleaseId(date: string, existingIds: readonly string[]): string {
  let n = 0;
  for (const id of existingIds) {
    const p = parseReleaseId(id);
    if (p && p.date === date) n = Math.max(n, p.n);
  }
  return `${date}-${n + 1}`;
}

/** Where a release lives in the archive folder. */
export function releasePaths(studyId: string, releaseId: string): ReleasePaths {
  const folder = `${RELEASES_DIR}/${studyId}/${releaseId}`;
  return { folder, results: `${folder}/${RELEASE_RESULTS_FILE}`, record: `${folder}/${RELEASE_RECORD_FILE}` };
}

/**
 * How a sentence names a release: 'the release of 2026-03-02', or, when a study has several
 * releases that day, 'release 2026-03-02-2 (of 2026-03-02)'.
 */
export function releaseName(ref: ReleaseRef): string {
  const p = parseReleaseId(ref.id);
  return p && p.n > 1 ? `release ${ref.id} (of ${ref.date})` : `the release of ${ref.date}`;
}

/** SHA-256 (FIPS 180-4) of the bytes (text as UTF-8), as 64 lower-case hex digits. */
export function sha256Hex(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

const HEAD = /^\s*\{\s*"schemaVersion"\s*:\s*1\s*,\s*"tool"\s*:\s*\{\s*"name"\s*:\s*"myofolio"\s*,\s*"version"\s*:\s*("(?:[^"\\]|\\.)*")/;

/**
 * The tool version from the first bytes of a results.json, without reading the rest (a
 * 10,000-variant study's results.json is larger than the longest string V8 can hold). It relies on
 * results.json beginning with schemaVersion and tool, as src/analysis/analyse-study.ts writes it.
 * @example resultsHead('{"schemaVersion":1,"tool":{"name":"myofolio","version":"0.2.0"},"study":') // { toolVersion: '0.2.0' }
 */
export function resultsHead(head: string): { toolVersion: string } | { problem: MessageText } {
  const m = HEAD.exec(head.charCodeAt(0) === 0xfeff ? head.slice(1) : head);
  if (!m) return { problem: ARCHIVE_MSG.releaseNotResults('it does not begin with {"schemaVersion": 1, "tool": {"name": "myofolio", "version": …}') };
  return { toolVersion: JSON.parse(m[1] as string) as string }; // group 1 is not optional in HEAD
}

let resultsValidator: ValidateFunction | undefined;

/** Parse results.json text and check it against schemas/results.schema.json. */
export function checkResultsText(text: string): { results?: StudyResults; problems: MessageText[] } {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    return { problems: [ARCHIVE_MSG.releaseNotResults(`it is not valid JSON (${err instanceof Error ? err.message.replace(/\.$/, '') : String(err)})`)] };
  }
  const validate = (resultsValidator ??= new Ajv2020({ allErrors: true, strict: false }).compile(resultsSchema));
  if (!validate(value)) {
    const problems = (validate.errors ?? []).slice(0, 10).map((e) => ARCHIVE_MSG.releaseResultsSchema(`${e.instancePath || '/'} ${e.message ?? e.keyword}`));
    return { problems };
  }
  return { results: value as StudyResults, problems: [] };
}

/** What a new release is made from: all plain values, found at the edge (clock, files). */
export interface ReleaseInput {
  studyId: string;
  /** YYYY-MM-DD. */
  date: string;
  note: string;
  caveats: readonly string[];
  toolVersion: string;
  resultsSha256: string;
  /** Ids of the study's releases so far (to number the new one). */
  existingIds: readonly string[];
}

/** Check the input of a release and make its record; problems name the field at fault. */
export function makeReleaseRecord(input: ReleaseInput): { record?: ReleaseRecord; problems: Array<{ field: string; text: MessageText }> } {
  const problems: Array<{ field: string; text: MessageText }> = [];
  if (!isStudyId(input.studyId)) problems.push({ field: 'study', text: ARCHIVE_MSG.releaseStudyId(input.studyId) });
  if (!isCalendarDate(input.date)) problems.push({ field: 'date', text: ARCHIVE_MSG.releaseDate(input.date) });
  if (input.note.trim() === '') problems.push({ field: 'note', text: ARCHIVE_MSG.releaseNote() });
  input.caveats.forEach((c, i) => {
    if (c.trim() === '') problems.push({ field: `caveats/${i}`, text: ARCHIVE_MSG.releaseCaveat() });
  });
  if (input.toolVersion === '') problems.push({ field: 'toolVersion', text: ARCHIVE_MSG.releaseNotResults('it names no tool version') });
  if (!/^[0-9a-f]{64}$/.test(input.resultsSha256)) problems.push({ field: 'resultsSha256', text: ARCHIVE_MSG.recordField('resultsSha256 is not 64 hex digits') });
  if (problems.length) return { problems };
  return {
    record: {
      schemaVersion: 1,
      id: nextReleaseId(input.date, input.existingIds),
      study: input.studyId,
      date: input.date,
      note: input.note.trim(),
      toolVersion: input.toolVersion,
      resultsSha256: input.resultsSha256,
      caveats: [...input.caveats],
    },
    problems,
  };
}

/**
 * A release made from results.json text or bytes held in memory: the bytes are checked against
 * schemas/results.schema.json, hashed as they are (the released file is these bytes), and the
 * record made. For files too large for one string, release-store.ts hashes while copying and reads
 * the tool version with `resultsHead`.
 */
export function makeRelease(input: Omit<ReleaseInput, 'toolVersion' | 'resultsSha256'> & { results: string | Uint8Array }): {
  record?: ReleaseRecord;
  results?: StudyResults;
  problems: Array<{ field: string; text: MessageText }>;
} {
  let text: string;
  if (typeof input.results === 'string') text = input.results;
  else {
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(input.results);
    } catch {
      return { problems: [{ field: 'results', text: ARCHIVE_MSG.releaseNotResults('it is not UTF-8 text') }] };
    }
  }
  const checked = checkResultsText(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  if (!checked.results) return { problems: checked.problems.map((text) => ({ field: 'results', text })) };
  const made = makeReleaseRecord({ ...input, toolVersion: checked.results.tool.version, resultsSha256: sha256Hex(input.results) });
  return { ...made, ...(made.record ? { results: checked.results } : {}) };
}

/** release.json text: fixed key order, two-space indent, final newline. */
export function releaseRecordText(record: ReleaseRecord): string {
  const ordered: ReleaseRecord = {
    schemaVersion: 1,
    id: record.id,
    study: record.study,
    date: record.date,
    note: record.note,
    toolVersion: record.toolVersion,
    resultsSha256: record.resultsSha256,
    caveats: record.caveats,
  };
  return `${JSON.stringify(ordered, null, 2)}\n`;
}

/** Read release.json; every damaged field is a problem (release records are never edited). */
export function readReleaseRecord(text: string): { record?: ReleaseRecord; problems: Array<{ jsonPath: string; text: MessageText }> } {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    return { problems: [{ jsonPath: '/', text: ARCHIVE_MSG.recordNotJson(err instanceof Error ? err.message.replace(/\.$/, '') : String(err)) }] };
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return { problems: [{ jsonPath: '/', text: ARCHIVE_MSG.recordField('it is not a JSON object') }] };
  const v = value as Record<string, unknown>;
  const problems: Array<{ jsonPath: string; text: MessageText }> = [];
  const need = (key: string, ok: boolean, what: string) => {
    if (!ok) problems.push({ jsonPath: `/${key}`, text: ARCHIVE_MSG.recordField(`${key} ${what}`) });
  };
  need('schemaVersion', v.schemaVersion === 1, 'is not 1');
  need('id', typeof v.id === 'string' && parseReleaseId(v.id) !== undefined, 'is not a release id <yyyy-mm-dd>-<n>');
  need('study', typeof v.study === 'string' && isStudyId(v.study), 'is not a study id');
  need('date', typeof v.date === 'string' && isCalendarDate(v.date), 'is not a date YYYY-MM-DD');
  need('note', typeof v.note === 'string', 'is not text');
  need('toolVersion', typeof v.toolVersion === 'string' && v.toolVersion !== '', 'is not a version');
  need('resultsSha256', typeof v.resultsSha256 === 'string' && /^[0-9a-f]{64}$/.test(v.resultsSha256), 'is not 64 hex digits');
  need('caveats', Array.isArray(v.caveats) && v.caveats.every((c) => typeof c === 'string'), 'is not a list of texts');
  if (problems.length === 0 && parseReleaseId(v.id as string)!.date !== v.date) need('date', false, `differs from the date in the id '${String(v.id)}'`);
  const known = new Set(['schemaVersion', 'id', 'study', 'date', 'note', 'toolVersion', 'resultsSha256', 'caveats']);
  for (const key of Object.keys(v)) if (!known.has(key)) need(key, false, 'is not a field of release records');
  if (problems.length) return { problems };
  return { record: v as unknown as ReleaseRecord, problems };
}
