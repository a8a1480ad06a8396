/**
 * Per-unit analysis with the store: each assay module's units of one batch are one entry.
 *
 *   Study ──each active module's rows by batch──▶ key per (module, batch): the study settings and,
 *         for every file holding rows of that batch, its path, SHA-256, how it was read (kind,
 *         settings, manifest entry), the variant labels it resolved and its row count in the batch
 *         ──hit──▶ the batch's units (v8 serialisation: exact numbers, NaN and −0 kept), each with
 *                  the SHA-256 of its JSON (what the charts of a unit are kept under)
 *         ──miss─▶ module.analyse on a study holding only the missed batches' rows ──▶ stored
 *         ──merge, in the order module.analyse(study) gives──▶ UnitResult[]
 *
 * Why per batch: a unit reads its own rows and, for the ATPase from NADH traces, the actin-only
 * wells of its batch; no module reads rows of another batch. Why the files stand for the rows:
 * a file's rows are a function of its bytes, the manifest entry it is read with and the variants
 * its labels name (all in the key), and of the code and schemas (in the store's fingerprint), so
 * the key need not hash the rows themselves.
 */
import { createHash } from 'node:crypto';
import { deserialize, serialize } from 'node:v8';
import { activeModules, unitsInOrder } from '../assays/assay-common.js';
import { ASSAYS } from '../assays/registry.js';
import type { AssayModule } from '../assays/types.js';
import type { UnitResult } from '../results/types.js';
import type { InputKind, RowBase, Study } from '../study/types.js';
import type { Store } from './store.js';

/**
 * Order units as module.analyse(study) does: by first appearance of their (variant, unit, batch)
 * in the module's inputs (in module.inputs order); units not found there go last, in their order.
 */
export function analyseOrder(study: Study, m: AssayModule, units: UnitResult[]): UnitResult[] {
  const rank = new Map<string, number>();
  const see = (list: ReadonlyArray<readonly [string, string, string]>) => {
    for (const key of list) {
      const k = JSON.stringify(key);
      if (!rank.has(k)) rank.set(k, rank.size);
    }
  };
  for (const { kind } of m.inputs) see(unitsInOrder((study.rows[kind] ?? []) as RowBase[]));
  const end = rank.size;
  return units
    .map((u, i) => ({ u, i, r: rank.get(JSON.stringify([u.variant, u.unit, u.batch])) ?? end + i }))
    .sort((a, b) => a.r - b.r || a.i - b.i)
    .map((x) => x.u);
}

export interface StoredAnalysis {
  units: UnitResult[];
  counts: { analysed: number; stored: number };
  /** With a store: SHA-256 of each unit's JSON as analysed, in the order of `units`. */
  digests?: string[];
}

/**
 * Units of every active module: from the store where a batch's files are unchanged, else
 * analysed. Without a store (or with modules outside the registry, whose code the fingerprint
 * does not cover) this is `activeModules(study, modules).flatMap((m) => m.analyse(study))`.
 */
export function analyseUnits(study: Study, modules: readonly AssayModule[] = ASSAYS, store?: Store): StoredAnalysis {
  const active = activeModules(study, modules);
  if (!store || active.some((m) => !ASSAYS.includes(m))) {
    const units = active.flatMap((m) => m.analyse(study));
    return { units, counts: { analysed: new Set(units.map((u) => `${u.assay}\0${u.batch}`)).size, stored: 0 } };
  }
  // How the loader read each file: kind, settings, its manifest entry as given, the labels it resolved.
  const entries = new Map<string, unknown>();
  for (const e of ((study.manifestRaw as { files?: unknown } | undefined)?.files ?? []) as unknown[]) {
    const path = (e as { path?: unknown } | null)?.path;
    if (typeof path === 'string' && !entries.has(path)) entries.set(path, e);
  }
  const files = new Map(study.files.map((f) => [f.path, [f.path, f.sha256, f.kind, f.settings, entries.get(f.path) ?? null, f.variantLabels ?? null]]));

  const found: UnitResult[] = [];
  const digestOf = new Map<UnitResult, string>();
  const missed: Array<{ m: AssayModule; batches: Map<string, string> }> = [];
  let stored = 0;
  for (const m of active) {
    // Rows of each batch per file.
    const perBatch = new Map<string, Map<string, number>>();
    const add = (batch: string, path: string, n: number) => {
      let perFile = perBatch.get(batch);
      if (!perFile) perBatch.set(batch, (perFile = new Map()));
      perFile.set(path, (perFile.get(path) ?? 0) + n);
    };
    for (const { kind } of m.inputs) for (const r of (study.rows[kind] ?? []) as RowBase[]) add(r.batch, r.at.file, 1);
    const mine = new Map<string, string>();
    for (const [batch, perFile] of perBatch) {
      const key = store.key('units', [m.id, batch, study.settings, [...perFile].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([path, n]) => [files.get(path) ?? path, n])]);
      const hit = store.get('units', key);
      const entry = hit ? entryFrom(hit, m.id, batch) : undefined;
      if (entry) {
        entry.units.forEach((u, i) => digestOf.set(u, entry.digests[i] as string));
        found.push(...entry.units);
        stored++;
        continue;
      }
      mine.set(batch, key);
    }
    if (mine.size > 0) missed.push({ m, batches: mine });
  }

  let analysed = 0;
  for (const { m, batches } of missed) {
    // The module runs once, on the rows of its missed batches only.
    const rows: Partial<Record<InputKind, RowBase[]>> = {};
    for (const { kind } of m.inputs) {
      const list = ((study.rows[kind] ?? []) as RowBase[]).filter((r) => batches.has(r.batch));
      if (list.length > 0) rows[kind] = list;
    }
    const units = m.analyse({ ...study, rows: rows as Study['rows'] });
    for (const u of units) digestOf.set(u, unitDigest(u));
    for (const [batch, key] of batches) {
      // A batch whose rows give no unit (e.g. only NADH actin-only wells) is stored empty.
      const mine = units.filter((u) => u.batch === batch);
      store.put('units', key, serialize({ units: mine, digests: mine.map((u) => digestOf.get(u)) }));
      analysed++;
    }
    found.push(...units);
  }
  const units = active.flatMap((m) => analyseOrder(study, m, found.filter((u) => u.assay === m.id)));
  return { units, counts: { analysed, stored }, digests: units.map((u) => digestOf.get(u) as string) };
}

/** SHA-256 (hex) of a unit's JSON. */
export function unitDigest(u: UnitResult): string {
  return createHash('sha256').update(JSON.stringify(u)).digest('hex');
}

/** A stored entry, if it holds what this key was made for: this module's units of this batch, each with a digest. */
function entryFrom(bytes: Buffer, assay: string, batch: string): { units: UnitResult[]; digests: string[] } | undefined {
  try {
    const entry = deserialize(bytes) as { units: UnitResult[]; digests: string[] };
    const ok = Array.isArray(entry?.units) && Array.isArray(entry.digests) && entry.digests.length === entry.units.length;
    return ok && entry.units.every((u) => u && u.assay === assay && u.batch === batch) && entry.digests.every((d) => typeof d === 'string') ? entry : undefined;
  } catch {
    return undefined;
  }
}
