/**
 * Why might a study's results differ from its released results? Everything that differs between
 * what the two builds were made from, as far as the two results.json can tell: input files (by
 * SHA-256 and row count), manifest fields (file entries, exclusions, assay settings, thresholds,
 * direction, variants and controls, caveats), the effective settings, the calibration, the methods
 * and the tool version. These are the differences found, not a proof of cause: the change sentences
 * say "reason" for what differs, and name the files that hold the variant's own data first. Pure.
 */
import type { Calibration, StudyResults } from '../results/types.js';
import { rangeText } from './words.js';

export type ReasonKind =
  | 'file-added'
  | 'file-removed'
  | 'file-changed'
  | 'file-moved'
  | 'file-entry-changed'
  | 'exclusions-changed'
  | 'settings-changed'
  | 'thresholds-changed'
  | 'direction-changed'
  | 'variants-changed'
  | 'controls-changed'
  | 'calibration-changed'
  | 'method-changed'
  | 'tool-version'
  | 'caveats-changed'
  | 'manifest-changed'
  | 'other-data'
  | 'none-found';

export interface ChangeReason {
  kind: ReasonKind;
  /** Words for a sentence, without a final period, e.g. 'corrected data in atpase-rates.csv'. */
  text: string;
  /** The input file the reason is about (file-* kinds), as provenance.files names it. */
  file?: string;
}

/** The kinds of change a reason can explain: a call, an evidence level, an estimate, a variant's presence (new, withdrawn). */
export type ChangeKind = 'overall-call' | 'evidence-level' | 'estimate' | 'presence';

/**
 * Which reasons can move which kind of change. An estimate and its interval do not depend on the
 * bands, the q threshold, the direction, the calibration or the other variants; a call does not
 * depend on the calibration, but does on the other test variants (q values are adjusted across them
 * by Benjamini–Hochberg, and controls are outside that family, so adding a variant or a control can
 * move another variant's call); an evidence level depends on all of them. Caveats and descriptive
 * manifest fields (title, genes, dates…) change no number and are listed for the study only.
 */
const AFFECTS: Record<ReasonKind, readonly ChangeKind[]> = {
  'file-added': ['overall-call', 'evidence-level', 'estimate', 'presence'],
  'file-removed': ['overall-call', 'evidence-level', 'estimate', 'presence'],
  'file-changed': ['overall-call', 'evidence-level', 'estimate', 'presence'],
  'file-moved': [],
  'file-entry-changed': ['overall-call', 'evidence-level', 'estimate', 'presence'],
  'exclusions-changed': ['overall-call', 'evidence-level', 'estimate', 'presence'],
  'settings-changed': ['overall-call', 'evidence-level', 'estimate'],
  'thresholds-changed': ['overall-call', 'evidence-level'],
  'direction-changed': ['evidence-level'],
  'variants-changed': ['overall-call', 'evidence-level', 'presence'],
  'controls-changed': ['overall-call', 'evidence-level'],
  'calibration-changed': ['evidence-level'],
  'method-changed': ['overall-call', 'evidence-level', 'estimate'],
  'tool-version': ['overall-call', 'evidence-level', 'estimate'],
  'caveats-changed': [],
  'manifest-changed': [],
  'other-data': ['overall-call', 'evidence-level'],
  'none-found': [],
};

export function reasonAffects(kind: ReasonKind, change: ChangeKind): boolean {
  return AFFECTS[kind].includes(change);
}

/** JSON text with object keys sorted, so that two values compare equal when they are equal. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value) ?? 'undefined';
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  const o = value as Record<string, unknown>;
  return `{${Object.keys(o)
    .sort()
    .filter((k) => o[k] !== undefined)
    .map((k) => `${JSON.stringify(k)}:${canonicalJson(o[k])}`)
    .join(',')}}`;
}

const same = (a: unknown, b: unknown) => canonicalJson(a) === canonicalJson(b);

function asObject(v: unknown): Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
}

function shorten(text: string, max = 80): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`;
}

function value(v: unknown): string {
  if (v === undefined) return 'not set';
  if (typeof v === 'number') return String(v); // as the lab wrote it
  if (typeof v === 'string') return `'${shorten(v, 40)}'`;
  return shorten(canonicalJson(v), 40);
}

/** 1. Input files: added, removed, changed (rows compared), moved (same bytes, new path). */
function fileReasons(released: StudyResults, current: StudyResults): ChangeReason[] {
  const before = new Map(released.provenance.files.map((f) => [f.path, f]));
  const after = new Map(current.provenance.files.map((f) => [f.path, f]));
  const out: ChangeReason[] = [];
  const added = current.provenance.files.filter((f) => !before.has(f.path));
  const removed = released.provenance.files.filter((f) => !after.has(f.path));
  for (const f of current.provenance.files) {
    const old = before.get(f.path);
    if (!old || old.sha256 === f.sha256) continue;
    if (f.rows === old.rows) out.push({ kind: 'file-changed', file: f.path, text: `corrected data in ${f.path}` });
    else if (f.rows > old.rows) out.push({ kind: 'file-changed', file: f.path, text: `new data in ${f.path} (${old.rows} → ${f.rows} rows)` });
    else out.push({ kind: 'file-changed', file: f.path, text: `rows removed from ${f.path} (${old.rows} → ${f.rows} rows)` });
  }
  for (const f of added) {
    const from = removed.find((r) => r.sha256 === f.sha256);
    if (from) out.push({ kind: 'file-moved', file: f.path, text: `${from.path} moved to ${f.path} (same bytes)` });
    else out.push({ kind: 'file-added', file: f.path, text: `new data file ${f.path}` });
  }
  for (const f of removed) {
    if (added.some((a) => a.sha256 === f.sha256)) continue;
    out.push({ kind: 'file-removed', file: f.path, text: `data file ${f.path} removed` });
  }
  return out;
}

/** 2. Effective settings (results.settings): bands, q threshold, equivalence level, evidence cap, methods. */
function settingsReasons(released: StudyResults, current: StudyResults): ChangeReason[] {
  const a = released.settings;
  const b = current.settings;
  const out: ChangeReason[] = [];
  const scaleOf = (key: string) => {
    const [assay, metric] = key.split('.');
    return current.assays.find((x) => x.id === assay)?.metrics.find((m) => m.id === metric)?.scale ?? released.assays.find((x) => x.id === assay)?.metrics.find((m) => m.id === metric)?.scale;
  };
  const band = (key: string, v: [number, number] | undefined) => (v === undefined ? 'none' : rangeText(v[0], v[1], scaleOf(key) ?? 'difference'));
  const keys = [...new Set([...Object.keys(a.bands), ...Object.keys(b.bands)])].sort();
  for (const key of keys) {
    if (!same(a.bands[key], b.bands[key])) out.push({ kind: 'thresholds-changed', text: `WT-like band of ${key} changed (${band(key, a.bands[key])} → ${band(key, b.bands[key])})` });
    else if ((a.bandSource[key] ?? '') !== (b.bandSource[key] ?? '')) {
      out.push({ kind: 'thresholds-changed', text: `WT-like band of ${key} now set by ${value(b.bandSource[key])} (was ${value(a.bandSource[key])})` });
    }
  }
  if (a.qThreshold !== b.qThreshold) out.push({ kind: 'thresholds-changed', text: `q threshold changed (${a.qThreshold} → ${b.qThreshold})` });
  if (a.equivalenceAlpha !== b.equivalenceAlpha) out.push({ kind: 'thresholds-changed', text: `equivalence test level changed (${a.equivalenceAlpha} → ${b.equivalenceAlpha})` });
  if ((a.evidenceCap ?? '') !== (b.evidenceCap ?? '')) out.push({ kind: 'thresholds-changed', text: `evidence cap changed (${a.evidenceCap ?? 'none'} → ${b.evidenceCap ?? 'none'})` });
  if (a.comparisonMethod !== b.comparisonMethod) out.push({ kind: 'method-changed', text: 'the method comparing variant with WT changed (see the methods page)' });
  if (a.combiningRule !== b.combiningRule) out.push({ kind: 'method-changed', text: 'the rule combining metric calls into calls changed (see the methods page)' });
  return out;
}

function describeExclusion(x: Record<string, unknown>): string {
  const what = ['variant', 'unit', 'batch'].filter((k) => typeof x[k] === 'string').map((k) => `${k} ${String(x[k])}`);
  const assay = typeof x.assay === 'string' ? ` of ${x.assay}` : '';
  return `${what.join(' ') || String(x.kind ?? 'entry')}${assay}`;
}

/** 3. The manifest as given (provenance.manifest): fields that can move numbers, then the rest. */
function manifestReasons(released: StudyResults, current: StudyResults): ChangeReason[] {
  const a = asObject(released.provenance.manifest);
  const b = asObject(current.provenance.manifest);
  const out: ChangeReason[] = [];
  const handled = new Set(['files', 'exclusions', 'settings', 'thresholds', 'direction', 'variants', 'caveats']);

  // File entries (units, decimal mark, path length…), by path.
  const entries = (m: Record<string, unknown>) => new Map((Array.isArray(m.files) ? m.files : []).map((f) => [String(asObject(f).path), asObject(f)]));
  const fa = entries(a);
  const fb = entries(b);
  for (const [path, entry] of fb) {
    const old = fa.get(path);
    if (!old || same(old, entry)) continue;
    const keys = [...new Set([...Object.keys(old), ...Object.keys(entry)])].filter((k) => !same(old[k], entry[k])).sort();
    out.push({ kind: 'file-entry-changed', file: path, text: `manifest entry of ${path} changed (${keys.join(' and ')})` });
  }

  // Exclusions.
  const ex = (m: Record<string, unknown>) => (Array.isArray(m.exclusions) ? m.exclusions.map(asObject) : []);
  const ea = ex(a);
  const eb = ex(b);
  for (const x of eb) if (!ea.some((y) => same(x, y))) out.push({ kind: 'exclusions-changed', text: `exclusion added: ${describeExclusion(x)}` });
  for (const x of ea) if (!eb.some((y) => same(x, y))) out.push({ kind: 'exclusions-changed', text: `exclusion removed: ${describeExclusion(x)}` });

  // Assay settings.
  const sa = asObject(a.settings);
  const sb = asObject(b.settings);
  for (const key of [...new Set([...Object.keys(sa), ...Object.keys(sb)])].sort()) {
    if (!same(sa[key], sb[key])) out.push({ kind: 'settings-changed', text: `assay setting ${key} changed (${value(sa[key])} → ${value(sb[key])})` });
  }

  // Thresholds the effective settings do not show (e.g. declared WT baselines for the control charts).
  const ta = asObject(a.thresholds);
  const tb = asObject(b.thresholds);
  const shown = new Set(['bands', 'qThreshold', 'equivalenceAlpha', 'evidenceCap', 'bandsFromBenignControls']);
  const hidden = [...new Set([...Object.keys(ta), ...Object.keys(tb)])].filter((k) => !shown.has(k) && !same(ta[k], tb[k])).sort();
  if (hidden.length) out.push({ kind: 'thresholds-changed', text: `thresholds changed in the manifest (${hidden.join(' and ')})` });

  if (released.study.direction !== current.study.direction) {
    out.push({ kind: 'direction-changed', text: `disease direction changed (${released.study.direction} → ${current.study.direction})` });
  }
  if (!same(a.variants, b.variants)) out.push({ kind: 'variants-changed', text: 'the variant list in the manifest changed' });

  // Controls, from the results (the class a calibration reads).
  const control = (r: StudyResults) => new Map(r.variants.filter((v) => !v.isWT).map((v) => [`${v.gene}:${v.hgvs}`, v]));
  const ca = control(released);
  const cb = control(current);
  for (const [key, v] of cb) {
    const old = ca.get(key);
    if (!old) continue;
    const was = old.control?.class;
    const now = v.control?.class;
    if (was === now) continue;
    const name = `${v.short} (${v.gene})`;
    out.push({
      kind: 'controls-changed',
      text: now === undefined ? `${name} is no longer a calibration control (was ${was})` : was === undefined ? `${name} became a ${now} calibration control` : `${name} changed control class (${was} → ${now})`,
    });
  }

  const beforeCaveats = released.study.caveats;
  const afterCaveats = current.study.caveats;
  const addedCaveats = afterCaveats.filter((c) => !beforeCaveats.includes(c)).length;
  const removedCaveats = beforeCaveats.filter((c) => !afterCaveats.includes(c)).length;
  if (addedCaveats || removedCaveats) out.push({ kind: 'caveats-changed', text: `caveats changed (${addedCaveats} added, ${removedCaveats} removed)` });

  const other = [...new Set([...Object.keys(a), ...Object.keys(b)])].filter((k) => !handled.has(k) && !same(a[k], b[k])).sort();
  if (other.length) out.push({ kind: 'manifest-changed', text: `manifest fields changed (${other.join(' and ')})` });
  if (released.provenance.manifestSha256 !== current.provenance.manifestSha256 && same(a, b)) {
    out.push({ kind: 'manifest-changed', text: 'the manifest file changed in layout only (no field differs)' });
  }
  return out;
}

function calibrationText(scope: string, a: Calibration | undefined, b: Calibration | undefined): string | undefined {
  if (!a && !b) return undefined;
  if (!a || !b) return `calibration of ${scope} ${a ? 'no longer made' : 'made for the first time'}`;
  const parts: string[] = [];
  if (a.levelAbnormal !== b.levelAbnormal) parts.push(`abnormal readouts ${a.levelAbnormal} → ${b.levelAbnormal}`);
  if (a.levelNormal !== b.levelNormal) parts.push(`normal readouts ${a.levelNormal} → ${b.levelNormal}`);
  if (!same(a.counts, b.counts) || a.totalControls !== b.totalControls) {
    const counted = (c: Calibration) => c.totalControls - c.counts.notCounted;
    parts.push(
      a.totalControls === b.totalControls
        ? `controls counted ${counted(a)} → ${counted(b)} of ${b.totalControls}`
        : `controls counted ${counted(a)} of ${a.totalControls} → ${counted(b)} of ${b.totalControls}`,
    );
  }
  else if (a.oddsPathAbnormal !== b.oddsPathAbnormal || a.oddsPathNormal !== b.oddsPathNormal) parts.push('OddsPath changed');
  return parts.length ? `calibration of ${scope} changed (${parts.join('; ')})` : undefined;
}

/** 4. Calibration per scope (the overall one first). */
function calibrationReasons(released: StudyResults, current: StudyResults): ChangeReason[] {
  const scopes = [...new Set([...current.calibration.map((c) => c.scope), ...released.calibration.map((c) => c.scope)])];
  scopes.sort((x, y) => (x === 'overall' ? -1 : y === 'overall' ? 1 : x < y ? -1 : x > y ? 1 : 0));
  const out: ChangeReason[] = [];
  for (const scope of scopes) {
    const text = calibrationText(
      scope,
      released.calibration.find((c) => c.scope === scope),
      current.calibration.find((c) => c.scope === scope),
    );
    if (text) out.push({ kind: 'calibration-changed', text });
  }
  return out;
}

/**
 * Every difference found between the released and the current build's inputs and settings, in the
 * order a sentence lists them: data, manifest, settings, calibration, methods, tool version.
 */
export function studyReasons(released: StudyResults, current: StudyResults): ChangeReason[] {
  const out = [...fileReasons(released, current), ...manifestReasons(released, current), ...settingsReasons(released, current), ...calibrationReasons(released, current)];
  if (released.tool.version !== current.tool.version) {
    out.push({ kind: 'tool-version', text: `a different tool version (${released.tool.version} → ${current.tool.version}; see the changes to the methods)` });
  }
  return out;
}

/**
 * The input files that hold each variant's data in a build: the files of its own units, and of the
 * wild-type units of every assay that measured it (all WT units of an assay inform its comparisons:
 * the same-batch WT pairs with it, and the other batches' WT the WT variance; src/analysis/paired-effect.ts).
 * One pass over the units, then one lookup per variant (a 10,000-variant study has about 10⁵ units).
 */
export function variantFileIndex(results: StudyResults): (variantId: string) => Set<string> {
  const wt = new Set(results.variants.filter((v) => v.isWT).map((v) => v.id));
  const own = new Map<string, { assays: Set<string>; files: Set<string> }>();
  const wtFiles = new Map<string, Set<string>>();
  for (const u of results.units) {
    if (wt.has(u.variant)) {
      let files = wtFiles.get(u.assay);
      if (!files) wtFiles.set(u.assay, (files = new Set()));
      for (const s of u.source) files.add(s.file);
      continue;
    }
    let entry = own.get(u.variant);
    if (!entry) own.set(u.variant, (entry = { assays: new Set(), files: new Set() }));
    entry.assays.add(u.assay);
    for (const s of u.source) entry.files.add(s.file);
  }
  return (variantId) => {
    const entry = own.get(variantId);
    const files = new Set(entry?.files ?? []);
    for (const assay of entry?.assays ?? []) for (const f of wtFiles.get(assay) ?? []) files.add(f);
    return files;
  };
}

/** The input files of one variant in a build (see variantFileIndex; use that for many variants). */
export function variantFiles(results: StudyResults, variantId: string): Set<string> {
  return variantFileIndex(results)(variantId);
}

/**
 * The reasons that can explain one kind of change of one variant: study-wide reasons that affect that
 * kind, and file reasons about the variant's own files; changed files holding only other variants'
 * data are summarised in one 'other-data' reason (they move this variant's q values through the
 * study-wide Benjamini–Hochberg adjustment, and the calibration), for calls and evidence only.
 * When nothing is found, one 'none-found' reason says so.
 */
export function reasonsFor(reasons: readonly ChangeReason[], change: ChangeKind, files: ReadonlySet<string>): ChangeReason[] {
  const own: ChangeReason[] = [];
  const elsewhere: string[] = [];
  const rest: ChangeReason[] = [];
  for (const r of reasons) {
    if (!reasonAffects(r.kind, change)) continue;
    if (r.file !== undefined) {
      if (files.has(r.file)) own.push(r);
      else if (!elsewhere.includes(r.file)) elsewhere.push(r.file);
    } else rest.push(r);
  }
  const out = [...own, ...rest];
  if (elsewhere.length && reasonAffects('other-data', change)) {
    out.push({ kind: 'other-data', text: `changed data of other variants (${elsewhere.join(' and ')}), which moves q values and the calibration study-wide` });
  }
  if (out.length === 0) out.push({ kind: 'none-found', text: 'no difference found in input files, manifest, settings or tool version' });
  return out;
}
