/**
 * Starter files for `myofolio init`, generated from the schemas: one CSV per chosen input kind
 * with a comment line per column and the header, a manifest listing them, and a field guide
 * beside it (JSON has no comments). Pure.
 */
import { fieldGuide } from './reference-doc.js';
import { CATALOGUE, INPUT_KINDS, MANIFEST_NAME } from './schemas.js';
import type { InputKind } from './types.js';
import { UNITS, unitChoices } from './units.js';

/** Columns a template shows: all but the second of each alternative pair and force-only helpers. */
const TEMPLATE_SKIP: Partial<Record<InputKind, string[]>> = {
  'motility-tracks': ['frame'],
  'force-pca': ['force', 'area'],
};

/** The header cell of a column in templates: name plus its canonical unit. */
export function templateHeader(kind: InputKind, name: string): string {
  const def = CATALOGUE[kind].columns.find((c) => c.name === name)!;
  return def.quantity ? `${name} (${UNITS[def.quantity].canonical})` : name;
}

/** CSV template text of one input kind. */
export function csvTemplate(kind: InputKind): string {
  const cat = CATALOGUE[kind];
  const cols = cat.columns.filter((c) => !(TEMPLATE_SKIP[kind] ?? []).includes(c.name));
  const lines = [`# ${cat.title}. ${cat.description}`, '# Lines starting with # are comments. One row per observation; delete these comments if you like.'];
  for (const c of cols) {
    const units = c.quantity ? ` Units: ${unitChoices(c.quantity).join(', ')}${c.pixels ? ', px' : ''}.` : '';
    const need = c.required ? 'required' : cat.alternatives.some((g) => g.includes(c.name)) ? 'required unless an alternative column is given' : 'optional';
    lines.push(`# ${c.name} (${need}): ${c.description}${units}`);
  }
  lines.push(cols.map((c) => templateHeader(kind, c.name)).join(','));
  return lines.join('\n') + '\n';
}

/** File name of a kind's template. */
export function templateFileName(kind: InputKind): string {
  return `${kind}.csv`;
}

/** Name of the field guide written beside the starter manifest. */
export const GUIDE_NAME = 'study-guide.md';

/** Short names accepted by `init --assays` for the usual input kind of each assay. */
export const KIND_SHORTHANDS: Readonly<Record<string, InputKind>> = {
  atpase: 'atpase-rates',
  nadh: 'atpase-nadh',
  motility: 'motility-velocities',
  tracks: 'motility-tracks',
  force: 'force-pca',
  turnover: 'turnover',
};

/**
 * The input kinds named in an `--assays` list (kind names or the shorthands above, comma-separated),
 * in the order of INPUT_KINDS, or the first name that is neither.
 * @example parseKinds('force,atpase') // { kinds: ['atpase-rates', 'force-pca'] }
 * @example parseKinds('forse') // { unknown: 'forse' }
 */
export function parseKinds(list: string): { kinds: InputKind[] } | { unknown: string } {
  const wanted = new Set<InputKind>();
  for (const raw of list.split(',')) {
    const name = raw.trim();
    if (name === '') continue;
    const kind = (INPUT_KINDS as readonly string[]).includes(name) ? (name as InputKind) : KIND_SHORTHANDS[name];
    if (!kind) return { unknown: name };
    wanted.add(kind);
  }
  if (wanted.size === 0) return { unknown: list };
  return { kinds: INPUT_KINDS.filter((k) => wanted.has(k)) };
}

/** Starter manifest (as an object) listing one template per chosen kind. */
export function manifestTemplate(today: string, kinds: readonly InputKind[] = INPUT_KINDS): Record<string, unknown> {
  return {
    title: 'New study',
    lab: 'Your lab',
    dates: [today],
    synthetic: false,
    description: 'What was measured and why.',
    genes: [{ symbol: 'GENE', domains: [] }],
    variants: [{ wt: true, label: 'WT' }],
    direction: 'hypercontractile',
    files: kinds.map((kind) => ({ path: templateFileName(kind), kind })),
    thresholds: {},
    exclusions: [],
    caveats: ['Research data, not a clinical test.'],
    settings: {},
  };
}

/** Every starter file by name: the manifest, its field guide and one CSV template per chosen kind. */
export function starterFiles(today: string, kinds: readonly InputKind[] = INPUT_KINDS): Record<string, string> {
  const files: Record<string, string> = { [MANIFEST_NAME]: JSON.stringify(manifestTemplate(today, kinds), null, 2) + '\n', [GUIDE_NAME]: fieldGuide(kinds) };
  for (const kind of kinds) files[templateFileName(kind)] = csvTemplate(kind);
  return files;
}
