/**
 * The manifest schema (schemas/manifest.schema.json) with its assay parts made from the assay
 * registry: the input kinds a file entry may name, each kind's file options (pathLength, …) and
 * the rule that an option belongs to its kind only, and the assay ids of exclusions. The rest of
 * the schema is the committed file itself. tests/assays/registry.test.ts checks that the
 * committed file equals what this makes; after adding an assay, regenerate it with:
 *   npx tsx src/study/manifest-schema.ts --write
 */
import committed from '../../schemas/manifest.schema.json' with { type: 'json' };
import { ASSAY_IDS, KINDS } from '../assays/assembled.js';
import type { FileOptionDef, InputKindDef } from '../assays/types.js';

/** Fields every file entry has, whatever its kind (the rest are the kinds' file options). */
const COMMON_FILE_FIELDS = ['path', 'kind', 'units', 'decimal', 'missing'];

const positive = { type: 'number', exclusiveMinimum: 0 };
const unitText = { type: 'string', minLength: 1 };

/** JSON Schema of one file option. */
function optionSchema(o: FileOptionDef): Record<string, unknown> {
  if (o.shape === 'quantity') {
    return { type: 'object', description: o.description, properties: { value: positive, unit: unitText }, required: ['value', 'unit'], additionalProperties: false };
  }
  return {
    type: 'object',
    additionalProperties: false,
    required: ['unit'],
    description: o.description,
    properties: { unit: unitText, value: positive, byPreparation: { type: 'object', additionalProperties: positive } },
    if: { not: { required: ['value'] } },
    then: { required: ['byPreparation'] },
  };
}

/** The manifest schema: `base` with its assay parts made from the given assays' kinds and ids. */
export function manifestSchema(base: Record<string, unknown>, kinds: readonly InputKindDef[], assayIds: readonly string[]): Record<string, unknown> {
  const schema = structuredClone(base) as { properties: Record<string, { items: Record<string, unknown> & { properties: Record<string, Record<string, unknown>> } }> };
  const fileItems = schema.properties.files!.items;
  const properties: Record<string, unknown> = {};
  for (const name of COMMON_FILE_FIELDS) properties[name] = fileItems.properties[name];
  properties.kind = { enum: kinds.map((k) => k.kind) };
  for (const k of kinds) for (const o of k.fileOptions ?? []) properties[o.name] = optionSchema(o);
  fileItems.properties = properties as Record<string, Record<string, unknown>>;
  fileItems.allOf = kinds
    .filter((k) => (k.fileOptions ?? []).length > 0)
    .map((k) => ({ if: { not: { properties: { kind: { const: k.kind } } } }, then: { properties: Object.fromEntries(k.fileOptions!.map((o) => [o.name, false])) } }));
  const assay = schema.properties.exclusions!.items.properties.assay!;
  assay.description = `Assay id (${assayIds.join(', ')}); all assays when absent.`;
  return schema;
}

/** The manifest schema of the registry's assays. */
export const MANIFEST_SCHEMA: Record<string, unknown> = manifestSchema(
  committed,
  KINDS.map((k) => k.def),
  ASSAY_IDS,
);

/** The schema file's text as it should be committed. */
export function manifestSchemaText(): string {
  return JSON.stringify(MANIFEST_SCHEMA, null, 2) + '\n';
}

if (process.argv[1]?.endsWith('manifest-schema.ts') && process.argv.includes('--write')) {
  const fs = await import('node:fs');
  fs.writeFileSync('schemas/manifest.schema.json', manifestSchemaText());
}
