/**
 * A manifest with schema errors still gets every other check (the README promises every problem
 * in one run): the parts of it that the schema errors touch are left out, and the rest is read as
 * usual. Pure.
 *
 * The part an error touches is read from its JSON Pointer: one gene, variant, file, exclusion or
 * setting entry (`/variants/3/control/class` → variant 3), or a whole field (`/thresholds/...`, or a
 * list that is not a list). A missing required list counts as empty. Fields that only label the
 * study (title, lab, dates, …) are given placeholders: a study with errors is never built, so they
 * are never shown. What is left out is remembered so that it does not cause false follow-up
 * errors: the labels of variant entries left out (rows naming them are skipped silently), and
 * whether a wild type may be among them (the WT-per-batch check is then skipped). A gene entry with
 * errors keeps its symbol when the symbol itself is valid text.
 */
import type { ErrorObject } from 'ajv';
import { isWildTypeText, parseProteinChange } from './hgvs.js';
import type { ManifestJson } from './manifest-json.js';

export interface Salvaged {
  json: ManifestJson;
  /** Names (label, HGVS, short form, 'WT') of variant entries left out. */
  unresolved: string[];
  /** A variant entry left out may be the wild type. */
  droppedWildType: boolean;
}

type Json = Record<string, unknown>;
const isObject = (x: unknown): x is Json => typeof x === 'object' && x !== null && !Array.isArray(x);

/** Decode one JSON Pointer token (RFC 6901: '~1' → '/', '~0' → '~'). */
const token = (t: string) => t.replace(/~1/g, '/').replace(/~0/g, '~');

/** The manifest without the parts its schema errors touch; undefined when nothing can be kept (not an object). */
export function salvageManifest(raw: unknown, errors: readonly ErrorObject[]): Salvaged | undefined {
  if (!isObject(raw)) return undefined;
  /** Per top-level field: true = the whole field is bad; a set = the bad items (list indices or object keys). */
  const bad = new Map<string, true | Set<string>>();
  const mark = (field: string, item?: string) => {
    const now = bad.get(field);
    if (now === true) return;
    if (item === undefined) bad.set(field, true);
    else if (now) now.add(item);
    else bad.set(field, new Set([item]));
  };
  for (const err of errors) {
    const [field, item] = err.instancePath.split('/').slice(1).map(token);
    if (field === undefined) {
      if (err.keyword === 'required') mark((err.params as { missingProperty: string }).missingProperty);
      else if (err.keyword !== 'additionalProperties' && err.keyword !== 'if') return undefined;
      continue;
    }
    mark(field, item);
  }

  const list = (field: string): unknown[] => {
    const value = raw[field];
    const b = bad.get(field);
    if (!Array.isArray(value) || b === true) return [];
    return b ? value.filter((_, i) => !b.has(String(i))) : value;
  };
  const droppedItems = (field: string): unknown[] => {
    const value = raw[field];
    const b = bad.get(field);
    if (!Array.isArray(value)) return [];
    return b === true ? value : b ? value.filter((_, i) => b.has(String(i))) : [];
  };

  // Genes: a gene entry with errors keeps a valid symbol, so its variants still resolve.
  const genes: ManifestJson['genes'] = [];
  const geneBad = bad.get('genes');
  if (Array.isArray(raw.genes) && geneBad !== true) {
    raw.genes.forEach((g, i) => {
      if (!geneBad?.has(String(i))) genes.push(g as ManifestJson['genes'][number]);
      else if (isObject(g) && typeof g.symbol === 'string' && /^[A-Za-z0-9][A-Za-z0-9._-]*$/.test(g.symbol)) genes.push({ symbol: g.symbol });
    });
  }

  // Variant entries left out: their names, so that rows naming them raise no second error.
  const unresolved: string[] = [];
  let droppedWildType = false;
  for (const v of droppedItems('variants')) {
    if (!isObject(v)) {
      droppedWildType = true; // unknowable
      continue;
    }
    for (const name of [v.label, v.hgvs]) if (typeof name === 'string') unresolved.push(name);
    if (typeof v.hgvs === 'string') {
      const p = parseProteinChange(v.hgvs);
      if (p.ok) unresolved.push(p.change.short, p.change.hgvs);
    }
    if (v.wt === true || v.hgvs === undefined || (typeof v.hgvs === 'string' && isWildTypeText(v.hgvs))) {
      droppedWildType = true;
      unresolved.push('WT');
    }
  }

  const objectField = (field: string): Json | undefined => {
    const value = raw[field];
    if (!isObject(value) || bad.get(field) === true) return undefined;
    const b = bad.get(field);
    if (!b || b === true) return value;
    return Object.fromEntries(Object.entries(value).filter(([k]) => !b.has(k)));
  };
  // Thresholds depend on one another (bands, their source): any error leaves all of them out.
  const thresholds = bad.has('thresholds') ? {} : objectField('thresholds');
  const settings = objectField('settings');
  const json: ManifestJson = {
    title: '',
    lab: '',
    dates: [],
    synthetic: false,
    genes,
    variants: list('variants') as ManifestJson['variants'],
    direction: 'either',
    files: list('files') as ManifestJson['files'],
    ...(thresholds ? { thresholds } : {}),
    exclusions: list('exclusions') as NonNullable<ManifestJson['exclusions']>,
    ...(settings ? { settings: settings as ManifestJson['settings'] } : {}),
  };
  return { json, unresolved, droppedWildType };
}
