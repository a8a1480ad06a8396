/**
 * buildArchive: an archive folder (archive.json, study folders, releases/) → one site.
 *
 *   archive.json ──readArchive──▶ manifest, study folders checked          src/pipeline/archive-input.ts
 *   releases/<id>/ ──verified against their SHA-256──▶ released results      src/archive/release-store.ts
 *   each study: its input key unchanged since the previous build?
 *       yes ──▶ its site linked from the previous output (nothing read but its files, to hash them)
 *       no  ──▶ buildStudy into <out>/studies/<id>/ (through the store), its variant reports with
 *               the archive's links and what changed since its latest release
 *   every study's current results + every release ──buildHistory──▶ history   src/archive/history.ts
 *   latest release vs current build ──compareWithRelease──▶ changes          src/archive/changes.ts
 *   archivePages ──writeArchivePages (pages whose data changed; the others linked)──▶ HTML
 *   ──swapIn──▶ output folder (atomic rename; a failed build leaves the previous output in place)
 *
 * Nothing is written into the archive folder or its study folders; releases are written only by
 * `myofolio release` (src/pipeline/release-study.ts). `.myofolio-archive.json` in the output records
 * each study's input key and each archive page's key, for the next build.
 */
import { copyFileSync, existsSync, linkSync, mkdirSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { type ReleaseComparison, changeFor, compareWithRelease } from '../archive/changes.js';
import type { ArchiveEntry, ArchiveHistory } from '../archive/history-types.js';
import { buildHistory } from '../archive/history.js';
import type { ArchiveManifest, ArchiveStudyRef } from '../archive/manifest.js';
import type { StoredRelease } from '../archive/release-store.js';
import { ARCHIVE_PATHS, STUDY_TO_ARCHIVE } from '../archive-site/paths.js';
import { type BuiltStudy, archivePages, releaseDownload } from '../archive-site/views.js';
import { writeArchivePages } from '../archive-site/write-site.js';
import type { StudyResults } from '../results/types.js';
import type { SiteArchive } from '../site/archive-links.js';
import type { Issue } from '../study/types.js';
import { TOOL_VERSION } from '../version.js';
import { readArchive, studyDirOf, studyInputKey, studyReleases, underStudy } from './archive-input.js';
import { type BuildOptions, buildStudy, openStore } from './build-study.js';
import { installedFingerprint } from './fingerprint.js';
import { OutputError, makeStaging, planOutput, swapIn } from './output.js';
import { type ChartCounts, storedRender } from './stored-render.js';

/** The record of a build in its output folder, for the next build. */
export const ARCHIVE_STATE_FILE = '.myofolio-archive.json';
const STATE_FORMAT = 1;

export interface ArchiveState {
  format: number;
  studies: Record<string, { key: string; path: string }>;
  pages: Record<string, string>;
}

export type ArchiveBuildOptions = Pick<BuildOptions, 'force' | 'sourceDateEpoch' | 'store' | 'fingerprint' | 'removePrevious' | 'onProgress'> & {
  /** Progress: a phase name (e.g. 'study panel-2025', 'archive pages'). */
  onPhase?: (phase: string) => void;
};

export interface StudyBuildReport {
  id: string;
  path: string;
  /** Built now, or its site from the previous build reused (its inputs unchanged). */
  status: 'built' | 'reused';
  pages?: number;
  charts?: ChartCounts;
}

export interface ArchiveBuildOutcome {
  ok: boolean;
  issues: Issue[];
  notes: string[];
  out?: string;
  studies: StudyBuildReport[];
  /** Archive pages (home, genes, histories, changes) written now and reused from the previous build. */
  pages?: { written: number; reused: number };
  /** Each released study's current build compared with its latest release. */
  comparisons: ReleaseComparison[];
  history?: ArchiveHistory;
  movedAside?: string;
}

/** The previous build's record, or none (absent, unreadable, another format). */
export function readArchiveState(outDir: string): ArchiveState | undefined {
  try {
    const state = JSON.parse(readFileSync(path.join(outDir, ARCHIVE_STATE_FILE), 'utf8')) as ArchiveState;
    return state && state.format === STATE_FORMAT && typeof state.studies === 'object' && typeof state.pages === 'object' ? state : undefined;
  } catch {
    return undefined;
  }
}

/** Hard-link every file of a folder tree into a new place (copy where links cannot be made). */
function linkTree(from: string, to: string): void {
  mkdirSync(to, { recursive: true });
  for (const e of readdirSync(from, { withFileTypes: true })) {
    const a = path.join(from, e.name);
    const b = path.join(to, e.name);
    if (e.isDirectory()) linkTree(a, b);
    else if (e.isFile()) {
      try {
        linkSync(a, b);
      } catch {
        copyFileSync(a, b);
      }
    }
  }
}

/**
 * The input key of a study in this archive build: its files, and everything else its site shows
 * (the code, the archive's title, its latest release, the build time stamp).
 */
export function archiveStudyKey(archiveDir: string, manifest: ArchiveManifest, ref: ArchiveStudyRef, latest: StoredRelease | undefined, options: { fingerprint: string; sourceDateEpoch?: number }): string | undefined {
  return studyInputKey(studyDirOf(archiveDir, ref), {
    fingerprint: options.fingerprint,
    archive: manifest.title,
    study: [ref.id, ref.path],
    release: latest ? [latest.record.id, latest.record.resultsSha256, latest.record.note] : null,
    sourceDateEpoch: options.sourceDateEpoch ?? null,
  });
}

/** What a study's site shows of the archive: the way back, each variant's history and what changed since the release. */
function siteArchive(manifest: ArchiveManifest, ref: ArchiveStudyRef, comparison: ReleaseComparison | undefined): SiteArchive {
  return {
    title: manifest.title,
    home: `${STUDY_TO_ARCHIVE}${ARCHIVE_PATHS.home}`,
    variant(v) {
      if (v.isWT) return undefined;
      const change = comparison ? changeFor(comparison, v) : undefined;
      return {
        history: `${STUDY_TO_ARCHIVE}${ARCHIVE_PATHS.history(v.gene, v.hgvs)}`,
        changes: change ? [change.sentence] : [],
        ...(comparison ? { changesPage: `${STUDY_TO_ARCHIVE}${ARCHIVE_PATHS.changes(ref.id)}` } : {}),
      };
    },
  };
}

/** planOutput for an archive folder: the same rules, worded for an archive. */
function planArchiveOutput(archiveDir: string, outDir: string, force: boolean): ReturnType<typeof planOutput> {
  try {
    return planOutput(archiveDir, outDir, force);
  } catch (err) {
    if (!(err instanceof OutputError)) throw err;
    const word = (t: string) => t.replace(/the study folder/g, 'the archive folder').replace(/study folder/g, 'archive folder').replace(/contain the study/g, 'contain the archive');
    throw new OutputError(word(err.message), word(err.fix));
  }
}

export async function buildArchive(archiveDir: string, outDir: string, options: ArchiveBuildOptions = {}): Promise<ArchiveBuildOutcome> {
  const phase = options.onPhase ?? (() => {});
  const failed = (issues: Issue[], notes: string[] = []): ArchiveBuildOutcome => ({ ok: false, issues, notes, studies: [], comparisons: [] });
  phase('read');
  const plan = planArchiveOutput(archiveDir, outDir, options.force ?? false);
  const read = readArchive(archiveDir);
  if (!read.manifest) return failed(read.issues);
  const manifest = read.manifest;
  const issues = [...read.issues];
  const notes: string[] = [];

  // Releases, verified (an altered release stops the build: it is never served).
  const releases = new Map<string, Array<StoredRelease & { results: StudyResults }>>();
  for (const ref of manifest.studies) {
    const got = await studyReleases(archiveDir, ref.id);
    issues.push(...got.issues);
    releases.set(ref.id, got.releases);
  }
  if (issues.some((i) => i.severity === 'error')) return failed(issues);

  const fingerprint = options.fingerprint ?? installedFingerprint();
  const previous = existsSync(plan.out) ? readArchiveState(plan.out) : undefined;
  const state: ArchiveState = { format: STATE_FORMAT, studies: {}, pages: {} };
  const tag = String(process.pid);
  const staging = makeStaging(plan.out, tag);
  try {
    const built: BuiltStudy[] = [];
    const reports: StudyBuildReport[] = [];
    for (const ref of manifest.studies) {
      const own = releases.get(ref.id) ?? [];
      const latest = own[own.length - 1];
      const key = archiveStudyKey(archiveDir, manifest, ref, latest, { fingerprint, sourceDateEpoch: options.sourceDateEpoch });
      const target = path.join(staging, ...ARCHIVE_PATHS.studyRoot(ref.id).split('/'));
      const before = path.join(plan.out, ...ARCHIVE_PATHS.studyRoot(ref.id).split('/'));
      const compare = (results: StudyResults) => (latest ? compareWithRelease(ref.id, results, latest.results, latest.record) : undefined);
      let results: StudyResults | undefined;
      let comparison: ReleaseComparison | undefined;
      if (key !== undefined && previous?.studies[ref.id]?.key === key) {
        try {
          results = JSON.parse(readFileSync(path.join(before, 'downloads', 'results.json'), 'utf8')) as StudyResults;
          linkTree(before, target);
          comparison = compare(results);
          reports.push({ id: ref.id, path: ref.path, status: 'reused' });
        } catch {
          rmSync(target, { recursive: true, force: true });
          results = undefined;
        }
      }
      if (!results) {
        phase(`study ${ref.id}`);
        const outcome = await buildStudy(studyDirOf(archiveDir, ref), target, {
          ...(options.store !== undefined ? { store: options.store } : {}),
          fingerprint,
          ...(options.sourceDateEpoch !== undefined ? { sourceDateEpoch: options.sourceDateEpoch } : {}),
          ...(options.onProgress ? { onProgress: options.onProgress } : {}),
          archive: (r) => siteArchive(manifest, ref, (comparison = compare(r))),
        });
        issues.push(...underStudy(outcome.issues, ref));
        for (const n of outcome.notes) if (!notes.includes(n)) notes.push(n);
        if (!outcome.ok || !outcome.results) continue;
        results = outcome.results;
        reports.push({ id: ref.id, path: ref.path, status: 'built', pages: outcome.pages, ...(outcome.charts ? { charts: outcome.charts } : {}) });
      }
      if (key !== undefined) state.studies[ref.id] = { key, path: ref.path };
      built.push({ ref, results, releases: own.map((r) => r.record), ...(comparison ? { comparison } : {}) });
    }
    if (issues.some((i) => i.severity === 'error')) {
      rmSync(staging, { recursive: true, force: true });
      return { ...failed(issues, notes), studies: reports };
    }

    // The archive's own pages.
    phase('archive pages');
    const entries: ArchiveEntry[] = [];
    for (const s of built) {
      entries.push({ studyId: s.ref.id, title: s.results.study.title, dates: s.results.study.dates, results: s.results });
      for (const r of releases.get(s.ref.id) ?? []) {
        entries.push({ studyId: s.ref.id, title: r.results.study.title, dates: r.results.study.dates, results: r.results, release: { id: r.record.id, date: r.record.date, note: r.record.note } });
      }
    }
    const history = buildHistory(entries);
    const pages = archivePages(manifest, history, built, TOOL_VERSION);
    const { store } = openStore(archiveDir, { ...(options.store !== undefined ? { store: options.store } : {}), fingerprint });
    const charts: ChartCounts = { rendered: 0, stored: 0 };
    const written = await writeArchivePages(pages, staging, {
      fingerprint,
      ...(store ? { render: storedRender(store, charts) } : {}),
      ...(previous ? { previous: { dir: plan.out, keys: previous.pages } } : {}),
    });
    state.pages = written.keys;
    // The released results, for download from the changes pages (copies: the release itself stays read-only in the archive folder).
    for (const [studyId, list] of releases) {
      for (const r of list) {
        const to = path.join(staging, ...releaseDownload(studyId, r.record.id).split('/'));
        mkdirSync(path.dirname(to), { recursive: true });
        copyFileSync(r.resultsPath, to);
      }
    }
    writeFileSync(path.join(staging, ARCHIVE_STATE_FILE), `${JSON.stringify(state, null, 2)}\n`);
    const movedAside = swapIn(staging, plan.out, plan.replaceForeign, tag, options.removePrevious);
    return {
      ok: true,
      issues,
      notes,
      out: plan.out,
      studies: reports,
      pages: { written: written.written, reused: written.reused },
      comparisons: built.flatMap((s) => (s.comparison ? [s.comparison] : [])),
      history,
      ...(movedAside ? { movedAside } : {}),
    };
  } catch (err) {
    rmSync(staging, { recursive: true, force: true });
    throw err;
  }
}
