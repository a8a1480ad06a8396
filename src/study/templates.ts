/**
 * Starter files for `myofolio init`, generated from the row schemas: one CSV per input
 * kind with a comment line per column and the header, and a manifest listing them. Pure.
 */
import { CATALOGUE, INPUT_KINDS, KIND_DEFS, MANIFEST_NAME } from './schemas.js';
import type { InputKind } from './types.js';
import { UNITS, unitChoices } from './units.js';

/** The header cell of a column in templates: name plus its canonical unit. */
export function templateHeader(kind: InputKind, name: string): string {
  const def = CATALOGUE[kind].columns.find((c) => c.name === name)!;
  return def.quantity ? `${name} (${UNITS[def.quantity].canonical})` : name;
}

/** CSV template text of one input kind. */
export function csvTemplate(kind: InputKind): string {
  const cat = CATALOGUE[kind];
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

/** Starter manifest (as an object) listing one template per kind. */
export function manifestTemplate(today: string): Record<string, unknown> {
  return {
    title: 'New study',
    lab: 'Your lab',
    dates: [today],
    synthetic: false,
    description: 'What was measured and why.',
    genes: [{ symbol: 'GENE', domains: [] }],
    variants: [{ wt: true, label: 'WT' }],
    direction: 'hypercontractile',
    files: INPUT_KINDS.map((kind) => ({ path: templateFileName(kind), kind })),
    thresholds: {},
    exclusions: [],
    caveats: ['Research data, not a clinical test.'],
    settings: {},
  };
}

/** Every starter file by name. */
export function starterFiles(today: string): Record<string, string> {
  const files: Record<string, string> = { [MANIFEST_NAME]: JSON.stringify(manifestTemplate(today), null, 2) + '\n' };
  for (const kind of INPUT_KINDS) files[templateFileName(kind)] = csvTemplate(kind);
  return files;
}
