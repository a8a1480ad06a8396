/**
 * Starter files for `myofolio init`, generated from the schemas: one CSV per chosen input kind
 * with a comment line per column and the header, a manifest listing them, and a field guide
 * beside it (JSON has no comments). Pure.
 */
import { KINDS } from '../assays/assembled.js';
import { fieldGuide } from './reference-doc.js';
import { catalogueOf, INPUT_KINDS, KIND_DEFS, MANIFEST_NAME } from './schemas.js';
import type { InputKind } from './types.js';
import { UNITS, unitChoices } from './units.js';

/** The header cell of a column in templates: name plus its canonical unit. */
export function templateHeader(kind: InputKind, name: string): string {
  const def = catalogueOf(kind).columns.find((c) => c.name === name)!;
  return def.quantity ? `${name} (${UNITS[def.quantity].canonical})` : name;
}

/** CSV template text of one input kind. */
export function csvTemplate(kind: InputKind): string {
  const cat = catalogueOf(kind);
  // All columns but those the kind leaves out of templates (the second of an alternative pair, helpers).
  const cols = cat.columns.filter((c) => !(KIND_DEFS[kind]?.templateSkip ?? []).includes(c.name));
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

/** Each assay's input kinds, by assay id: `init --assays atpase` writes every kind the assay reads. */
export const ASSAY_KINDS: Readonly<Record<string, InputKind[]>> = KINDS.reduce<Record<string, InputKind[]>>((out, k) => {
  (out[k.assay.id] ??= []).push(k.def.kind);
  return out;
}, {});

/**
 * The input kinds named in an `--assays` list (comma-separated kind names, or assay ids for all of
 * an assay's kinds), in the order of INPUT_KINDS, or the first name that is neither.
 * @example parseKinds('force,atpase-rates') // { kinds: ['atpase-rates', 'force-pca'] }
 * @example parseKinds('forse') // { unknown: 'forse' }
 */
export function parseKinds(list: string): { kinds: InputKind[] } | { unknown: string } {
  const wanted = new Set<InputKind>();
  for (const raw of list.split(',')) {
    const name = raw.trim();
    if (name === '') continue;
    const kinds = (INPUT_KINDS as readonly string[]).includes(name) ? [name as InputKind] : ASSAY_KINDS[name];
    if (!kinds) return { unknown: name };
    for (const k of kinds) wanted.add(k);
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
