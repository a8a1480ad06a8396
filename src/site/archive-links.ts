/**
 * What a study's site shows when it is built as part of an archive (src/pipeline/build-archive.ts):
 * a link back to the archive in the header of every page, and on each variant's report a link to the
 * variant's history across the archive's studies and, when the study was released, what changed
 * since that release ("Changed since the release of …: overall call was …, now …; reason: …").
 * A study built on its own has none of this. The archive decides the texts; the site only shows them.
 */
import type { VariantResult } from '../results/types.js';

/** A variant report's archive lines. */
export interface VariantArchiveNote {
  /** Link from the study site's root to the variant's history page in the archive. */
  history?: string;
  /** Sentences about changes since the study's latest release (src/archive/changes.ts). */
  changes: string[];
  /** Link from the study site's root to the study's changes page in the archive. */
  changesPage?: string;
}

export interface SiteArchive {
  /** The archive's title. */
  title: string;
  /** Link from the study site's root to the archive's home page. */
  home: string;
  /** The archive's notes for one variant's report (none for the wild type). */
  variant(v: VariantResult): VariantArchiveNote | undefined;
}

/** The site data's archive part (what base.njk reads), or null for a study built on its own. */
export function archiveFrame(archive: SiteArchive | undefined): { title: string; home: string } | null {
  return archive ? { title: archive.title, home: archive.home } : null;
}

/** Each page with its archive note as `archive` (unchanged pages when the study is not in an archive). */
export function withArchiveNotes<P extends { v: VariantResult }>(pages: P[], archive: SiteArchive | undefined): P[] {
  if (!archive) return pages;
  for (const p of pages) (p as P & { archive?: VariantArchiveNote }).archive = archive.variant(p.v);
  return pages;
}
