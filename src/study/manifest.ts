/**
 * Manifest reading: JSON → schema validation → genes, variants (HGVS normalised),
 * file entries (units resolved), thresholds, exclusions, settings. Pure.
 */
import type { ErrorObject } from 'ajv';
import { ASSAY_IDS, BANDS, DIFFERENCE_METRICS, KINDS, SETTINGS } from '../assays/assembled.js';
import type { FileOptionDef, FileOptionValue } from '../assays/types.js';
import { checkReferenceResidue, isWildTypeText, parseProteinChange, variantId } from './hgvs.js';
import { locateJsonError } from './json-position.js';
import { findDuplicateKeys } from './json-keys.js';
import type { ManifestFile, ManifestJson, ManifestQuantity, ManifestQuantityPerUnit } from './manifest-json.js';
import { salvageManifest } from './manifest-salvage.js';
import { closestNames } from './suggest.js';
import { MSG, issue, type MessageText } from './messages.js';
import { catalogueOf, validators } from './schemas.js';
import type { Exclusion, Gene, Issue, Variant } from './types.js';
import { conversionFactor, lookupUnit, unitChoices, UNITS, type Quantity } from './units.js';

export type { ManifestExclusion, ManifestFile, ManifestJson, ManifestQuantity, ManifestQuantityPerUnit } from './manifest-json.js';

/** A file entry with its settings converted to canonical units. */
export interface FileSpec {
  index: number;
  entry: ManifestFile;
  decimal: '.' | ',';
  missing: string[];
  /** Manifest units per column (validated). */
  units: Record<string, string>;
  /** The kind's file options given, in canonical units, by name (e.g. pathLength in cm). */
  options: Record<string, FileOptionValue>;
}

export interface ParsedManifest {
  raw: unknown;
  json: ManifestJson;
  genes: Gene[];
  variants: Variant[];
  /** CSV name → variant: each label, plus the short form and HGVS of a variant when no other variant uses them as label. */
  byLabel: Map<string, Variant>;
  /** Names of variant entries that could not be read (schema or HGVS errors, reported): rows naming them are skipped without another error. */
  unresolved: ReadonlySet<string>;
  /** True when schema errors left parts of the manifest out (see salvageManifest). */
  partial: boolean;
  /** True when a variant entry left out may have been a wild type: the WT-per-batch check then cannot be trusted. */
  droppedWildType: boolean;
  files: FileSpec[];
  exclusions: Exclusion[];
  settings: Record<string, number | string | boolean>;
}

/** Assay ids of the registry (src/assays/registry.ts). */
export { ASSAY_IDS };

/** Each kind's file options, by kind. */
const FILE_OPTIONS = new Map(KINDS.map((k) => [k.def.kind, k.def.fileOptions ?? []]));

/** Which file option belongs to which kind, for the message about an option given to another kind. */
const OPTIONS_BY_KIND = KINDS.filter((k) => (k.def.fileOptions ?? []).length > 0)
  .map((k) => `${k.def.fileOptions!.map((o) => o.name).join(', ')}: ${k.def.kind}`)
  .join('; ');

function describeType(t: unknown): string {
  if (Array.isArray(t)) return t.join(' or ');
  return t === 'integer' ? 'whole number' : String(t);
}

/**
 * Manifest fields renamed in version 0.3.0 (a preparation was called a unit, which read like the
 * physical units beside it): refused with the new name.
 */
const RENAMED_FIELDS: ReadonlyArray<{ field: string; now: string; where: RegExp }> = [
  { field: 'unit', now: 'preparation', where: /^\/exclusions\/\d+$/ },
  { field: 'byUnit', now: 'byPreparation', where: /^\/files\/\d+\/crossSection$/ },
];

/** The value at a JSON Pointer of a parsed JSON value (RFC 6901), or undefined. */
function valueAt(root: unknown, pointer: string): unknown {
  let at: unknown = root;
  for (const token of pointer.split('/').slice(1)) {
    if (at === null || typeof at !== 'object') return undefined;
    at = (at as Record<string, unknown>)[token.replace(/~1/g, '/').replace(/~0/g, '~')];
  }
  return at;
}

/** Map one ajv error of the manifest schema to a catalogue message; undefined to drop it. */
function manifestMessage(err: ErrorObject, raw: unknown): { text: MessageText; path: string } | undefined {
  const path = err.instancePath;
  switch (err.keyword) {
    case 'if':
      return undefined; // the failing then-branch reports the problem itself
    case 'required': {
      const prop = (err.params as { missingProperty: string }).missingProperty;
      return { text: MSG.schemaRequired(prop), path: `${path}/${prop}` };
    }
    case 'additionalProperties': {
      const prop = (err.params as { additionalProperty: string }).additionalProperty;
      const renamed = RENAMED_FIELDS.find((r) => r.field === prop && r.where.test(path));
      if (renamed) return { text: MSG.renamedField(prop, renamed.now), path: `${path}/${prop}` };
      return { text: MSG.schemaUnknownField(prop), path: `${path}/${prop}` };
    }
    case 'false schema':
      if (/^\/variants\/\d+\//.test(path)) return { text: MSG.schemaWtHasHgvs(), path };
      return { text: MSG.schemaNotForKind(OPTIONS_BY_KIND), path };
    case 'type':
      return { text: MSG.schemaType(describeType((err.params as { type: unknown }).type)), path };
    case 'enum':
      if (/^\/exclusions\/\d+\/kind$/.test(path) && valueAt(raw, path) === 'unit') return { text: MSG.renamedValue('unit', 'preparation'), path };
      return { text: MSG.schemaEnum((err.params as { allowedValues: unknown[] }).allowedValues), path };
    case 'const':
      return { text: MSG.schemaEnum([(err.params as { allowedValue: unknown }).allowedValue]), path };
    case 'format':
      return { text: MSG.schemaFormat((err.params as { format: string }).format), path };
    case 'minLength':
      return { text: MSG.schemaRange('non-empty text'), path };
    case 'minItems':
      return { text: MSG.schemaRange(`a list of at least ${(err.params as { limit: number }).limit} item(s)`), path };
    case 'maxItems':
      return { text: MSG.schemaRange(`a list of at most ${(err.params as { limit: number }).limit} items`), path };
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum': {
      const p = err.params as { comparison: string; limit: number };
      return { text: MSG.schemaRange(`${p.comparison} ${p.limit}`), path };
    }
    case 'pattern':
      return { text: MSG.schemaPattern(path.includes('sequence') ? 'one-letter amino-acid codes' : 'letters, digits, . _ -'), path };
    default:
      return { text: MSG.schemaOther(err.message ?? err.keyword), path };
  }
}

/** The factor to the canonical unit of a quantity; an issue at `path` and undefined when the unit is unknown. */
function factorOf(unit: string, kind: Quantity, path: string, file: string, issues: Issue[]): number | undefined {
  const factor = conversionFactor(kind, unit);
  if (factor === undefined) issues.push(issue(MSG.unitUnknown(unit, UNITS[kind].label, unitChoices(kind)), { file, jsonPath: `${path}/unit` }));
  return factor;
}

/** A file option in canonical units (schema-valid input); undefined when its unit is unknown (with an issue). */
function fileOption(o: FileOptionDef, raw: unknown, path: string, file: string, issues: Issue[]): FileOptionValue | undefined {
  const quantity = o.quantity as Quantity;
  if (o.shape === 'quantity') {
    const q = raw as ManifestQuantity;
    const factor = factorOf(q.unit, quantity, path, file, issues);
    return factor === undefined ? undefined : q.value * factor;
  }
  const q = raw as ManifestQuantityPerUnit;
  const factor = factorOf(q.unit, quantity, path, file, issues);
  if (factor === undefined) return undefined;
  // Per preparation in the manifest (byPreparation); the assays read it per biological unit (byUnit).
  const out: { value?: number; byUnit?: Record<string, number> } = {};
  if (q.value !== undefined) out.value = q.value * factor;
  if (q.byPreparation) out.byUnit = Object.fromEntries(Object.entries(q.byPreparation).map(([u, a]) => [u, a * factor]));
  return out;
}

/**
 * Parse and validate the manifest text. Returns the parsed manifest when it is usable
 * (schema-valid); semantic problems are issues but still return what could be read.
 */
export function readManifest(text: string, file: string): { manifest?: ParsedManifest; issues: Issue[] } {
  const issues: Issue[] = [];
  let raw: unknown;
  try {
    raw = JSON.parse(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  } catch (err) {
    const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
    const where = locateJsonError(body);
    if (where) return { issues: [issue(MSG.manifestNotJson(where.reason), { file, line: where.line, col: where.col })] };
    const reason = err instanceof Error ? err.message : String(err);
    return { issues: [issue(MSG.manifestNotJson(reason.replace(/\.$/, '')), { file })] };
  }
  // JSON.parse keeps the last of two equal keys without a word ("synthetic": true, then false).
  for (const d of findDuplicateKeys(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text)) {
    issues.push(issue(MSG.duplicateJsonKey(d.key, d.firstLine), { file, line: d.line, col: d.col, jsonPath: d.pointer }));
  }
  const validate = validators().manifest;
  let json: ManifestJson;
  /** Labels of variant entries left out for schema errors: rows using them are skipped without a further error. */
  const unresolved = new Set<string>();
  let droppedWildType = false;
  if (validate(raw)) json = raw as ManifestJson;
  else {
    const errors = validate.errors ?? [];
    for (const err of errors) {
      const m = manifestMessage(err, raw);
      if (m) issues.push(issue(m.text, { file, jsonPath: m.path || '/' }));
    }
    // Every other check still runs on the parts of the manifest without schema errors.
    const salvaged = salvageManifest(raw, errors);
    if (!salvaged) return { issues };
    json = salvaged.json;
    for (const label of salvaged.unresolved) unresolved.add(label);
    droppedWildType = salvaged.droppedWildType;
  }
  const at = (jsonPath: string) => ({ file, jsonPath });

  // Genes and domains.
  const genes: Gene[] = [];
  const geneIndex = new Map<string, Gene>();
  const geneByFolded = new Map<string, string>();
  json.genes.forEach((g, gi) => {
    if (geneIndex.has(g.symbol)) issues.push(issue(MSG.duplicateGene(g.symbol), at(`/genes/${gi}/symbol`)));
    else if (geneByFolded.has(g.symbol.toUpperCase())) issues.push(issue(MSG.geneCase(g.symbol, geneByFolded.get(g.symbol.toUpperCase())!), at(`/genes/${gi}/symbol`)));
    geneByFolded.set(g.symbol.toUpperCase(), geneByFolded.get(g.symbol.toUpperCase()) ?? g.symbol);
    const sequence = g.sequence?.replace(/\s+/g, '').toUpperCase();
    const gene: Gene = { symbol: g.symbol, ...(sequence ? { sequence } : {}), domains: [] };
    (g.domains ?? []).forEach((d, di) => {
      if (d.start > d.end) issues.push(issue(MSG.domainOrder(d.name), at(`/genes/${gi}/domains/${di}/end`)));
      else if (sequence && d.end > sequence.length) issues.push(issue(MSG.domainBeyondSequence(d.name, sequence.length), at(`/genes/${gi}/domains/${di}/end`)));
      gene.domains.push({ name: d.name, start: d.start, end: d.end });
    });
    genes.push(gene);
    geneIndex.set(g.symbol, gene);
  });
  const symbols = genes.map((g) => g.symbol);

  // Variants.
  const variants: Variant[] = [];
  const byLabel = new Map<string, Variant>();
  const seenHgvs = new Set<string>();
  const wtGenes = new Set<string>();
  json.variants.forEach((v, vi) => {
    const path = `/variants/${vi}`;
    let geneSymbol = v.gene;
    const unresolvable = () => {
      for (const name of [v.label, v.hgvs, v.wt === true ? 'WT' : undefined]) if (name !== undefined) unresolved.add(name);
    };
    if (genes.length === 0) {
      unresolvable(); // no gene declared (reported by the schema): the variant cannot be read
      return;
    }
    if (geneSymbol === undefined) {
      if (genes.length > 1) {
        issues.push(issue(MSG.geneRequired(symbols), at(`${path}/gene`)));
        unresolvable();
        return;
      }
      geneSymbol = symbols[0]!; // genes.length is 1 here
    } else if (!geneIndex.has(geneSymbol)) {
      issues.push(issue(MSG.unknownGene(geneSymbol, symbols, closestNames(geneSymbol, symbols)), at(`${path}/gene`)));
      unresolvable();
      return;
    }
    const gene = geneIndex.get(geneSymbol)!;
    let variant: Variant;
    if (v.wt === true || (v.hgvs !== undefined && isWildTypeText(v.hgvs))) {
      if (wtGenes.has(gene.symbol)) issues.push(issue(MSG.multipleWildType(gene.symbol), at(`${path}/wt`)));
      wtGenes.add(gene.symbol);
      variant = {
        id: variantId(gene.symbol, 'wt'),
        gene: gene.symbol,
        isWT: true,
        hgvs: 'WT',
        short: 'WT',
        label: v.label ?? 'WT',
        at: at(path),
      };
    } else {
      const parsed = parseProteinChange(v.hgvs!);
      if (!parsed.ok) {
        issues.push(issue(MSG.hgvsInvalid(v.hgvs!, parsed.reason), at(`${path}/hgvs`)));
        unresolvable();
        return;
      }
      const c = parsed.change;
      if (gene.sequence) {
        const bad = checkReferenceResidue(c, gene.sequence);
        if (bad?.beyondEnd) issues.push(issue(MSG.residueBeyondSequence(c.hgvs, gene.symbol, gene.sequence.length), at(`${path}/hgvs`)));
        else if (bad) issues.push(issue(MSG.referenceMismatch(c.hgvs, gene.symbol, `${bad.found}${c.residue}`), at(`${path}/hgvs`)));
      }
      const key = `${gene.symbol}:${c.hgvs}`;
      if (seenHgvs.has(key)) issues.push(issue(MSG.duplicateVariant(c.hgvs), at(`${path}/hgvs`)));
      seenHgvs.add(key);
      variant = {
        id: variantId(gene.symbol, c.short),
        gene: gene.symbol,
        isWT: false,
        hgvs: c.hgvs,
        short: c.short,
        label: v.label ?? c.short,
        residue: c.residue,
        refAA: c.refAA,
        ...(c.altAA ? { altAA: c.altAA } : {}),
        ...(v.control ? { control: { class: v.control.class, source: v.control.source } } : {}),
        at: at(path),
      };
    }
    if (v.note !== undefined) variant.note = v.note;
    if (byLabel.has(variant.label)) {
      issues.push(issue(MSG.duplicateLabel(variant.label), at(`${path}/label`)));
      return;
    }
    byLabel.set(variant.label, variant);
    variants.push(variant);
  });
  // A label that names another variant (its short form or HGVS) would read that variant's rows as this one's.
  const byName = new Map<string, Variant>();
  for (const v of variants) for (const name of [v.short, v.hgvs]) if (!byName.has(`${v.gene}\0${name}`)) byName.set(`${v.gene}\0${name}`, v);
  variants.forEach((v) => {
    if (v.label === v.short || v.label === v.hgvs) return;
    for (const gene of genes.length === 1 ? [v.gene] : symbols) {
      const other = byName.get(`${gene}\0${v.label}`);
      if (other && other !== v) {
        issues.push(issue(MSG.labelNamesOther(v.label, other.isWT ? `the wild type of ${other.gene}` : `${other.gene} ${other.hgvs}`), { ...v.at, jsonPath: `${v.at.jsonPath}/label` }));
        break;
      }
    }
  });
  // Report names (ids) must differ: they fold case and punctuation.
  const byId = new Map<string, Variant>();
  for (const v of variants) {
    const first = byId.get(v.id);
    if (first && first.gene !== v.gene) issues.push(issue(MSG.variantIdClash(`${first.gene} ${first.hgvs}`, `${v.gene} ${v.hgvs}`, v.id), v.at));
    else if (!first) byId.set(v.id, v);
  }
  // Short forms and HGVS are accepted in the CSV files too, where unambiguous (one gene; labels win).
  if (genes.length === 1) {
    for (const v of variants) {
      for (const alias of [v.short, v.hgvs]) if (!byLabel.has(alias)) byLabel.set(alias, v);
    }
  }
  if (wtGenes.size === 0 && !droppedWildType && !issues.some((i) => i.at.jsonPath?.startsWith('/variants/'))) {
    issues.push(issue(MSG.noWildType(), at('/variants')));
  }

  // Files.
  const files: FileSpec[] = [];
  const seenPaths = new Set<string>();
  json.files.forEach((f, fi) => {
    const path = `/files/${fi}`;
    if (seenPaths.has(f.path)) issues.push(issue(MSG.duplicateFile(f.path), at(`${path}/path`)));
    seenPaths.add(f.path);
    const cat = catalogueOf(f.kind);
    const units: Record<string, string> = {};
    for (const [column, unitText] of Object.entries(f.units ?? {})) {
      const def = cat.columns.find((c) => c.name.toLowerCase() === column.toLowerCase());
      if (!def?.quantity) {
        issues.push(issue(MSG.unitsUnknownColumn(column, f.kind), at(`${path}/units/${column}`)));
        continue;
      }
      const ok = lookupUnit(def.quantity, unitText) || (def.pixels && unitText.trim() === 'px');
      if (!ok) {
        const choices = [...unitChoices(def.quantity), ...(def.pixels ? ['px'] : [])];
        issues.push(issue(MSG.unitUnknown(unitText, UNITS[def.quantity].label, choices), at(`${path}/units/${column}`)));
        continue;
      }
      units[def.name] = unitText;
    }
    const options: Record<string, FileOptionValue> = {};
    for (const o of FILE_OPTIONS.get(f.kind) ?? []) {
      if (f[o.name] === undefined) continue;
      const value = fileOption(o, f[o.name], `${path}/${o.name}`, file, issues);
      if (value !== undefined) options[o.name] = value;
    }
    files.push({ index: fi, entry: f, decimal: f.decimal ?? '.', missing: f.missing ?? [], units, options });
  });

  // Thresholds.
  const bandKeys = Object.keys(BANDS);
  for (const [key, band] of Object.entries(json.thresholds?.bands ?? {})) {
    const p = `/thresholds/bands/${key}`;
    if (!bandKeys.includes(key)) issues.push(issue(MSG.unknownBand(key, bandKeys), at(p)));
    else if (band[0] >= band[1]) issues.push(issue(MSG.bandOrder(key), at(p)));
    else if (!DIFFERENCE_METRICS.has(key) && band[0] <= 0) issues.push(issue(MSG.ratioBandSign(key), at(p)));
  }
  for (const key of Object.keys(json.thresholds?.wtBaselines ?? {})) {
    if (!bandKeys.includes(key)) issues.push(issue(MSG.unknownBand(key, bandKeys), at(`/thresholds/wtBaselines/${key}`)));
  }

  // Exclusions (data matches are checked after the rows are read).
  const exclusions: Exclusion[] = [];
  (json.exclusions ?? []).forEach((x, xi) => {
    const p = `/exclusions/${xi}`;
    if (x.assay !== undefined && !ASSAY_IDS.includes(x.assay)) issues.push(issue(MSG.unknownAssay(x.assay, ASSAY_IDS), at(`${p}/assay`)));
    let variant = x.variant;
    if (variant !== undefined) {
      const v = byLabel.get(variant);
      if (!v) issues.push(issue(MSG.exclusionUnknownVariant(variant), at(`${p}/variant`)));
      else variant = v.id;
    }
    exclusions.push({
      // A preparation is the biological unit of the analysis (Exclusion.kind 'unit').
      kind: x.kind === 'preparation' ? 'unit' : x.kind,
      ...(x.assay !== undefined ? { assay: x.assay } : {}),
      ...(x.batch !== undefined ? { batch: x.batch } : {}),
      ...(x.preparation !== undefined ? { unit: x.preparation } : {}),
      ...(variant !== undefined ? { variant } : {}),
      reason: x.reason,
      at: at(p),
    });
  });

  // Settings: names and types from the assays' settings (src/assays/<assay>/settings.ts).
  const known = Object.keys(SETTINGS);
  const settings: Record<string, number | string | boolean> = {};
  for (const [name, value] of Object.entries(json.settings ?? {})) {
    const p = `/settings/${name}`;
    if (!known.includes(name)) {
      issues.push(issue(MSG.unknownSetting(name, known), at(p)));
      continue;
    }
    const expected = typeof SETTINGS[name];
    if (typeof value !== expected) {
      issues.push(issue(MSG.settingType(name, expected), at(p)));
      continue;
    }
    if (typeof value === 'number' && !(value > 0)) {
      issues.push(issue(MSG.settingRange(name), at(p)));
      continue;
    }
    settings[name] = value;
  }

  return { manifest: { raw, json, genes, variants, byLabel, unresolved, partial: json !== raw, droppedWildType, files, exclusions, settings }, issues };
}
