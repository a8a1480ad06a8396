/**
 * The README's input reference (between `<!-- input-reference:start -->` and
 * `<!-- input-reference:end -->`), generated from the schemas and the unit table so the
 * docs cannot drift: tests/study/readme.test.ts compares README.md with this text.
 * Regenerate with: npx tsx src/study/reference-doc.ts --write
 */
import { ASSAY_IDS, BANDS, KINDS, SETTINGS } from '../assays/assembled.js';
import { STATS } from '../defaults.js';
import { catalogueOf, INPUT_KINDS, MANIFEST_NAME, MANIFEST_SCHEMA } from './schemas.js';
import type { InputKind } from './types.js';
import { UNITS, type Quantity } from './units.js';

export const START_MARKER = '<!-- input-reference:start -->';
export const END_MARKER = '<!-- input-reference:end -->';

const cell = (s: string) => s.replace(/\|/g, '\\|').replace(/\n/g, ' ');

/** Markdown table of one input kind's columns (one row per column, in schema order). */
export function columnTable(kind: (typeof INPUT_KINDS)[number]): string {
  const cat = catalogueOf(kind);
  const rows = cat.columns.map((c) => {
    const need = c.required ? 'yes' : cat.alternatives.some((g) => g.includes(c.name)) ? 'one of ' + cat.alternatives.find((g) => g.includes(c.name))!.join('/') : 'no';
    const units = c.quantity ? UNITS[c.quantity].units.map((u) => u.symbol).join(', ') + (c.pixels ? ', px' : '') : '—';
    const range = [c.minimum !== undefined ? `≥ ${c.minimum}` : '', c.exclusiveMinimum !== undefined ? `> ${c.exclusiveMinimum}` : '', c.maximum !== undefined ? `≤ ${c.maximum}` : '', c.enum ? c.enum.join(' / ') : '']
      .filter(Boolean)
      .join(', ');
    return `| \`${c.name}\` | ${need} | ${c.type}${range ? ` (${range})` : ''} | ${units} | ${cell(c.description)} |`;
  });
  return ['| column | required | type | units | description |', '|---|---|---|---|---|', ...rows].join('\n');
}

/** The kinds' file options, e.g. "`pathLength` (atpase-nadh), `pixelSize` and `frameInterval` (motility-tracks)". */
function fileOptionsText(): string {
  return KINDS.filter((k) => (k.def.fileOptions ?? []).length > 0)
    .map((k) => {
      const options = k.def.fileOptions!;
      const perUnit = options.some((o) => o.shape === 'quantity-per-unit') ? '; `value` for all preparations or `byPreparation`' : '';
      return `${options.map((o) => `\`${o.name}\``).join(' and ')} (${k.def.kind}${perUnit})`;
    })
    .join(', ');
}

/** The table of the manifest's fields (name, required, description), from its schema. */
export function manifestFieldsTable(): string {
  const props = (MANIFEST_SCHEMA as { properties: Record<string, { description?: string }>; required: string[] }).properties;
  const required = (MANIFEST_SCHEMA as { required: string[] }).required;
  const out = ['| field | required | description |', '|---|---|---|'];
  for (const [name, p] of Object.entries(props)) {
    if (name === '$schema') continue;
    out.push(`| \`${name}\` | ${required.includes(name) ? 'yes' : 'no'} | ${cell(p.description ?? '')} |`);
  }
  return out.join('\n');
}

/**
 * The field guide `myofolio init` writes beside the starter manifest: every manifest field, the
 * entries of variants and files, and the columns of the chosen input kinds (JSON has no comments).
 */
export function fieldGuide(kinds: readonly InputKind[]): string {
  const out: string[] = [];
  out.push(`# Field guide to this study folder`, '');
  out.push(
    `\`${MANIFEST_NAME}\` describes the study; each CSV file holds one row per observation of one input kind. Written by \`myofolio init\` from the tool's schemas; \`myofolio check <dir>\` lists every problem with its place and the fix.`,
    '',
  );
  out.push('## Manifest fields', '', manifestFieldsTable(), '');
  out.push('## Variants, files, exclusions, thresholds and settings', '', ...manifestNotes(), '');
  out.push('## CSV rules', '', ...CSV_RULES, '');
  out.push('## Units', '', unitsTable(), '');
  for (const kind of kinds) {
    const cat = catalogueOf(kind);
    out.push(`## \`${kind}\`: ${cat.title}`, '', cell(cat.description), '', columnTable(kind), '');
  }
  return out.join('\n');
}

/** Lines on variants, files, exclusions, thresholds and settings (README and the field guide; '' separates paragraphs). */
function manifestNotes(): string[] {
  return [
    'Variants: `{"wt": true}` for the wild type; others give `hgvs` as `p.Arg403Gln`, `p.R403Q` or `R403Q` (normalised to `p.Arg403Gln`, short form `R403Q`), optionally `label` (the name in the CSV files, default the short form; with one gene the CSV files may also use the short form or the HGVS), `gene` (needed when several genes are declared), `control` `{"class": "pathogenic" | "likely pathogenic" | "benign" | "likely benign", "source": "…"}` and `note`. When a gene has a `sequence`, the reference residue of every variant is checked against it.',
    '',
    'Files: `path` (relative, inside the folder), `kind` (one of the input kinds below), `units` per column when the header does not give them, `decimal` (`.` default, or `,` with `;` as delimiter), `missing` (cell texts meaning no value, e.g. `["NA"]`; a row whose required value is missing is skipped with a warning), and per kind: ' +
      fileOptionsText() +
      ', each `{"value": …, "unit": "…"}`.',
    '',
    `Exclusions: \`{"kind": "batch", "batch": "B3"}\`, \`{"kind": "preparation", "preparation": "R403Q-p2"}\` or \`{"kind": "variant", "variant": "R403Q"}\` (a declared label), each with a \`reason\` shown on the reports and optionally an \`assay\` id (${ASSAY_IDS.map((a) => `\`${a}\``).join(', ')}) to exclude it from that assay only.`,
    '',
    `Thresholds (\`thresholds\`): \`bands\` (WT-like band \`[low, high]\` per metric key such as \`atpase.kcat\`; ratio metrics as variant/WT, difference metrics as variant − WT; defaults in each assay's \`metrics.ts\` under \`src/assays/\`: ${Object.keys(BANDS).map((k) => `\`${k}\``).join(', ')}), \`bandsFromBenignControls\` (derive bands from the benign controls), \`qThreshold\` (level of the adjusted minimum-effect test for an increased or decreased call; default ${STATS.qThreshold}), \`equivalenceAlpha\` (level of the two one-sided tests for a within-WT-range call; default ${STATS.equivalenceAlpha}), \`evidenceCap\` (\`supporting\` … \`very strong\`, from gene-specific expert-panel rules) and \`wtBaselines\` (lab-declared long-term WT \`{"mean", "sd", "source"}\` per metric key, in canonical units, for the Westgard charts; otherwise mean and SD come from this study's WT values).`,
    `Settings (\`settings\`) override the assay defaults (each assay's \`settings.ts\` under \`src/assays/\`) by name: ${Object.keys(SETTINGS).map((k) => `\`${k}\``).join(', ')}. Unknown names and values of the wrong type are errors.`,
  ];
}

/** The rules every CSV file follows (README and the field guide). */
const CSV_RULES: readonly string[] = [
  '- UTF-8 with or without BOM; delimiter `,` or `;`, read from the header line; lines starting with `#` are comments; blank lines are skipped.',
  '- Units go in the header (`actin (uM)`, `actin [µM]`, `actin_uM`, `velocity (nm/s)`, `velocity_nm_s`) or in the manifest `units`; µ may be written `u`. A measurement column without a unit, or with an unknown unit, is an error. Values are converted on load to µM, µm/s, s, kPa (= mN/mm²), µm, 1/s.',
  '- Numbers are strict: `12`, `-0.5`, `.5`, `1e-3` and `00123` (= 123, in number columns only; text columns keep the text) are numbers; `1,2` is an error unless the file declares a decimal comma; `NA`, dates, units and thousands separators are errors unless declared as missing-value tokens.',
  '- Every variant in a CSV must be declared in the manifest; every batch that holds a variant must hold WT for the same input kind; repeated observations are errors, also when the repeat is in another file of the same kind (rows of one preparation may be split over several files), identical rows warnings; implausible values are warnings, and so are fitted values far outside the typical range of the trade (`plausible` of each assay, in `src/assays/<assay>/metrics.ts`), with the column whose unit is the likely cause.',
  '- A problem found in many cells (a whole column in the wrong unit, a file in decimal commas, a misspelt label) is reported once, with the number of cells and their lines.',
];

/** The table of quantities with their canonical and accepted units. */
function unitsTable(): string {
  const out = ['| quantity | canonical | accepted |', '|---|---|---|'];
  for (const q of Object.keys(UNITS) as Quantity[]) {
    out.push(`| ${UNITS[q].label} | ${UNITS[q].canonical} | ${UNITS[q].units.map((u) => [u.symbol, ...u.aliases].join(', ')).join('; ')} |`);
  }
  return out.join('\n');
}

/** The whole generated section (without the markers). */
export function inputReference(): string {
  const out: string[] = [];
  out.push('## Input reference', '');
  out.push(
    `A study folder holds one manifest, \`${MANIFEST_NAME}\` (checked against \`schemas/manifest.schema.json\`), and CSV files, one row per observation (row schemas beside each assay, \`src/assays/<assay>/<kind>.schema.json\`). \`myofolio init <dir>\` writes a starter folder; \`myofolio check <dir>\` lists every problem as \`file:line:col: severity: message — fix\` and exits 1 when there are errors.`,
    '',
  );
  out.push('### Manifest fields', '', manifestFieldsTable(), '');
  out.push(...manifestNotes(), '');
  out.push('### CSV rules', '', ...CSV_RULES, '');
  out.push('### Units', '', unitsTable(), '');
  for (const kind of INPUT_KINDS) {
    const cat = catalogueOf(kind);
    out.push(`### \`${kind}\`: ${cat.title}`, '', cell(cat.description), '', columnTable(kind), '');
  }
  return out.join('\n');
}

/** Replace the text between the markers of a README. */
export function spliceReference(readme: string, section: string): string {
  const start = readme.indexOf(START_MARKER);
  const end = readme.indexOf(END_MARKER);
  if (start < 0 || end < start) throw new Error('README markers not found');
  return readme.slice(0, start + START_MARKER.length) + '\n' + section + '\n' + readme.slice(end);
}

/** The text between the markers, without the surrounding line breaks. */
export function extractReference(readme: string): string | undefined {
  const start = readme.indexOf(START_MARKER);
  const end = readme.indexOf(END_MARKER);
  if (start < 0 || end < start) return undefined;
  return readme.slice(start + START_MARKER.length, end).replace(/^\n/, '').replace(/\n$/, '');
}

if (process.argv[1]?.endsWith('reference-doc.ts') && process.argv.includes('--write')) {
  const fs = await import('node:fs');
  const readme = fs.readFileSync('README.md', 'utf8');
  fs.writeFileSync('README.md', spliceReference(readme, inputReference()));
}
