/**
 * The archive manifest (archive.json at the top of an archive folder): JSON text → typed manifest,
 * or every problem with its JSON path and fix, in one pass. Pure.
 *
 *   text ──JSON.parse──▶ value            syntax error: line and column (src/study/json-position.ts)
 *        ──duplicate keys──▶               each repeat with its pointer, line and column (json-keys.ts)
 *        ──schema (ajv, schemas/archive.schema.json)──▶
 *        ──checks a schema cannot express──▶ unique ids, unique folders (also by case),
 *                                             paths inside the archive, not in releases/, not nested
 *        ──▶ ArchiveManifest (study paths normalised: forward slashes, no '.', no trailing '/')
 */
import { Ajv2020 } from 'ajv/dist/2020.js';
import type { ErrorObject, ValidateFunction } from 'ajv';
import archiveSchema from '../../schemas/archive.schema.json' with { type: 'json' };
import { locateJsonError } from '../study/json-position.js';
import { issue, type MessageText } from '../study/messages.js';
import type { Issue, SourceRef } from '../study/types.js';
import { findDuplicateKeys, pointerToken } from './json-keys.js';
import { ARCHIVE_MSG } from './messages.js';
import { RELEASES_DIR } from './release.js';

/** The archive manifest's file name in an archive folder. */
export const ARCHIVE_MANIFEST_NAME = 'archive.json';

export const ARCHIVE_SCHEMA: Record<string, unknown> = archiveSchema;

/** One study of the archive. */
export interface ArchiveStudyRef {
  /** Slug, unique in the archive; names the study's pages and its releases folder. */
  id: string;
  /** Study folder relative to the archive folder: forward slashes, no '.' or empty segments, no trailing '/'. */
  path: string;
  /** Where the entry stands in archive.json. */
  at: SourceRef;
}

export interface ArchiveManifest {
  title: string;
  lab: string;
  synthetic: boolean;
  description?: string;
  studies: ArchiveStudyRef[];
}

/** What `readArchiveManifest` returns: the manifest when it has no errors, and every issue found. */
export interface ArchiveManifestOutcome {
  manifest?: ArchiveManifest;
  issues: Issue[];
}

interface ArchiveJson {
  title: string;
  lab: string;
  synthetic: boolean;
  description?: string;
  studies: Array<{ id: string; path: string }>;
}

let validator: ValidateFunction | undefined;

/** The compiled schema validator, compiled once per process when first used. */
function validate(): ValidateFunction {
  return (validator ??= new Ajv2020({ allErrors: true, strict: true }).compile(ARCHIVE_SCHEMA));
}

/** The value at a JSON Pointer, or undefined. */
function at(value: unknown, pointer: string): unknown {
  let v = value;
  for (const raw of pointer.split('/').slice(1)) {
    const token = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string, unknown>)[token];
  }
  return v;
}

/** The field names the schema allows at an instance path (top level, or a studies entry). */
function knownFields(path: string): string[] {
  const schema = archiveSchema as { properties: Record<string, { items?: { properties: Record<string, unknown> } }> };
  if (path === '') return Object.keys(schema.properties);
  return Object.keys(schema.properties.studies?.items?.properties ?? {});
}

function describeType(t: unknown): string {
  if (Array.isArray(t)) return t.join(' or ');
  return t === 'integer' ? 'whole number' : String(t);
}

/** Map one ajv error to a catalogue message and the JSON path it is about. */
function schemaMessage(err: ErrorObject, raw: unknown): { text: MessageText; path: string } {
  const path = err.instancePath;
  switch (err.keyword) {
    case 'required': {
      const prop = (err.params as { missingProperty: string }).missingProperty;
      return { text: ARCHIVE_MSG.required(prop), path: `${path}/${pointerToken(prop)}` };
    }
    case 'additionalProperties': {
      const prop = (err.params as { additionalProperty: string }).additionalProperty;
      return { text: ARCHIVE_MSG.unknownField(prop, knownFields(path)), path: `${path}/${pointerToken(prop)}` };
    }
    case 'type':
      return { text: ARCHIVE_MSG.type(describeType((err.params as { type: unknown }).type)), path };
    case 'minLength':
      return { text: ARCHIVE_MSG.nonEmpty(), path };
    case 'minItems':
      return { text: ARCHIVE_MSG.noStudies(), path };
    case 'maxLength':
      return { text: ARCHIVE_MSG.tooLong((err.params as { limit: number }).limit), path };
    case 'pattern':
      return { text: ARCHIVE_MSG.studyIdForm(String(at(raw, path))), path };
    default:
      return { text: ARCHIVE_MSG.schemaOther(err.message ?? err.keyword), path };
  }
}

/**
 * Normalise a study path written in archive.json, or say why it cannot be one. The checks, in order:
 * backslashes; absolute paths (a leading '/', a drive letter 'C:', a leading '~'); '..' segments;
 * the archive folder itself ('.', './'); the releases folder (compared without case, as macOS and
 * Windows do). '.' and empty segments are dropped: 'studies//a/./' → 'studies/a'.
 * @example normaliseStudyPath('./studies/panel-2025/') // { path: 'studies/panel-2025' }
 * @example normaliseStudyPath('../elsewhere') // { problem: archive.path-outside … }
 */
export function normaliseStudyPath(path: string): { path: string } | { problem: MessageText } {
  if (path.includes('\\')) return { problem: ARCHIVE_MSG.pathBackslash(path) };
  if (path.startsWith('/') || /^[A-Za-z]:/.test(path) || path.startsWith('~')) return { problem: ARCHIVE_MSG.pathAbsolute(path) };
  const segments = path.split('/').filter((s) => s !== '' && s !== '.');
  if (segments.includes('..')) return { problem: ARCHIVE_MSG.pathParent(path) };
  if (segments.length === 0) return { problem: ARCHIVE_MSG.pathIsArchive(path) };
  if (segments[0]!.toLowerCase() === RELEASES_DIR) return { problem: ARCHIVE_MSG.pathReserved(path, RELEASES_DIR) };
  return { path: segments.join('/') };
}

/**
 * Read archive.json. `file` is the name shown in issues (relative to the archive folder).
 * Returns the manifest only when there is no error; warnings come with it.
 */
export function readArchiveManifest(text: string, file = ARCHIVE_MANIFEST_NAME): ArchiveManifestOutcome {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const where = (jsonPath: string, extra: Partial<SourceRef> = {}): SourceRef => ({ file, ...extra, jsonPath });

  // 1. Syntax.
  let raw: unknown;
  try {
    raw = JSON.parse(body);
  } catch (err) {
    const located = locateJsonError(body);
    if (located) return { issues: [issue(ARCHIVE_MSG.notJson(located.reason), { file, line: located.line, col: located.col })] };
    const reason = err instanceof Error ? err.message.replace(/\.$/, '') : String(err);
    return { issues: [issue(ARCHIVE_MSG.notJson(reason), { file })] };
  }
  const issues: Issue[] = [];

  // 2. Duplicate keys: JSON.parse kept the last of each; the lab may have meant the first.
  for (const d of findDuplicateKeys(body)) {
    issues.push(issue(ARCHIVE_MSG.duplicateKey(d.key, d.firstLine, d.firstCol), where(d.pointer, { line: d.line, col: d.col })));
  }

  // 3. Schema.
  const check = validate();
  const schemaValid = check(raw);
  if (!schemaValid) {
    for (const err of check.errors ?? []) {
      const m = schemaMessage(err, raw);
      issues.push(issue(m.text, where(m.path || '/')));
    }
  }

  // 4. What the schema cannot express, for every entry with a string id and path.
  const studies: ArchiveStudyRef[] = [];
  const entries = raw !== null && typeof raw === 'object' && Array.isArray((raw as { studies?: unknown }).studies) ? ((raw as { studies: unknown[] }).studies) : [];
  const byId = new Map<string, number>();
  const byPath = new Map<string, number>();
  const byFolded = new Map<string, { path: string; index: number }>();
  const placed: Array<{ path: string; index: number }> = [];
  entries.forEach((entry, index) => {
    if (entry === null || typeof entry !== 'object') return;
    const { id, path } = entry as { id?: unknown; path?: unknown };
    const base = `/studies/${index}`;
    if (typeof id === 'string') {
      const first = byId.get(id);
      if (first !== undefined) issues.push(issue(ARCHIVE_MSG.duplicateId(id, first), where(`${base}/id`)));
      else byId.set(id, index);
    }
    if (typeof path !== 'string' || path === '') return;
    const normal = normaliseStudyPath(path);
    if ('problem' in normal) {
      issues.push(issue(normal.problem, where(`${base}/path`)));
      return;
    }
    const first = byPath.get(normal.path);
    const folded = byFolded.get(normal.path.toLowerCase());
    if (first !== undefined) issues.push(issue(ARCHIVE_MSG.duplicatePath(normal.path, first), where(`${base}/path`)));
    else if (folded) issues.push(issue(ARCHIVE_MSG.pathCaseClash(normal.path, folded.path, folded.index), where(`${base}/path`)));
    else {
      byPath.set(normal.path, index);
      byFolded.set(normal.path.toLowerCase(), { path: normal.path, index });
      placed.push({ path: normal.path, index });
    }
    if (typeof id === 'string') studies.push({ id, path: normal.path, at: where(base) });
  });
  for (const inner of placed) {
    const outer = placed.find((o) => o !== inner && inner.path.toLowerCase().startsWith(`${o.path.toLowerCase()}/`));
    if (outer) issues.push(issue(ARCHIVE_MSG.nestedStudy(inner.path, outer.path, outer.index), where(`/studies/${inner.index}/path`)));
  }

  if (!schemaValid || issues.some((i) => i.severity === 'error')) return { issues };
  const json = raw as ArchiveJson;
  return {
    manifest: {
      title: json.title,
      lab: json.lab,
      synthetic: json.synthetic,
      ...(json.description !== undefined ? { description: json.description } : {}),
      studies,
    },
    issues,
  };
}
