/**
 * Output paths of the archive site, all relative (pages work from file:// and under any sub-path):
 *
 *   index.html                     home: the studies, discordant variants, genes
 *   genes/<gene>.html              every variant of a gene measured in any study, with its latest call
 *   variants/<gene>-<hgvs>.html    a variant's history across studies and releases
 *   changes/<study-id>.html        what changed since the study's latest release
 *   charts/<history>-<metric>.svg  every chart of a history page as a file of its own (for slides)
 *   studies/<study-id>/…           the study's own full site, as `myofolio build` writes it alone
 */
import { slug } from '../site/paths.js';

/** HGVS characters a slug would drop, spelled out so that two variants never share a page name. */
const HGVS_WORDS: Array<[RegExp, string]> = [
  [/\*/g, ' ter '],
  [/=/g, ' syn '],
  [/\?/g, ' unk '],
  [/_/g, ' to '],
  [/\[/g, ' alt '],
];

/**
 * The page name of a variant's history, from its identity (gene and normalised HGVS): the same in
 * every build and in every study's site, whatever else the archive holds.
 * @example historySlug('ZZMYO1', 'p.Arg58Trp') // 'zzmyo1-p-arg58trp'
 */
export function historySlug(gene: string, hgvs: string): string {
  let text = hgvs;
  for (const [re, word] of HGVS_WORDS) text = text.replace(re, word);
  return `${slug(gene)}-${slug(text)}`;
}

export const ARCHIVE_PATHS = {
  home: 'index.html',
  gene: (symbol: string) => `genes/${slug(symbol)}.html`,
  history: (gene: string, hgvs: string) => `variants/${historySlug(gene, hgvs)}.html`,
  changes: (studyId: string) => `changes/${studyId}.html`,
  /** A history page's chart as an SVG file: named for the variant and the metric, the same in every build. */
  chart: (gene: string, hgvs: string, metricSlug: string) => `charts/${historySlug(gene, hgvs)}-${metricSlug}.svg`,
  studyRoot: (studyId: string) => `studies/${studyId}/`,
  study: (studyId: string) => `studies/${studyId}/index.html`,
  css: 'assets/site.css',
  archiveCss: 'assets/archive.css',
} as const;

/** From a study site's root (studies/<id>/) back to the archive's root. */
export const STUDY_TO_ARCHIVE = '../../';
