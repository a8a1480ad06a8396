/**
 * Every message about study input, in one catalogue. Each entry returns the severity,
 * a stable code, what is wrong (one sentence) and how to fix it (one sentence).
 * Locations are added by the caller (see `issue`).
 */
import { type Issue, type MessageText, type SourceRef, shown } from '../results/source.js';
import { didYouMean } from './suggest.js';

export type { MessageText };

const e = (code: string, message: string, fix: string): MessageText => ({ severity: 'error', code, message, fix });
const w = (code: string, message: string, fix: string): MessageText => ({ severity: 'warning', code, message, fix });

/** A text from the input in quotes, as shown(). */
const q = (text: string) => `'${shown(text)}'`;
const list = (xs: readonly string[]) => xs.map(q).join(', ');
/** A list of names from the input, at most `max` shown: "'a', 'b' and 12 more". */
const some = (xs: readonly string[], max = 8) => (xs.length <= max ? list(xs) : `${list(xs.slice(0, max))} and ${xs.length - max} more`);

export const MSG = {
  // ---- study folder ----
  fileNotFound: (path: string) => e('folder.file-not-found', `The file ${q(path)} named in the manifest does not exist in the study folder.`, 'Correct the path in the manifest (relative to the study folder, forward slashes) or add the file.'),
  pathOutside: (path: string) => e('folder.path-outside', `The path ${q(path)} leaves the study folder.`, 'Copy the file into the study folder and give a relative path without "..".'),
  notRegularFile: (path: string) => e('folder.not-a-file', `${q(path)} is not a regular file inside the study folder (a directory, device, or link pointing outside).`, 'Replace it with a plain file inside the study folder.'),
  notRegularManifest: (name: string) => e('folder.manifest-not-a-file', `The manifest ${q(name)} is not a regular file inside the study folder (a directory, device, pipe, or link pointing outside).`, `Replace ${name} with a plain JSON file inside the study folder.`),
  fileTooLarge: (path: string, bytes: number, limit: number) => e('folder.file-too-large', `${q(path)} is ${(bytes / 1048576).toFixed(1)} MiB; myofolio reads files of at most ${limit / 1048576} MiB.`, 'Split the data into several files of the same kind and list each in the manifest (rows of one kind from several files are combined).'),
  unreadable: (path: string, reason: string) => e('folder.unreadable', `${q(path)} cannot be read: ${reason}.`, 'Check that the file exists and that you may read it.'),
  manifestMissing: (name: string) => e('folder.no-manifest', `The study folder has no manifest ${q(name)}.`, `Create ${name} (run 'myofolio init <dir>' for a starter).`),

  // ---- manifest ----
  manifestNotJson: (reason: string) => e('manifest.not-json', `The manifest is not valid JSON: ${reason}.`, 'Fix the JSON syntax (a JSON validator or editor shows the spot).'),
  schemaRequired: (prop: string) => e('manifest.required', `The required field ${q(prop)} is missing.`, `Add ${q(prop)} here.`),
  schemaUnknownField: (prop: string) => e('manifest.unknown-field', `${q(prop)} is not a manifest field here.`, 'Remove it or correct its spelling (see the manifest reference in the README).'),
  renamedField: (name: string, now: string) => e('manifest.renamed-field', `${q(name)} is now called '${now}' (it names a biological preparation, not physical units).`, `Rename ${q(name)} to '${now}'; its value stays as it is.`),
  renamedValue: (value: string, now: string) => e('manifest.renamed-value', `The kind ${q(value)} is now called '${now}' (it names a biological preparation, not physical units).`, `Write "kind": "${now}", and the preparation's name under "${now}".`),
  schemaType: (expected: string) => e('manifest.type', `The value must be of type ${expected}.`, `Write ${/^[aeiou]/.test(expected) ? 'an' : 'a'} ${expected} here.`),
  schemaEnum: (allowed: readonly unknown[]) => e('manifest.enum', `The value is not one of the allowed values.`, `Use one of: ${allowed.map((a) => JSON.stringify(a)).join(', ')}.`),
  schemaFormat: (format: string) => e('manifest.format', `The value is not a valid ${format}.`, format === 'date' ? 'Write dates as YYYY-MM-DD.' : `Write a valid ${format}.`),
  schemaRange: (rule: string) => e('manifest.range', `The value must be ${rule}.`, `Give a value that is ${rule}.`),
  schemaPattern: (what: string) => e('manifest.pattern', `The value does not have the expected form (${what}).`, 'Correct the value; see the manifest reference in the README.'),
  schemaWtHasHgvs: () => e('manifest.wt-with-change', 'The wild-type entry has an hgvs change or a control class.', 'Remove hgvs and control from the entry with "wt": true.'),
  schemaNotForKind: (optionsByKind: string) => e('manifest.setting-not-for-kind', 'This file setting does not apply to this kind of file.', `Remove it, or correct the file kind (${optionsByKind}).`),
  schemaOther: (text: string) => e('manifest.schema', `The value breaks the manifest schema: ${text}.`, 'Correct the value; see the manifest reference in the README.'),

  hgvsInvalid: (text: string, reason: string) => e('manifest.hgvs', `${q(text)} is not a protein change myofolio understands: ${reason}.`, 'Write the change as p.Arg403Gln (three-letter HGVS) or R403Q.'),
  referenceMismatch: (hgvs: string, gene: string, found: string) => e('manifest.reference-residue', `${hgvs} names the wrong reference residue: the ${gene} sequence has ${found} there.`, 'Check the residue number and the reference sequence (isoform, numbering) and correct one of them.'),
  residueBeyondSequence: (hgvs: string, gene: string, length: number) => e('manifest.residue-beyond-sequence', `${hgvs} lies beyond the end of the ${gene} sequence (${length} residues).`, 'Check the residue number or give the full reference sequence.'),
  unknownGene: (symbol: string, known: readonly string[], near: readonly string[] = []) => e('manifest.unknown-gene', `The gene ${q(symbol)} is not declared in genes.${didYouMean(near)}`, `Use one of ${some(known)} (spelt as in genes) or add the gene to genes.`),
  geneCase: (symbol: string, other: string) => e('manifest.gene-case', `The gene symbols ${q(other)} and ${q(symbol)} differ only by case, so their variants could not be told apart.`, 'Declare each gene once, spelt exactly as HGNC writes it (human symbols are upper case), and use that spelling in every variant entry.'),
  variantIdClash: (a: string, b: string, id: string) => e('manifest.variant-id-clash', `${a} and ${b} would share the report name '${id}' (gene symbols and changes are compared without case and punctuation there).`, 'Correct the gene symbol or the change of one of them; two genes must differ by more than case or punctuation.'),
  duplicateJsonKey: (key: string, firstLine: number) => e('manifest.duplicate-key', `The field ${q(key)} appears twice in the same object (first on line ${firstLine}); a JSON reader would silently keep only the last value.`, 'Keep one of the two entries and delete the other.'),
  labelNamesOther: (label: string, other: string) => e('manifest.label-names-other', `The label ${q(label)} is the name of another declared variant, ${other}: rows labelled ${q(label)} would be read as this variant, not as ${other}.`, 'Give this variant a label that names it (or remove the label to use its own short form).'),
  geneRequired: (known: readonly string[]) => e('manifest.gene-required', 'The study declares several genes, so each variant must say which gene it is in.', `Add "gene": one of ${list(known)}.`),
  duplicateGene: (symbol: string) => e('manifest.duplicate-gene', `The gene ${q(symbol)} is declared twice.`, 'Keep one entry per gene.'),
  duplicateLabel: (label: string) => e('manifest.duplicate-label', `The label ${q(label)} is used by two variants.`, 'Give every variant a unique label (the name used in the CSV files).'),
  duplicateVariant: (hgvs: string) => e('manifest.duplicate-variant', `The variant ${hgvs} is declared twice.`, 'Keep one entry per variant; one variant can appear in many files and batches.'),
  noWildType: () => e('manifest.no-wt', 'No variant is marked as wild type.', 'Add {"wt": true} to variants (its label defaults to WT).'),
  multipleWildType: (gene: string) => e('manifest.multiple-wt', `More than one wild type is declared for ${gene}.`, 'Keep one wild-type entry per gene.'),
  domainOrder: (name: string) => e('manifest.domain-order', `The domain ${q(name)} ends before it starts.`, 'Give start ≤ end (1-based residue numbers, inclusive).'),
  domainBeyondSequence: (name: string, length: number) => e('manifest.domain-beyond-sequence', `The domain ${q(name)} ends beyond the sequence (${length} residues).`, 'Correct the domain end or the sequence.'),
  unknownSetting: (name: string, known: readonly string[]) => e('manifest.unknown-setting', `${q(name)} is not an assay setting.`, `Use one of ${list(known)}.`),
  settingType: (name: string, expected: string) => e('manifest.setting-type', `The setting ${q(name)} must be a ${expected}.`, `Write a ${expected} (the default is in the README).`),
  settingRange: (name: string) => e('manifest.setting-range', `The setting ${q(name)} must be greater than 0.`, 'Give a positive number.'),
  unknownBand: (key: string, known: readonly string[]) => e('manifest.unknown-band', `${q(key)} is not a metric with a WT-like band.`, `Use one of ${list(known)}.`),
  bandOrder: (key: string) => e('manifest.band-order', `The band of ${q(key)} has low ≥ high.`, 'Write the band as [low, high] with low < high.'),
  ratioBandSign: (key: string) => e('manifest.band-ratio', `The band of the ratio metric ${q(key)} must be positive.`, 'Give ratios of variant to WT, e.g. [0.8, 1.25].'),
  unknownAssay: (assay: string, known: readonly string[]) => e('manifest.unknown-assay', `${q(assay)} is not an assay id.`, `Use one of ${list(known)} or leave assay out to exclude from every assay.`),
  exclusionUnknownVariant: (label: string) => e('manifest.exclusion-variant', `The excluded variant ${q(label)} is not declared in variants.`, 'Use the label of a declared variant.'),
  exclusionNoMatch: (what: string) => w('manifest.exclusion-no-match', `The exclusion matches no data: ${what} does not occur in any file.`, 'Check the spelling against the batch, unit and variant columns of the CSV files.'),
  duplicateFile: (path: string) => e('manifest.duplicate-file', `The file ${q(path)} is listed twice.`, 'List each file once.'),
  unitsUnknownColumn: (column: string, kind: string) => e('manifest.units-column', `${q(column)} is not a column with a unit in ${kind} files.`, 'Give units only for the measurement columns listed in the README.'),
  variantUnused: (label: string) => w('manifest.variant-unused', `The variant ${q(label)} is declared but appears in no file.`, 'Remove it from the manifest or add its data.'),
  unitUnknown: (text: string, what: string, choices: readonly string[]) => e('units.unknown', `${q(text)} is not a known unit of ${what}.`, `Use one of ${list(choices)} (µ may be written u).`),

  noDataRows: (files: number) =>
    e(
      'study.no-data',
      `The study has no data: ${files === 1 ? 'its one file holds' : `none of its ${files} files holds`} a data row (only headers and comments), so there is nothing to analyse.`,
      'Add one row per observation under the header of each CSV file you use (the comment lines above each header say what every column holds), and remove from "files" the kinds you did not measure.',
    ),
  onlyWildType: () =>
    e(
      'study.no-variants',
      'The manifest declares only the wild type: there is no variant to compare with it.',
      'Add each variant you measured to "variants", e.g. {"hgvs": "p.Arg403Gln"} (its label in the CSV files defaults to the short form R403Q).',
    ),

  // ---- after analysis: fitted values, preparations, controls ----
  implausibleWildType: (findings: ReadonlyArray<{ metric: string; value: string; basis: string; side: 'low' | 'high'; bounds: string; typical: string }>, cause: string) =>
    w(
      'study.implausible-wt',
      findings
        .map((f, i) => `${f.metric} of WT${i === 0 ? " in this file" : ""}: ${f.value} (${f.basis}), ${f.side === 'low' ? 'below' : 'above'} the plausible ${f.bounds} (typical ${f.typical}).`)
        .join(' ') + ` ${cause}`,
      'Write in the header the unit the values were measured in (or correct "units" in the manifest); if the values and unit are right, leave them.',
    ),
  implausiblePreparations: (metric: string, items: ReadonlyArray<{ preparation: string; variant: string; batch: string; value: string; side: 'low' | 'high' }>, bounds: string, typical: string, cause: string) => {
    const shownItems = items.slice(0, 5).map((x) => `${q(x.preparation)} of ${q(x.variant)} (batch ${q(x.batch)}) ${x.value}`);
    const more = items.length > 5 ? ` and ${items.length - 5} more` : '';
    const one = items.length === 1;
    return w(
      'study.implausible-preparation',
      `${metric} of ${one ? 'one preparation' : `${items.length} preparations`} outside the plausible ${bounds} for one preparation (typical WT ${typical}): ${shownItems.join('; ')}${more}. ${cause}`,
      "Check these preparations' values and units (e.g. the head concentration a rate was normalised with); if they are right, leave them.",
    );
  },
  preparationInBatches: (assay: string, variant: string, items: ReadonlyArray<{ preparation: string; batches: readonly string[] }>) =>
    w(
      'study.preparation-in-two-batches',
      `${items.length === 1 ? 'Preparation' : 'Preparations'} ${items
        .slice(0, 6)
        .map((x) => `${q(x.preparation)} (batches ${x.batches.map(q).join(', ')})`)
        .join(', ')}${items.length > 6 ? ` and ${items.length - 6} more` : ''} of ${q(variant)} ${items.length === 1 ? 'appears' : 'appear'} in more than one batch of the ${assay} data: the comparison with WT counts each batch's values as a separate preparation, as if independent.`,
      'If they are different preparations, give each its own name; if it is one preparation measured in several batches, its values are not independent: keep it in one batch or exclude the others in the manifest.',
    ),
  tooFewControls: (scope: string, pathogenic: number, benign: number, addPathogenic: number, addBenign: number) =>
    w(
      'study.too-few-controls',
      `With ${pathogenic} pathogenic and ${benign} benign control${benign === 1 ? '' : 's'} measured${scope ? ` in ${scope}` : ''}, no functional evidence level (PS3 or BS3) can be reached, even if every control reads as its class predicts.`,
      `Add known controls (variants of known class, with "control" in the manifest): ${[addPathogenic > 0 ? `${addPathogenic} more pathogenic` : '', addBenign > 0 ? `${addBenign} more benign` : ''].filter(Boolean).join(' and ')} would make supporting evidence reachable.`,
    ),

  // ---- CSV structure ----
  encoding: () => e('csv.encoding', 'The file is not valid UTF-8 text.', 'Save the file as UTF-8 (with or without BOM).'),
  encodingByte: (byte: number) =>
    e(
      'csv.encoding',
      `The file is not valid UTF-8 text: byte 0x${byte.toString(16).toUpperCase().padStart(2, '0')} here does not belong to a UTF-8 character${byte >= 0xa0 ? ` (in Latin-1/Windows-1252 it would be '${String.fromCharCode(byte)}', so the file was probably saved in that encoding)` : ''}.`,
      'Save the file as UTF-8 (in a spreadsheet: "CSV UTF-8"; in an editor: encoding UTF-8).',
    ),
  encodingUtf16: (order: string) => e('csv.encoding', `The file is UTF-16 text (${order} byte-order mark), not UTF-8.`, 'Save the file as UTF-8 (in a spreadsheet: "CSV UTF-8"; in an editor: encoding UTF-8).'),
  nulCharacter: () => e('csv.nul', 'The file contains NUL characters: it is binary data or UTF-16 text without a byte-order mark.', 'Save the file as UTF-8 text.'),
  noHeader: () => e('csv.no-header', 'The file has no header line.', 'Put the column names on the first line that is not a # comment.'),
  noRows: () => w('csv.no-rows', 'The file has a header but no data rows.', 'Add data rows, or remove the file from the manifest.'),
  quotes: (detail: string) => e('csv.quotes', `Broken quoting: ${detail}.`, 'Close every quoted field with a double quote and write a quote inside a field as "".'),
  duplicateHeader: (name: string) => e('csv.duplicate-header', `The column ${q(name)} appears twice in the header.`, 'Rename or remove one of the two columns.'),
  missingColumn: (name: string, kind: string) => e('csv.missing-column', `The column ${q(name)} is required in ${kind} files.`, `Add a ${q(name)} column (see the README column table for ${kind}).`),
  missingAlternative: (names: readonly string[], kind: string) => e('csv.missing-column', `${kind} files need one of the columns ${list(names)}.`, `Add one of ${list(names)}.`),
  renamedColumn: (name: string, now: string) =>
    e('csv.renamed-column', `The column ${q(name)} is now called '${now}': it names the biological preparation (protein preparation, fibre, tissue piece), not physical units.`, `Rename the header ${q(name)} to '${now}'; the values stay as they are.`),
  unknownColumn: (name: string, kind: string) => w('csv.unknown-column', `The column ${q(name)} is not used for ${kind} files and is ignored.`, 'Remove it, or correct its name if it was meant to be read.'),
  noUnit: (column: string, choices: readonly string[]) => e('csv.no-unit', `The column ${q(column)} has no unit.`, `Write the unit in the header, e.g. '${column} (${choices[0]})', or in the manifest file entry "units": {"${column}": "${choices[0]}"}; units: ${list(choices)}.`),
  unitNotExpected: (column: string, text: string) => e('csv.unit-not-expected', `The column ${q(column)} takes no unit, but ${q(text)} is given.`, `Write the header as ${q(column)}.`),
  unitConflict: (column: string, header: string, manifest: string) => e('csv.unit-conflict', `The header gives ${q(column)} in ${header} but the manifest says ${manifest}.`, 'Keep one of the two, or make them agree.'),
  decimalWithCommaDelimiter: () => e('csv.decimal-delimiter', 'The manifest declares a decimal comma but the file is comma-separated.', 'Use ";" as delimiter with a decimal comma, or declare "decimal": ".".'),
  fieldCount: (expected: number, got: number) => e('csv.field-count', `The row has ${got} fields but the header has ${expected}.`, 'Make every row have one field per header column (quote fields that contain the delimiter).'),

  // ---- cells ----
  notANumber: (column: string, text: string) => e('csv.not-a-number', `${q(text)} in ${q(column)} is not a number.`, 'Write a plain number such as 12.5 or 1.2e-3 (no units, dates or thousands separators), or declare the text as a missing-value token in the manifest.'),
  decimalCommaUndeclared: (column: string, text: string) => e('csv.decimal-comma', `${q(text)} in ${q(column)} uses a decimal comma, which the manifest does not declare.`, 'Declare "decimal": "," for this file (with ";" as delimiter) or write a decimal point.'),
  decimalPointWithComma: (column: string, text: string) => e('csv.decimal-point', `${q(text)} in ${q(column)} has a decimal point but the file declares a decimal comma.`, 'Write every number in this file with a decimal comma.'),
  notAnInteger: (column: string, text: string) => e('csv.not-an-integer', `${q(text)} in ${q(column)} is not a whole number.`, 'Write a whole number.'),
  emptyCell: (column: string) => e('csv.empty-cell', `The cell in ${q(column)} is empty.`, `Fill in ${q(column)}, or declare a missing-value token and write it here if the value was not measured.`),
  missingSkipped: (column: string, token: string) => w('csv.missing-value', `${q(column)} holds the missing-value token ${q(token)}, so the row is not used.`, 'Nothing to do if the value was not measured.'),
  belowMinimum: (column: string, value: number, rule: string) => e('csv.range', `${value} in ${q(column)} is out of range: it must be ${rule}.`, `Correct the value; ${column} must be ${rule}.`),
  notAllowed: (column: string, text: string, allowed: readonly unknown[]) => e('csv.enum', `${q(text)} is not allowed in ${q(column)}.`, `Use one of ${list(allowed.map(String))}.`),
  neitherAlternative: (names: readonly string[]) => e('csv.empty-cell', `The row has none of ${list(names)}.`, `Fill in one of ${list(names)}.`),
  implausible: (column: string, value: number, unit: string, reason: string) => w('csv.implausible', `${value} ${unit} in ${q(column)} is implausible: ${reason}.`, 'Check the value and its unit; leave it if it is right.'),
  schemaOtherCell: (column: string, text: string) => e('csv.schema', `The value in ${q(column)} breaks the row schema: ${text}.`, 'Correct the value; see the README column table.'),

  // ---- settings a file kind needs (messages of one kind's own reading rules are in its assay's inputs.ts) ----
  needsPixelSize: (column: string) => e('csv.needs-pixel-size', `${q(column)} is in pixels but the manifest gives no pixelSize for this file.`, 'Add "pixelSize": {"value": …, "unit": "um"} to the file entry.'),

  // ---- across rows ----
  unknownVariant: (label: string, near: readonly string[] = []) =>
    e(
      'csv.unknown-variant',
      `The variant ${q(label)} is not declared in the manifest.${didYouMean(near)}`,
      near.length > 0 ? `Correct the label to ${near.map((n) => `'${n}'`).join(' or ')} if that was meant, or add ${q(label)} to variants in the manifest.` : 'Add it to variants in the manifest, or correct the label to a declared one.',
    ),
  noWildTypeInBatch: (kind: string, batch: string, variants: readonly string[]) => e('csv.batch-without-wt', `Batch ${q(batch)} of the ${kind} data holds ${some(variants)} but no wild type.`, `Add the WT measured in batch ${q(batch)} to this file, or move these rows to a batch that has WT.`),
  duplicateKey: (firstLine: number, key: string) => e('csv.duplicate-observation', `This row repeats the observation on line ${firstLine} (${key}).`, 'Remove the duplicate, or give the rows different replicate/well/trace names.'),
  duplicateAcrossFiles: (otherFile: string, otherLine: number, key: string) =>
    e(
      'csv.duplicate-across-files',
      `This row repeats the observation on line ${otherLine} of ${q(otherFile)} (${shown(key, 120)}).`,
      'If one file replaces the other (a corrected version), list only the new one in the manifest; otherwise remove the repeated rows from one file.',
    ),
  duplicateRow: (firstLine: number) => w('csv.duplicate-row', `This row is identical to line ${firstLine}.`, 'Remove it if it was pasted twice; add a replicate column to tell genuine replicates apart.'),
} as const;

/** What an issue may carry besides its text and location. */
export interface IssueExtra {
  /** Ids of the variants the issue is about (its warnings then reach their reports). */
  variants?: readonly string[];
  /** Issues of one code, file and column are grouped (src/study/group-issues.ts); issues with different `group` texts are not. */
  group?: string;
}

/** Attach a location (and optionally the variants it touches) to a catalogue message. */
export function issue(text: MessageText, at: SourceRef, extra?: IssueExtra): Issue {
  const out: Issue = { ...text, at };
  if (extra?.variants && extra.variants.length > 0) out.variants = [...extra.variants];
  if (extra?.group !== undefined) out.group = extra.group;
  return out;
}
