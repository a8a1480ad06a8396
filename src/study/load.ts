/**
 * loadStudy: manifest text + file contents → Study in canonical units, and every issue. Pure
 * (no fs; SHA-256 via node:crypto, a pure computation).
 *
 *   manifest text ──readManifest──▶ genes, variants, file entries
 *        │ per file: decode UTF-8 ─▶ scanCsv ─▶ row reader (header, units, cells, row schema),
 *        │           row by row as the file is parsed (no table of cells kept)
 *        ▼
 *   cross checks (WT in every batch, unused variants, exclusions) ─▶ LoadOutcome
 *
 * All problems are collected in one pass; a study is returned only when no error was found.
 */
import { createHash } from 'node:crypto';
import { checkAcrossFiles, groupsOfRows, sharedGroups } from './across-files.js';
import { checkExclusionsMatch, checkUnusedVariants, checkWildTypeFacts, wildTypeFacts } from './checks.js';
import { csvDelimiter, decodeText, scanCsv } from './csv.js';
import { groupIssues } from './group-issues.js';
import { readManifest, type FileSpec } from './manifest.js';
import { MSG, issue } from './messages.js';
import { createRowReader, StringPool } from './rows.js';
import { KIND_DEFS, MANIFEST_NAME } from './schemas.js';
import type { InputFile, InputKind, Issue, LoadOutcome, RowBase, RowsByKind, Study, Variant, WildTypeFacts } from './types.js';

/** The contents of a study folder, read by the CLI (see read-folder.ts) or built in memory. */
export interface StudyFiles {
  /** Manifest file name for messages; default 'study.json'. */
  manifestPath?: string;
  manifest: string | Uint8Array;
  /** Files by path relative to the study folder (forward slashes). */
  files: ReadonlyMap<string, string | Uint8Array> | Readonly<Record<string, string | Uint8Array>>;
  /** SHA-256 (hex) by path when the reader computed it; computed here otherwise. */
  sha256?: ReadonlyMap<string, string>;
  /** Problems the reader found (paths outside the folder, links, devices). */
  readIssues?: Issue[];
}

/** SHA-256 of text (as UTF-8) or bytes, hex. */
export function sha256Hex(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/**
 * Is a manifest path a plain relative path inside the study folder?
 * Rejected: absolute paths, drive letters, backslashes, '..' and '.' segments, empty segments.
 * @example isInsideFolder('data/rates.csv') // true
 * @example isInsideFolder('../other/rates.csv') // false
 */
export function isInsideFolder(path: string): boolean {
  if (path.startsWith('/') || /^[A-Za-z]:/.test(path) || path.includes('\\') || path.includes('\0')) return false;
  return path.split('/').every((seg) => seg !== '' && seg !== '..' && seg !== '.');
}

function getFile(files: StudyFiles['files'], path: string): string | Uint8Array | undefined {
  if (files instanceof Map) return files.get(path);
  const rec = files as Readonly<Record<string, string | Uint8Array>>;
  return Object.prototype.hasOwnProperty.call(rec, path) ? rec[path] : undefined;
}

/**
 * What reading a file takes from the variant a label resolves to: its id (in every row), and its
 * gene and WT flag (the WT-per-batch check, wildTypeFacts). Nothing else of the variant enters
 * the rows, issues or facts of a file without errors.
 */
function variantFacts(v: Variant): string {
  return JSON.stringify([v.id, v.gene, v.isWT]);
}

/**
 * InputFile.variantLabels: SHA-256 of the labels met in a file, in order of first appearance,
 * each with variantFacts of the variant it resolved to (part of the store's key of units: the
 * same bytes read against other variants give other rows).
 */
function labelsSha256(labels: ReadonlyMap<string, Variant>): string {
  return sha256Hex(JSON.stringify([...labels].map(([label, v]) => [label, variantFacts(v)])));
}

/** Load and validate a study. Pure: see the module comment. */
export function loadStudy(input: StudyFiles): LoadOutcome {
  const manifestPath = input.manifestPath ?? MANIFEST_NAME;
  const issues: Issue[] = [...(input.readIssues ?? [])];
  // The reader could not read the manifest itself (not a regular file, too large): nothing to parse.
  if (issues.some((i) => i.severity === 'error' && i.at.file === manifestPath && i.at.jsonPath === undefined)) return { issues };
  const decodedManifest = decodeText(input.manifest);
  if (!decodedManifest.ok) {
    issues.push(issue(decodedManifest.problem, { file: manifestPath, line: decodedManifest.line, col: decodedManifest.col }));
    return { issues };
  }
  const manifestText = decodedManifest.text;
  const { manifest, issues: manifestIssues } = readManifest(manifestText, manifestPath);
  for (const i of manifestIssues) issues.push(i);
  if (!manifest) return { issues };

  /** Row arrays of each file, by kind, joined once at the end (no row-by-row copying). */
  const rowParts: Partial<Record<InputKind, unknown[][]>> = {};
  const inputFiles: InputFile[] = [];
  const variantsSeen = new Set<string>();
  const batches = new Set<string>();
  const units = new Set<string>();
  const pool = new StringPool();
  const readerFlagged = new Set((input.readIssues ?? []).map((i) => i.at.jsonPath));
  const byId = new Map(manifest.variants.map((v) => [v.id, v]));
  /** Facts of the WT-per-batch check, by kind, per file in file order. */
  const wtFacts: Partial<Record<InputKind, Array<{ file: string; facts: WildTypeFacts }>>> = {};
  /** Each file's rows, for the check across files. */
  const rowsByPath = new Map<string, RowBase[]>();
  /** Files in manifest order with the groups of rows two files can share (src/study/across-files.ts). */
  const fileGroups: Array<{ path: string; kind: InputKind; groups: Iterable<string> }> = [];
  /** Files named in the manifest that could not be read (missing, outside, not text). */
  let unreadFiles = 0;

  /** Read one file's text into typed rows, row by row as it is parsed; the issues keep the order of parse, then read. */
  const parseOne = (spec: FileSpec, path: string, data: string | Uint8Array) => {
    const decoded = decodeText(data);
    if (!decoded.ok) return { problem: issue(decoded.problem, { file: path, line: decoded.line, col: decoded.col }) };
    const text = decoded.text;
    const rowIssues: Issue[] = [];
    const reader = createRowReader(spec.entry.kind, csvDelimiter(text), spec, path, manifest.byLabel, rowIssues, pool, manifest.unresolved);
    let header = true;
    const scanned = scanCsv(text, path, (cells, line) => {
      if (header) reader.header(cells, line);
      else reader.row(cells, line);
      header = false;
    });
    const got = reader.finish();
    return { got, fileRows: got.rows as unknown as RowBase[], fileIssues: [...scanned.issues, ...rowIssues] };
  };

  for (const spec of manifest.files) {
    const path = spec.entry.path;
    const jsonPath = `/files/${spec.index}/path`;
    if (!isInsideFolder(path)) {
      if (!readerFlagged.has(jsonPath)) issues.push(issue(MSG.pathOutside(path), { file: manifestPath, jsonPath }));
      unreadFiles++;
      continue;
    }
    const data = getFile(input.files, path);
    if (data === undefined) {
      if (!readerFlagged.has(jsonPath)) issues.push(issue(MSG.fileNotFound(path), { file: manifestPath, jsonPath }));
      unreadFiles++;
      continue;
    }
    const sha256 = input.sha256?.get(path) ?? sha256Hex(data);
    const settings: Record<string, number | string | boolean> = { decimal: spec.decimal };
    // The kind's file options in canonical units (a per-unit option by its common value only).
    for (const o of KIND_DEFS[spec.entry.kind]?.fileOptions ?? []) {
      const v = spec.options[o.name];
      const value = typeof v === 'number' ? v : v?.value;
      if (value !== undefined) settings[o.setting] = value;
    }
    if (spec.missing.length) settings.missing = spec.missing.join(' ');
    const parts = (rowParts[spec.entry.kind] ??= []);
    const read = parseOne(spec, path, data);
    if (read.problem) {
      issues.push(read.problem);
      unreadFiles++;
      continue;
    }
    const { got, fileRows, fileIssues } = read;
    for (const i of fileIssues) issues.push(i);
    parts.push(fileRows);
    rowsByPath.set(path, fileRows);
    fileGroups.push({ path, kind: spec.entry.kind, groups: groupsOfRows(spec.entry.kind, fileRows).keys() });
    got.variantsSeen.forEach((id) => variantsSeen.add(id));
    got.batches.forEach((b) => batches.add(b));
    got.units.forEach((u) => units.add(u));
    (wtFacts[spec.entry.kind] ??= []).push({ file: path, facts: wildTypeFacts(fileRows, byId) });
    inputFiles.push({ kind: spec.entry.kind, path, sha256, rows: got.rowCount, settings, variantLabels: labelsSha256(got.labels), columns: got.columns });
  }

  // Rows of one kind in several files: a group (preparation, or NADH batch) in two files is
  // compared row by row.
  const shared = sharedGroups(fileGroups);
  if (shared.size > 0) {
    const order = manifest.files.map((f) => f.entry.path);
    for (const [kind, groups] of shared) issues.push(...checkAcrossFiles(kind, groups, order, (p) => rowsByPath.get(p) ?? [], byId));
  }

  // A study with nothing to analyse is an error that says what to add.
  const noData = unreadFiles === 0 && inputFiles.length > 0 && inputFiles.every((f) => f.rows === 0);
  if (noData) issues.push(issue(MSG.noDataRows(inputFiles.length), { file: manifestPath, jsonPath: '/files' }));
  if (!manifest.partial && manifest.unresolved.size === 0 && manifest.variants.length > 0 && manifest.variants.every((v) => v.isWT)) {
    issues.push(issue(MSG.onlyWildType(), { file: manifestPath, jsonPath: '/variants' }));
  }

  const rows: Partial<Record<InputKind, unknown[]>> = {};
  for (const [kind, parts] of Object.entries(rowParts) as [InputKind, unknown[][]][]) rows[kind] = parts.length === 1 ? parts[0] : ([] as unknown[]).concat(...parts);
  const typedRows = rows as Partial<RowsByKind>;
  // Kinds in the order of their first file, as the rows object holds them.
  if (!manifest.droppedWildType) issues.push(...checkWildTypeFacts(Object.keys(rowParts).map((k) => [k as InputKind, wtFacts[k as InputKind] ?? []]), manifest.variants));
  // Without any data row, the one error above stands for each file's "header but no rows" and each unused variant.
  if (noData) {
    for (let k = issues.length - 1; k >= 0; k--) if (issues[k]!.code === 'csv.no-rows') issues.splice(k, 1);
  } else issues.push(...checkUnusedVariants(manifest.variants, variantsSeen));
  issues.push(...checkExclusionsMatch(manifest.exclusions, batches, units));

  const grouped = groupIssues(issues);
  if (grouped.some((i) => i.severity === 'error')) return { issues: grouped };
  const json = manifest.json;
  const study: Study = {
    title: json.title,
    lab: json.lab,
    dates: json.dates,
    synthetic: json.synthetic,
    ...(json.description !== undefined ? { description: json.description } : {}),
    genes: manifest.genes,
    variants: manifest.variants,
    direction: json.direction,
    thresholds: json.thresholds ?? {},
    exclusions: manifest.exclusions,
    caveats: json.caveats ?? [],
    settings: manifest.settings,
    files: inputFiles,
    rows: typedRows,
    manifestRaw: manifest.raw,
    manifestSha256: sha256Hex(input.manifest),
  };
  return { study, issues: grouped };
}
