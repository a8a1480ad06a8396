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
 *
 * Each file read also gives a FileDigest (its issues, counts, batches, units, the variant labels
 * it uses and the facts of the cross checks). With `reuse`, a file whose digest is found under
 * its key (the same path, bytes and manifest entry, read by the same code) and whose labels
 * resolve to variants with the same facts is not parsed: the study takes the digest instead of
 * its rows (Study.omitted), and issues and checks come out the same.
 */
import { createHash } from 'node:crypto';
import { checkAcrossFiles, groupKeyHashes, groupsOfDigest, groupsOfRows, hashesMeet, sharedGroups } from './across-files.js';
import { checkExclusionsMatch, checkUnusedVariants, checkWildTypeFacts, wildTypeFacts } from './checks.js';
import { csvDelimiter, decodeText, scanCsv } from './csv.js';
import { groupIssues } from './group-issues.js';
import { readManifest, type FileSpec } from './manifest.js';
import { MSG, issue } from './messages.js';
import { createRowReader, StringPool } from './rows.js';
import { KIND_DEFS, MANIFEST_NAME } from './schemas.js';
import type { ColumnUnit, FileDigest, InputFile, InputKind, Issue, LoadOutcome, RowBase, RowsByKind, Study, Variant, WildTypeFacts } from './types.js';

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

/** Is the file there? (Without getting it: a reader may read a file only when it is got.) */
function hasFile(files: StudyFiles['files'], path: string): boolean {
  return files instanceof Map ? files.has(path) : Object.prototype.hasOwnProperty.call(files, path);
}

/** Digests of files read before, offered to loadStudy. */
export interface LoadReuse {
  /** Identity of the reading code (e.g. a fingerprint of the source); part of every digest key. */
  context: string;
  /** The digest stored under a key (see fileDigestKey), if any. */
  get(key: string, path: string): FileDigest | undefined;
}

export interface LoadOptions {
  /** Leave out the rows of files whose digest is found (Study.omitted); see the module comment. */
  reuse?: LoadReuse;
}

/** A file parsed in this load without errors: its digest, to store under its key. */
export interface ParsedDigest {
  path: string;
  key: string;
  digest: FileDigest;
}

/**
 * Key of a file's digest: SHA-256 over the reading code's identity, the path, the bytes'
 * SHA-256 and the manifest's entry for the file (as read). The variants its labels resolve to are
 * checked against the digest's own list (FileDigest.labels, see labelsResolveAlike), so that
 * declaring, renaming or removing a variant leaves the files that do not mention it unparsed.
 */
export function fileDigestKey(context: string, path: string, sha256: string, spec: unknown): string {
  return sha256Hex(JSON.stringify([context, path, sha256, spec]));
}

/**
 * What reading a file takes from the variant a label resolves to: its id (in every row), and its
 * gene and WT flag (the WT-per-batch check, wildTypeFacts). Nothing else of the variant enters
 * the rows, issues or facts of a file without errors.
 */
export function variantFacts(v: Variant): string {
  return JSON.stringify([v.id, v.gene, v.isWT]);
}

/** Do the labels of a digest resolve, in this manifest, to variants with the same facts? */
export function labelsResolveAlike(labels: FileDigest['labels'], byLabel: ReadonlyMap<string, Variant>): boolean {
  if (!Array.isArray(labels)) return false;
  for (const [label, facts] of labels) {
    const v = byLabel.get(label);
    if (!v || variantFacts(v) !== facts) return false;
  }
  return true;
}

/** InputFile.variantLabels: SHA-256 of a file's labels with their variants' facts, in file order. */
function labelsSha256(labels: FileDigest['labels']): string {
  return sha256Hex(JSON.stringify(labels));
}

/** A file's digest from its rows as read (see FileDigest). */
export function fileDigest(kind: InputKind, rows: readonly RowBase[], rowCount: number, issues: Issue[], seen: { variantsSeen: Set<string>; labels: Map<string, Variant>; batches: Set<string>; units: Set<string>; columns: ColumnUnit[] }, variants: ReadonlyMap<string, Variant>): FileDigest {
  const unitRows = new Map<string, [string, string, string, number]>();
  let last: [string, string, string, number] | undefined;
  for (const r of rows) {
    // Files are written unit by unit: most rows belong to the previous row's unit.
    if (!last || last[0] !== r.variant || last[1] !== r.unit || last[2] !== r.batch) {
      const key = `${r.variant}\0${r.unit}\0${r.batch}`;
      last = unitRows.get(key);
      if (!last) unitRows.set(key, (last = [r.variant, r.unit, r.batch, 0]));
    }
    last[3]++;
  }
  return {
    kind,
    rowCount,
    kept: rows.length,
    issues,
    variantsSeen: [...seen.variantsSeen],
    labels: labelsOf(seen.labels),
    batches: [...seen.batches],
    units: [...seen.units],
    unitRows: [...unitRows.values()],
    wildType: wildTypeFacts(rows, variants),
    // The same first appearances as unitsInOrder(rows), from the walk above.
    unitOrder: [...unitRows.values()].filter(([variant, unit]) => variant !== '' || unit !== '').map(([variant, unit, batch]) => [variant, unit, batch]),
    columns: seen.columns,
    groupKeys: groupKeyHashes(kind, rows),
  };
}

/** The labels met in a file (FileRows.labels) as FileDigest.labels. */
function labelsOf(labels: ReadonlyMap<string, Variant>): FileDigest['labels'] {
  return [...labels].map(([label, v]) => [label, variantFacts(v)]);
}

/** Load and validate a study. Pure: see the module comment. */
export function loadStudy(input: StudyFiles, options: LoadOptions = {}): LoadOutcome & { digests?: ParsedDigest[] } {
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
  const omitted = new Map<string, FileDigest>();
  const parsed: ParsedDigest[] = [];

  /** Where each file's rows sit in rowParts, and its rows (files read in this load). */
  const slots = new Map<string, { kind: InputKind; index: number }>();
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
    if (!hasFile(input.files, path)) {
      if (!readerFlagged.has(jsonPath)) issues.push(issue(MSG.fileNotFound(path), { file: manifestPath, jsonPath }));
      unreadFiles++;
      continue;
    }
    // The bytes are got only when needed: not for a file left out by its digest.
    const known = input.sha256?.get(path);
    let data = known === undefined ? (getFile(input.files, path) as string | Uint8Array) : undefined;
    const sha256 = known ?? sha256Hex(data as string | Uint8Array);
    const settings: Record<string, number | string | boolean> = { decimal: spec.decimal };
    // The kind's file options in canonical units (a per-unit option by its common value only).
    for (const o of KIND_DEFS[spec.entry.kind]?.fileOptions ?? []) {
      const v = spec.options[o.name];
      const value = typeof v === 'number' ? v : v?.value;
      if (value !== undefined) settings[o.setting] = value;
    }
    if (spec.missing.length) settings.missing = spec.missing.join(' ');
    const key = options.reuse ? fileDigestKey(options.reuse.context, path, sha256, spec) : '';
    const reused = options.reuse?.get(key, path);
    const parts = (rowParts[spec.entry.kind] ??= []);
    slots.set(path, { kind: spec.entry.kind, index: parts.length });
    if (reused && reused.kind === spec.entry.kind && labelsResolveAlike(reused.labels, manifest.byLabel) && Array.isArray(reused.columns) && Array.isArray(reused.groupKeys)) {
      for (const i of reused.issues) issues.push(i);
      parts.push([]);
      (wtFacts[spec.entry.kind] ??= []).push({ file: path, facts: reused.wildType });
      reused.variantsSeen.forEach((id) => variantsSeen.add(id));
      reused.batches.forEach((b) => batches.add(b));
      reused.units.forEach((u) => units.add(u));
      omitted.set(path, reused);
      fileGroups.push({ path, kind: spec.entry.kind, groups: groupsOfDigest(reused) });
      inputFiles.push({ kind: spec.entry.kind, path, sha256, rows: reused.rowCount, settings, variantLabels: labelsSha256(reused.labels), columns: reused.columns });
      continue;
    }
    data ??= getFile(input.files, path) as string | Uint8Array;
    const read = parseOne(spec, path, data);
    if (read.problem) {
      issues.push(read.problem);
      slots.delete(path);
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
    // A file read against a manifest with entries left out (rows skipped quietly) is not kept for reuse.
    if (options.reuse && !fileIssues.some((i) => i.severity === 'error') && !manifest.partial && manifest.unresolved.size === 0) {
      const digest = fileDigest(spec.entry.kind, fileRows, got.rowCount, fileIssues, got, byId);
      (wtFacts[spec.entry.kind] ??= []).push({ file: path, facts: digest.wildType });
      parsed.push({ path, key, digest });
    } else (wtFacts[spec.entry.kind] ??= []).push({ file: path, facts: wildTypeFacts(fileRows, byId) });
    inputFiles.push({ kind: spec.entry.kind, path, sha256, rows: got.rowCount, settings, variantLabels: labelsSha256(labelsOf(got.labels)), columns: got.columns });
  }

  // Rows of one kind in several files: a group (preparation, or NADH batch) in two files is
  // compared row by row; a file left out by its digest is read after all when it shares one.
  const shared = sharedGroups(fileGroups);
  if (shared.size > 0) {
    const specs = new Map(manifest.files.map((f) => [f.entry.path, f]));
    // Groups whose files were all read are compared row by row; a group in a file left out is
    // compared by its key hashes first, and its files are read only when the hashes meet.
    const reread = new Set<string>();
    for (const [kind, groups] of shared) {
      const hashesOf = new Map<string, Map<string, Uint32Array>>();
      const hashes = (path: string): Map<string, Uint32Array> => {
        let got = hashesOf.get(path);
        if (!got) {
          const d = omitted.get(path);
          hashesOf.set(path, (got = new Map(d ? d.groupKeys : groupKeyHashes(kind, rowsByPath.get(path) ?? [], new Set(groups.keys())))));
        }
        return got;
      };
      for (const [g, paths] of groups) {
        if (!paths.some((p) => omitted.has(p))) continue;
        let meet = false;
        for (let a = 0; a < paths.length && !meet; a++) for (let b = a + 1; b < paths.length && !meet; b++) meet = hashesMeet(hashes(paths[a]!).get(g) ?? new Uint32Array(), hashes(paths[b]!).get(g) ?? new Uint32Array());
        if (meet) paths.filter((p) => omitted.has(p)).forEach((p) => reread.add(p));
        else groups.delete(g); // no observation in common
      }
    }
    for (const path of reread) {
      const read = parseOne(specs.get(path)!, path, getFile(input.files, path) as string | Uint8Array);
      if (read.problem) continue; // cannot happen: the digest was made from this text
      const slot = slots.get(path)!;
      rowParts[slot.kind]![slot.index] = read.fileRows;
      rowsByPath.set(path, read.fileRows);
      omitted.delete(path);
    }
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

  const digests = options.reuse ? parsed : undefined;
  const grouped = groupIssues(issues);
  if (grouped.some((i) => i.severity === 'error')) return { issues: grouped, ...(digests ? { digests } : {}) };
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
    ...(omitted.size > 0 ? { omitted } : {}),
    manifestRaw: manifest.raw,
    manifestSha256: sha256Hex(input.manifest),
  };
  return { study, issues: grouped, ...(digests ? { digests } : {}) };
}
