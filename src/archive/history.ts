/**
 * The archive's history: every variant measured in any study, its latest call, and, per metric,
 * one row per study and release, with whether the studies agree. Pure: StudyResults in, plain data
 * out, for the archive's home page, gene pages and variant history pages.
 *
 *   entries (each study's current build, and each release of a study, labelled as such)
 *     1. order: by the study's last date, then study id, then releases by date and number, the
 *        current build after its study's releases
 *     2. gather: per variant identity (gene + HGVS, identity.ts; never the wild type) its rows
 *     3. per study, the latest entry counts (its current build, else its latest release); a study
 *        whose latest entry no longer lists the variant has withdrawn it
 *     4. concordance over the counted studies, per metric and overall (concordance.ts)
 *     5. latest call: from the latest counted study; for a variant withdrawn everywhere, its last
 *        released row, marked withdrawn
 *     6. per gene, per study summaries
 */
import type { FunctionCall, MetricComparison, StudyResults, VariantResult } from '../results/types.js';
import { judgeScope, judgeVariant, type ScopeAgreement } from './concordance.js';
import type {
  ArchiveEntry,
  ArchiveHistory,
  EntryRef,
  GeneVariantSummary,
  LatestCall,
  MetricHistory,
  MetricRow,
  OverallRow,
  StudySummary,
  VariantHistory,
} from './history-types.js';
import { compareVariants, variantKey, variantsByKey } from './identity.js';
import { pushTo } from './maps.js';
import { compareReleaseIds, releaseName } from './release.js';
import { rangeText } from './words.js';

export type * from './history-types.js';

const CALL_ORDER: readonly FunctionCall[] = ['hypercontractile', 'hypocontractile', 'mixed', 'within WT range', 'indeterminate', 'not measured'];

function lastDate(dates: readonly string[]): string {
  return dates.reduce((a, b) => (b > a ? b : a), '');
}

/** Archive order of entries (step 1). */
export function compareEntries(a: ArchiveEntry, b: ArchiveEntry): number {
  const da = lastDate(a.dates);
  const db = lastDate(b.dates);
  if (da !== db) return da < db ? -1 : 1;
  if (a.studyId !== b.studyId) return a.studyId < b.studyId ? -1 : 1;
  if (!a.release || !b.release) return (a.release ? 0 : 1) - (b.release ? 0 : 1);
  return compareReleaseIds(a.release.id, b.release.id);
}

function entryName(e: ArchiveEntry): string {
  const date = lastDate(e.dates);
  return `${e.title}${date ? ` (${date})` : ''}`;
}

/**
 * A row: the EntryRef fields, then the row's own fields assigned onto them. Not written as a spread
 * of an EntryRef into the row's literal: V8 builds such spread-then-extended objects slowly, and a
 * history makes one row per variant, metric and analysis. `release` is undefined for a current build.
 */
function entryRef<T extends object>(e: ArchiveEntry, variantId: string, fields: T): EntryRef & T {
  return Object.assign(
    {
      studyId: e.studyId,
      studyTitle: e.title,
      studyDate: lastDate(e.dates),
      origin: e.release ? ('release' as const) : ('current build' as const),
      release: e.release,
      variantId,
      label: e.release ? `${entryName(e)}, ${releaseName(e.release)}` : entryName(e),
    },
    fields,
  );
}

function checkEntries(entries: readonly ArchiveEntry[]): void {
  const seen = new Set<string>();
  for (const e of entries) {
    const id = `${e.studyId}\u0000${e.release?.id ?? ''}`;
    if (seen.has(id)) {
      throw new Error(
        e.release
          ? `buildHistory: release '${e.release.id}' of study '${e.studyId}' is given twice; pass each release once.`
          : `buildHistory: study '${e.studyId}' has two current builds; pass one current build per study.`,
      );
    }
    seen.add(id);
  }
}

interface Found {
  entry: ArchiveEntry;
  variant: VariantResult;
  comparisons: MetricComparison[];
}

function labelsOf(results: StudyResults): Map<string, { label: string; assayLabel: string; unit: string }> {
  const out = new Map<string, { label: string; assayLabel: string; unit: string }>();
  for (const a of results.assays) for (const m of a.metrics) out.set(`${a.id}.${m.id}`, { label: m.label, assayLabel: a.label, unit: m.unit });
  return out;
}

/** Build the archive's history from every entry (each study's current build and each release). */
export function buildHistory(entries: readonly ArchiveEntry[]): ArchiveHistory {
  checkEntries(entries);
  // 1. Order.
  const ordered = [...entries].sort(compareEntries);
  const latestOfStudy = new Map<string, ArchiveEntry>();
  for (const e of ordered) latestOfStudy.set(e.studyId, e);

  // 2. Gather per variant identity.
  const found = new Map<string, Found[]>();
  const labels = new Map<ArchiveEntry, ReturnType<typeof labelsOf>>();
  for (const e of ordered) {
    labels.set(e, labelsOf(e.results));
    const byVariant = new Map<string, MetricComparison[]>();
    for (const c of e.results.comparisons) pushTo(byVariant, c.variant, c);
    for (const [key, variant] of variantsByKey(e.results)) {
      pushTo(found, key, { entry: e, variant, comparisons: byVariant.get(variant.id) ?? [] });
    }
  }

  const variants: VariantHistory[] = [];
  for (const [key, rows] of found) variants.push(variantHistory(key, rows, latestOfStudy, labels));
  variants.sort(compareVariants);
  const byKey = new Map(variants.map((v) => [v.key, v]));
  const discordant = variants.filter((v) => v.concordance.status === 'discordant').map((v) => v.key);

  // 6. Per gene, per study.
  const genes = new Map<string, GeneVariantSummary[]>();
  for (const v of variants) {
    pushTo(genes, v.gene, {
      key: v.key,
      hgvs: v.hgvs,
      short: v.short,
      ...(v.residue !== undefined ? { residue: v.residue } : {}),
      ...(v.domain !== undefined ? { domain: v.domain } : {}),
      studies: v.studies.length,
      latest: v.latest,
      concordance: v.concordance.status,
    });
  }
  const studies: StudySummary[] = [];
  for (const [studyId, latest] of latestOfStudy) {
    const releases = ordered.filter((e) => e.studyId === studyId && e.release).map((e) => e.release!);
    const own = [...variantsByKey(latest.results).values()];
    const counts = new Map<FunctionCall, number>();
    for (const v of own) counts.set(v.overall.call, (counts.get(v.overall.call) ?? 0) + 1);
    studies.push({
      studyId,
      title: latest.title,
      dates: latest.dates,
      genes: latest.results.study.genes.map((g) => g.symbol),
      synthetic: latest.results.study.synthetic,
      origin: latest.release ? 'release' : 'current build',
      toolVersion: latest.results.tool.version,
      variants: own.length,
      calls: CALL_ORDER.filter((c) => counts.has(c)).map((call) => ({ call, count: counts.get(call)! })),
      releases,
      ...(releases.length ? { latestRelease: releases[releases.length - 1] } : {}),
      discordant: own.map((v) => variantKey(v)).filter((k) => byKey.get(k)?.concordance.status === 'discordant'),
    });
  }
  return {
    studies,
    genes: [...genes].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([symbol, vs]) => ({ symbol, variants: vs })),
    variants,
    discordant,
    synthetic: ordered.some((e) => e.results.study.synthetic),
  };
}

function variantHistory(
  key: string,
  rows: readonly Found[],
  latestOfStudy: ReadonlyMap<string, ArchiveEntry>,
  labels: ReadonlyMap<ArchiveEntry, Map<string, { label: string; assayLabel: string; unit: string }>>,
): VariantHistory {
  // 3. Per study, the latest entry counts.
  const counted = rows.filter((r) => latestOfStudy.get(r.entry.studyId) === r.entry);
  const countedIds = new Set(counted.map((r) => r.entry.studyId));
  const studyIds = [...new Set(rows.map((r) => r.entry.studyId))];
  const withdrawnIds = studyIds.filter((id) => !countedIds.has(id));
  const nameOf = (id: string) => entryName(latestOfStudy.get(id)!);

  const overall: OverallRow[] = rows.map((r) =>
    entryRef(r.entry, r.variant.id, {
      call: r.variant.overall.call,
      sentence: r.variant.overall.sentence,
      evidence: r.variant.evidence.level,
      evidenceSentence: r.variant.evidence.sentence,
      ...(r.variant.control ? { control: r.variant.control.class } : {}),
    }),
  );

  // Metrics in order of first appearance, reading the latest entries first (their order of assays).
  const metricKeys: string[] = [];
  for (const r of [...rows].reverse()) for (const c of r.comparisons) if (!metricKeys.includes(`${c.assay}.${c.metric}`)) metricKeys.push(`${c.assay}.${c.metric}`);
  const scopes: ScopeAgreement[] = [
    judgeScope('overall', 'overall call', counted.map((r) => ({ studyId: r.entry.studyId, studyName: entryName(r.entry), call: r.variant.overall.call }))),
  ];
  const metrics: MetricHistory[] = metricKeys.map((mk) => {
    const metricRows: MetricRow[] = [];
    let names: { label: string; assayLabel: string; unit: string } | undefined;
    for (const r of rows) {
      const c = r.comparisons.find((x) => `${x.assay}.${x.metric}` === mk);
      if (!c) continue;
      names = labels.get(r.entry)!.get(mk) ?? names;
      metricRows.push(
        entryRef(r.entry, r.variant.id, {
          effect: c.effect,
          ciLow: c.ciLow,
          ciHigh: c.ciHigh,
          scale: c.scale,
          unit: c.unit,
          band: c.band,
          call: c.call,
          q: c.q,
          nVariantUnits: c.nVariantUnits,
          nWtUnits: c.nWtUnits,
          sentence: c.sentence,
        }),
      );
    }
    const [assay = mk, ...rest] = mk.split('.');
    const metric = rest.join('.');
    const label = names?.label ?? metric;
    const assayLabel = names?.assayLabel ?? assay;
    const scopeLabel = `${label} (${assayLabel})`;
    const countedRows = metricRows.filter((m) => countedIds.has(m.studyId) && latestOfStudy.get(m.studyId)!.release?.id === m.release?.id);
    const scope = judgeScope(mk, scopeLabel, countedRows.map((m) => ({ studyId: m.studyId, studyName: nameOf(m.studyId), call: m.call })));
    scopes.push(scope);
    const scales = [...new Set(metricRows.map((m) => m.scale))];
    const notes: string[] = [];
    if (scales.length > 1) {
      notes.push(
        `The rows compare ${label} on different scales (${scales.map((s) => `${s}: ${joinRows(metricRows.filter((m) => m.scale === s))}`).join('; ')}), after a change of method; their effects cannot share one axis, but their calls can be compared.`,
      );
    }
    const bands = new Map<string, MetricRow[]>();
    for (const m of metricRows) {
      const t = rangeText(m.band[0], m.band[1], m.scale);
      pushTo(bands, t, m);
    }
    if (bands.size > 1) {
      notes.push(`The WT-like bands differ between rows (${[...bands].map(([t, ms]) => `${t} in ${joinRows(ms)}`).join('; ')}); each call is made against its own study's band.`);
    }
    // mk came from a row's comparisons, so metricRows holds at least that row.
    return { key: mk, assay, metric, label, assayLabel, unit: names?.unit ?? metricRows[0]!.unit, scales, rows: metricRows, agreement: scope.status, notes };
  });

  // 4. Concordance over the counted studies.
  const concordance = judgeVariant(
    scopes,
    counted.map((r) => ({ studyId: r.entry.studyId, studyName: entryName(r.entry) })),
    withdrawnIds.map(nameOf),
  );

  // 5. Latest call.
  const latestRow = counted.at(-1) ?? rows.at(-1);
  if (!latestRow) throw new Error(`variantHistory: no rows for ${key}`);
  const latest: LatestCall = entryRef(latestRow.entry, latestRow.variant.id, {
    call: latestRow.variant.overall.call,
    evidence: latestRow.variant.evidence.level,
    withdrawn: counted.length === 0,
  });

  const notes: string[] = [];
  const controlIn = rows.filter((r) => r.variant.control);
  if (controlIn.length && controlIn.length < rows.length) {
    const ids = [...new Set(controlIn.map((r) => r.entry.studyId))];
    notes.push(`A calibration control in ${ids.map(nameOf).join(' and ')} (known class ${controlIn[0]!.variant.control!.class}), where its calls calibrate the assays and carry no evidence level of their own.`);
  }
  const info = latestRow.variant;
  return {
    key,
    gene: info.gene,
    hgvs: info.hgvs,
    short: info.short,
    ...(info.residue !== undefined ? { residue: info.residue } : {}),
    ...(info.domain !== undefined ? { domain: info.domain } : {}),
    studies: studyIds.map((id) => {
      const e = latestOfStudy.get(id)!;
      return { studyId: id, title: e.title, date: lastDate(e.dates), withdrawn: !countedIds.has(id) };
    }),
    overall,
    metrics,
    concordance,
    latest,
    notes,
  };
}

function joinRows(rows: readonly EntryRef[]): string {
  return rows.map((r) => r.label).join(', ');
}
