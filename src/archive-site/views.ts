/**
 * The archive site's page data: the archive's history (src/archive/history.ts), each study's
 * current build, its releases and what changed since the latest one (src/archive/changes.ts) in;
 * one plain object per page out, every number and link already text. Charts come as ChartDefs
 * (specs), drawn later and only for the pages that are written (src/archive-site/write-site.ts).
 * Pure.
 */
import type { ReleaseComparison } from '../archive/changes.js';
import { describeCalls } from '../archive/concordance.js';
import type { ArchiveHistory, GeneHistory, VariantHistory } from '../archive/history-types.js';
import type { ArchiveManifest, ArchiveStudyRef } from '../archive/manifest.js';
import { releaseName, releasePaths, type ReleaseRecord } from '../archive/release.js';
import type { ChartDef } from '../charts/chart-def.js';
import type { StudyResults } from '../results/types.js';
import { PATHS, relLink, uniqueSlugs } from '../site/paths.js';
import { type CallView, STANDARD_CAVEATS, functionCall } from '../site/view-common.js';
import { historyChart, historyTable } from './history-chart.js';
import { ARCHIVE_PATHS } from './paths.js';

/** One study of the archive as built: its current results, its releases and the comparison with the latest. */
export interface BuiltStudy {
  ref: ArchiveStudyRef;
  results: StudyResults;
  /** Oldest first. */
  releases: ReleaseRecord[];
  comparison?: ReleaseComparison;
}

export interface ArchiveFrame {
  title: string;
  lab: string;
  description: string;
  synthetic: boolean;
  toolVersion: string;
  standardCaveats: string[];
  nav: Array<{ key: string; label: string; href: string }>;
  paths: { css: string; archiveCss: string; home: string };
}

interface PageBase {
  path: string;
  /** From the page back to the archive root. */
  root: string;
  title: string;
  /** Which nav entry is this page's. */
  navKey: string;
}

export interface HomePage extends PageBase {
  kind: 'home';
  description: string;
  studies: Array<{
    id: string;
    title: string;
    href: string;
    dates: string;
    genes: Array<{ symbol: string; href: string }>;
    variants: number;
    calls: Array<CallView & { count: number }>;
    toolVersion: string;
    discordant: number;
    release: { name: string; note: string; href: string; changed: number; withdrawn: number; added: number } | null;
    changesHref: string;
  }>;
  discordant: Array<{ name: string; href: string; sentence: string }>;
  genes: Array<{ symbol: string; href: string; variants: number; discordant: number }>;
}

export interface GenePage extends PageBase {
  kind: 'gene';
  symbol: string;
  variants: Array<{
    hgvs: string;
    short: string;
    href: string;
    residue: string;
    domain: string;
    studies: number;
    latest: CallView;
    evidence: string;
    from: string;
    withdrawn: boolean;
    agreement: string;
    discordant: boolean;
  }>;
}

export interface HistoryMetric {
  key: string;
  label: string;
  assayLabel: string;
  unit: string;
  agreement: string;
  discordant: boolean;
  notes: string[];
  chart: ChartDef | null;
  /** The chart's own SVG file, from the archive root (ARCHIVE_PATHS.chart); null without a chart. */
  chartFile: string | null;
  table: ChartDef['table'];
}

export interface HistoryPage extends PageBase {
  kind: 'history';
  gene: string;
  geneHref: string;
  hgvs: string;
  short: string;
  residue: string;
  domain: string;
  agreement: string;
  discordant: boolean;
  sentence: string;
  latest: { call: CallView; evidence: string; from: string; withdrawn: boolean };
  studies: Array<{ title: string; date: string; href: string; report: string | null; withdrawn: boolean }>;
  overall: Array<{ label: string; origin: string; report: string | null; call: CallView; evidence: string; sentence: string }>;
  metrics: HistoryMetric[];
  changes: Array<{ study: string; href: string; sentence: string }>;
  notes: string[];
}

export interface ChangesPage extends PageBase {
  kind: 'changes';
  study: { id: string; title: string; href: string };
  releases: Array<{ id: string; name: string; note: string; toolVersion: string; sha256: string; caveats: string[]; download: string }>;
  comparison: {
    release: string;
    summary: string;
    currentToolVersion: string;
    releasedToolVersion: string;
    reasons: string[];
    unchanged: number;
    variants: Array<{ name: string; status: string; report: string | null; history: string; changes: string[]; reasons: string[] }>;
  } | null;
}

export interface ArchivePages {
  frame: ArchiveFrame;
  home: HomePage;
  genes: GenePage[];
  histories: HistoryPage[];
  changes: ChangesPage[];
}

/** Where the released results.json of a release is copied in the archive site (for download). */
export function releaseDownload(studyId: string, releaseId: string): string {
  return releasePaths(studyId, releaseId).results;
}

/** A variant's report in its study's site, from the archive root (undefined when the study no longer lists it). */
function reportLinks(studies: readonly BuiltStudy[]): (studyId: string, variantId: string) => string | undefined {
  const byStudy = new Map<string, Map<string, string>>();
  for (const s of studies) byStudy.set(s.ref.id, uniqueSlugs(s.results.variants.map((v) => v.id)));
  return (studyId, variantId) => {
    const slug = byStudy.get(studyId)?.get(variantId);
    return slug === undefined ? undefined : `${ARCHIVE_PATHS.studyRoot(studyId)}${PATHS.variant(slug)}`;
  };
}

const AGREEMENT_WORDS: Record<string, string> = {
  discordant: 'discordant',
  concordant: 'concordant',
  inconclusive: 'not concordant, not contradictory',
  'single study': 'one study only',
  'not comparable': 'not comparable',
};

/**
 * The evidence of a variant's latest call as pages state it: a calibration control is not scored
 * as evidence for itself, so its level reads 'n/a (calibration control, <class>)' as in the table
 * of calls, never 'none'.
 */
function latestEvidence(v: Pick<VariantHistory, 'latest' | 'overall'>): string {
  const row = v.overall.find((o) => o.studyId === v.latest.studyId && o.label === v.latest.label);
  return row?.control ? `n/a (calibration control, ${row.control})` : v.latest.evidence;
}

/** An agreement status in the pages' words (the status itself when it has none). */
function agreementWords(status: string): string {
  return AGREEMENT_WORDS[status] ?? status;
}

function historyPage(v: VariantHistory, studies: readonly BuiltStudy[], report: ReturnType<typeof reportLinks>): HistoryPage {
  const path = ARCHIVE_PATHS.history(v.gene, v.hgvs);
  const link = (to: string) => relLink(path, to);
  const name = `${v.gene} ${v.hgvs}`;
  const metricSlugs = uniqueSlugs(v.metrics.map((m) => m.key));
  const currentReport = (studyId: string, variantId: string, origin: string) => {
    if (origin !== 'current build') return null;
    const to = report(studyId, variantId);
    return to ? link(to) : null;
  };
  const changes: HistoryPage['changes'] = [];
  for (const s of studies) {
    const c = s.comparison?.variants.find((x) => x.key === v.key);
    if (c) changes.push({ study: s.results.study.title, href: link(ARCHIVE_PATHS.changes(s.ref.id)), sentence: c.sentence });
  }
  return {
    kind: 'history',
    path,
    root: '../',
    title: `${name}: history across studies`,
    navKey: `gene-${v.gene}`,
    gene: v.gene,
    geneHref: link(ARCHIVE_PATHS.gene(v.gene)),
    hgvs: v.hgvs,
    short: v.short,
    residue: v.residue === undefined ? '—' : String(v.residue),
    domain: v.domain ?? '—',
    agreement: AGREEMENT_WORDS[v.concordance.status] ?? v.concordance.status,
    discordant: v.concordance.status === 'discordant',
    sentence: v.concordance.sentence,
    latest: { call: functionCall(v.latest.call), evidence: latestEvidence(v), from: v.latest.label, withdrawn: v.latest.withdrawn },
    studies: v.studies.map((s) => {
      const row = [...v.overall].reverse().find((o) => o.studyId === s.studyId && o.origin === 'current build');
      return {
        title: s.title,
        date: s.date,
        href: link(ARCHIVE_PATHS.study(s.studyId)),
        report: row ? currentReport(s.studyId, row.variantId, row.origin) : null,
        withdrawn: s.withdrawn,
      };
    }),
    overall: v.overall.map((o) => ({
      label: o.label,
      origin: o.release ? releaseName(o.release) : 'current build',
      report: currentReport(o.studyId, o.variantId, o.origin),
      call: functionCall(o.call),
      evidence: o.control ? `n/a (calibration control, ${o.control})` : o.evidence,
      sentence: o.sentence,
    })),
    metrics: v.metrics.map((m) => {
      const chart = historyChart(name, m);
      return {
        key: m.key,
        label: m.label,
        assayLabel: m.assayLabel,
        unit: m.unit,
        // With one study counted, a metric has nothing to be compared with (its release rows are not compared).
        agreement: agreementWords(v.concordance.status === 'single study' ? 'single study' : m.agreement),
        discordant: m.agreement === 'discordant',
        notes: m.notes,
        chart,
        chartFile: chart ? ARCHIVE_PATHS.chart(v.gene, v.hgvs, metricSlugs.get(m.key) as string) : null,
        table: historyTable(m),
      };
    }),
    changes,
    notes: v.notes,
  };
}

function genePage(g: GeneHistory, histories: ReadonlyMap<string, VariantHistory>): GenePage {
  const path = ARCHIVE_PATHS.gene(g.symbol);
  return {
    kind: 'gene',
    path,
    root: '../',
    title: `${g.symbol}: every variant measured`,
    navKey: `gene-${g.symbol}`,
    symbol: g.symbol,
    variants: g.variants.map((v) => ({
      hgvs: v.hgvs,
      short: v.short,
      href: relLink(path, ARCHIVE_PATHS.history(g.symbol, v.hgvs)),
      residue: v.residue === undefined ? '—' : String(v.residue),
      domain: v.domain ?? '—',
      studies: v.studies,
      latest: functionCall(v.latest.call),
      evidence: latestEvidence(histories.get(v.key) ?? { ...v, overall: [] }),
      from: v.latest.label,
      withdrawn: v.latest.withdrawn,
      agreement: AGREEMENT_WORDS[v.concordance] ?? v.concordance,
      discordant: v.concordance === 'discordant',
    })),
  };
}

function changesPage(s: BuiltStudy, report: ReturnType<typeof reportLinks>): ChangesPage {
  const path = ARCHIVE_PATHS.changes(s.ref.id);
  const link = (to: string) => relLink(path, to);
  const c = s.comparison;
  return {
    kind: 'changes',
    path,
    root: '../',
    title: `${s.results.study.title}: changes since its release`,
    navKey: 'home',
    study: { id: s.ref.id, title: s.results.study.title, href: link(ARCHIVE_PATHS.study(s.ref.id)) },
    releases: [...s.releases].reverse().map((r) => ({
      id: r.id,
      name: releaseName(r),
      note: r.note,
      toolVersion: r.toolVersion,
      sha256: r.resultsSha256,
      caveats: r.caveats,
      download: link(releaseDownload(s.ref.id, r.id)),
    })),
    comparison: c
      ? {
          release: releaseName(c.release),
          summary: c.summary,
          currentToolVersion: c.currentToolVersion,
          releasedToolVersion: c.releasedToolVersion,
          reasons: c.reasons.map((r) => r.text),
          unchanged: c.unchanged,
          variants: c.variants.map((v) => {
            const to = v.currentId !== undefined ? report(s.ref.id, v.currentId) : undefined;
            return {
              name: `${v.short} (${v.gene} ${v.hgvs})`,
              status: v.status,
              report: to ? link(to) : null,
              history: link(ARCHIVE_PATHS.history(v.gene, v.hgvs)),
              changes: v.changes.map((x) => x.text),
              reasons: v.reasons.map((r) => r.text),
            };
          }),
        }
      : null,
  };
}

/** The first contradiction of a discordant variant, for the home page (its history page has them all). */
export function discordanceInBrief(v: VariantHistory): string {
  const found = v.concordance.disagreements.filter((d) => d.kind !== 'different changes');
  const first = found.find((d) => d.scope === 'overall') ?? found[0];
  if (!first) return v.concordance.sentence;
  const more = found.length - 1;
  return `${first.label} ${describeCalls(first.calls)}${more ? `; and ${more} metric${more === 1 ? '' : 's'} more` : ''}.`;
}

/** Every page of the archive site. */
export function archivePages(manifest: ArchiveManifest, history: ArchiveHistory, studies: readonly BuiltStudy[], toolVersion: string): ArchivePages {
  const report = reportLinks(studies);
  const byKey = new Map(history.variants.map((v) => [v.key, v]));
  const genes = history.genes.map((g) => genePage(g, byKey));
  const histories = history.variants.map((v) => historyPage(v, studies, report));
  const changes = studies.map((s) => changesPage(s, report));
  const byId = new Map(studies.map((s) => [s.ref.id, s]));
  const discordantKeys = new Set(history.discordant);
  const frame: ArchiveFrame = {
    title: manifest.title,
    lab: manifest.lab,
    description: manifest.description ?? '',
    synthetic: manifest.synthetic || history.synthetic,
    toolVersion,
    standardCaveats: STANDARD_CAVEATS,
    nav: [{ key: 'home', label: 'Studies', href: ARCHIVE_PATHS.home }, ...history.genes.map((g) => ({ key: `gene-${g.symbol}`, label: `Gene ${g.symbol}`, href: ARCHIVE_PATHS.gene(g.symbol) }))],
    paths: { css: ARCHIVE_PATHS.css, archiveCss: ARCHIVE_PATHS.archiveCss, home: ARCHIVE_PATHS.home },
  };
  const home: HomePage = {
    kind: 'home',
    path: ARCHIVE_PATHS.home,
    root: './',
    title: manifest.title,
    navKey: 'home',
    description: manifest.description ?? '',
    studies: history.studies.map((s) => {
      const built = byId.get(s.studyId);
      const c = built?.comparison;
      const count = (status: string) => c?.variants.filter((v) => v.status === status).length ?? 0;
      return {
        id: s.studyId,
        title: s.title,
        href: ARCHIVE_PATHS.study(s.studyId),
        dates: s.dates.length > 1 ? `${[...s.dates].sort()[0]} to ${[...s.dates].sort()[s.dates.length - 1]}` : (s.dates[0] ?? ''),
        genes: s.genes.map((g) => ({ symbol: g, href: ARCHIVE_PATHS.gene(g) })),
        variants: s.variants,
        calls: s.calls.map((x) => ({ ...functionCall(x.call), count: x.count })),
        toolVersion: s.toolVersion,
        discordant: s.discordant.length,
        release: s.latestRelease
          ? { name: releaseName(s.latestRelease), note: s.latestRelease.note, href: ARCHIVE_PATHS.changes(s.studyId), changed: count('changed'), withdrawn: count('withdrawn'), added: count('new') }
          : null,
        changesHref: ARCHIVE_PATHS.changes(s.studyId),
      };
    }),
    discordant: history.variants
      .filter((v) => discordantKeys.has(v.key))
      .map((v) => ({ name: `${v.gene} ${v.hgvs} (${v.short})`, href: ARCHIVE_PATHS.history(v.gene, v.hgvs), sentence: discordanceInBrief(v) })),
    genes: history.genes.map((g) => ({ symbol: g.symbol, href: ARCHIVE_PATHS.gene(g.symbol), variants: g.variants.length, discordant: g.variants.filter((v) => v.concordance === 'discordant').length })),
  };
  return { frame, home, genes, histories, changes };
}
