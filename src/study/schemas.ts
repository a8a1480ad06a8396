/**
 * The JSON Schemas of the study folder and the column catalogue read from them, for the input
 * kinds of the assay registry (each kind's row schema lives in its assay's folder).
 * The row schemas are the one source of truth for CSV columns: names, types, units
 * (x-quantity), required columns, alternatives, duplicate keys and plausibility limits.
 */
import { Ajv2020 } from 'ajv/dist/2020.js';
import type { ValidateFunction } from 'ajv';
import addFormatsMod from 'ajv-formats';
import { KINDS } from '../assays/assembled.js';
import type { InputKindDef } from '../assays/types.js';
import { MANIFEST_SCHEMA } from './manifest-schema.js';
import type { InputKind } from './types.js';
import { UNITS, type Quantity } from './units.js';

export { MANIFEST_SCHEMA };

/** Every input kind, in registry order. */
export const INPUT_KINDS: readonly InputKind[] = KINDS.map((k) => k.def.kind);

/** Each input kind's definition (src/assays/<assay>/inputs.ts). */
export const KIND_DEFS: Readonly<Record<InputKind, InputKindDef>> = Object.fromEntries(KINDS.map((k) => [k.def.kind, k.def]));

/**
 * The CSV column naming the biological preparation (protein preparation, fibre, tissue piece) a row
 * comes from; typed rows keep it in the field `unit` (the biological unit of the statistics).
 */
export const PREPARATION_COLUMN = 'preparation';

/**
 * Former column names, refused with the new name: 'unit' read like the physical units that sit
 * beside it in headers and the manifest (version 0.2.0 and before).
 */
export const RENAMED_COLUMNS: Readonly<Record<string, string>> = { unit: PREPARATION_COLUMN };

/** The manifest file name in a study folder. */
export const MANIFEST_NAME = 'study.json';

export const ROW_SCHEMAS: Readonly<Record<InputKind, Record<string, unknown>>> = Object.fromEntries(KINDS.map((k) => [k.def.kind, k.def.schema]));

/** One CSV column as the row schema declares it. */
export interface ColumnDef {
  name: string;
  type: 'string' | 'number' | 'integer';
  description: string;
  required: boolean;
  /** Physical quantity when the column carries a unit; absent for unitless columns. */
  quantity?: Quantity;
  /** Positions may also be in px (needs the file's pixelSize). */
  pixels: boolean;
  /** Field of the typed row (src/study/types.ts) the column fills. */
  field: string;
  enum?: string[];
  minimum?: number;
  exclusiveMinimum?: number;
  maximum?: number;
  /** Plausible range in canonical units; values outside are warnings. */
  plausible?: { min?: number; max?: number; reason: string };
}

export interface KindCatalogue {
  kind: InputKind;
  title: string;
  description: string;
  columns: ColumnDef[];
  /** Groups of columns of which at least one must be present. */
  alternatives: string[][];
  /** Columns that identify one observation (duplicates are errors). */
  rowKey: string[];
}

interface RawProp {
  type: 'string' | 'number' | 'integer';
  description: string;
  enum?: string[];
  minimum?: number;
  exclusiveMinimum?: number;
  maximum?: number;
  'x-quantity'?: Quantity;
  'x-pixels'?: boolean;
  'x-field': string;
  'x-plausible'?: { min?: number; max?: number; reason: string };
}

function catalogue(kind: InputKind): KindCatalogue {
  const schema = ROW_SCHEMAS[kind] as {
    title: string;
    description: string;
    properties: Record<string, RawProp>;
    required: string[];
    'x-alternatives'?: string[][];
    'x-rowKey': string[];
  };
  for (const [name, p] of Object.entries(schema.properties)) {
    const q = p['x-quantity'];
    if (q !== undefined && !(q in UNITS)) throw new Error(`row schema of '${kind}': the column '${name}' has x-quantity '${q}', which is not in src/study/units.ts`);
  }
  const columns = Object.entries(schema.properties).map(([name, p]): ColumnDef => ({
    name,
    type: p.type,
    description: p.description,
    required: schema.required.includes(name),
    quantity: p['x-quantity'],
    pixels: p['x-pixels'] === true,
    field: p['x-field'],
    enum: p.enum,
    minimum: p.minimum,
    exclusiveMinimum: p.exclusiveMinimum,
    maximum: p.maximum,
    plausible: p['x-plausible'],
  }));
  return {
    kind,
    title: schema.title,
    description: schema.description,
    columns,
    alternatives: schema['x-alternatives'] ?? [],
    rowKey: schema['x-rowKey'],
  };
}

export const CATALOGUE: Record<InputKind, KindCatalogue> = Object.fromEntries(
  INPUT_KINDS.map((k) => [k, catalogue(k)]),
) as Record<InputKind, KindCatalogue>;

for (const { def } of KINDS) {
  for (const o of def.fileOptions ?? []) {
    if (!(o.quantity in UNITS)) throw new Error(`input kind '${def.kind}': the file option '${o.name}' has quantity '${o.quantity}', which is not in src/study/units.ts`);
  }
}

function makeAjv(): Ajv2020 {
  const ajv = new Ajv2020({ allErrors: true, strict: true, strictTuples: false, strictRequired: false, allowUnionTypes: true });
  for (const word of ['x-kind', 'x-quantity', 'x-pixels', 'x-field', 'x-plausible', 'x-rowKey', 'x-alternatives']) {
    ajv.addKeyword(word);
  }
  addFormatsMod.default(ajv);
  return ajv;
}

/**
 * The catalogue entry of an input kind. Kinds come from the registry (the manifest schema allows
 * no other, and a file entry of another kind is dropped before its kind is looked up), so a miss is
 * a mistake in the code.
 */
export function catalogueOf(kind: InputKind): KindCatalogue {
  const cat = CATALOGUE[kind];
  if (!cat) throw new Error(`no input kind '${kind}' in the assay registry`);
  return cat;
}

/** The row schema of an input kind (see catalogueOf). */
function rowSchemaOf(kind: InputKind): Record<string, unknown> {
  const schema = ROW_SCHEMAS[kind];
  if (!schema) throw new Error(`no input kind '${kind}' in the assay registry`);
  return schema;
}

let ajv: Ajv2020 | undefined;
let manifestValidator: ValidateFunction | undefined;
const rowValidators = new Map<InputKind, ValidateFunction>();

function rowValidator(kind: InputKind): ValidateFunction {
  let v = rowValidators.get(kind);
  if (!v) rowValidators.set(kind, (v = (ajv ??= makeAjv()).compile(rowSchemaOf(kind))));
  return v;
}

/** The row validators by kind, each compiled when first read. */
const ROW_VALIDATORS = Object.defineProperties(
  {},
  Object.fromEntries(INPUT_KINDS.map((k) => [k, { enumerable: true, get: () => rowValidator(k) }])),
) as Record<InputKind, ValidateFunction>;

/**
 * Compiled validators, each compiled once per process when first used: a rebuild that parses no
 * file compiles the manifest's only.
 */
export function validators(): { manifest: ValidateFunction; rows: Record<InputKind, ValidateFunction> } {
  return {
    get manifest() {
      return (manifestValidator ??= (ajv ??= makeAjv()).compile(MANIFEST_SCHEMA));
    },
    rows: ROW_VALIDATORS,
  };
}
