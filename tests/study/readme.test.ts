import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { columnTable, extractReference, inputReference } from '../../src/study/reference-doc.js';
import { CATALOGUE, INPUT_KINDS, MANIFEST_SCHEMA } from '../../src/study/schemas.js';

const README = readFileSync(join(import.meta.dirname, '../../README.md'), 'utf8');

describe('README input reference agrees with the schemas', () => {
  it('the section between the markers is the generated text (npx tsx src/study/reference-doc.ts --write)', () => {
    expect(extractReference(README)).toBe(inputReference());
  });

  it.each(INPUT_KINDS)('%s: every schema column is in the README table, with its required flag', (kind) => {
    const table = columnTable(kind);
    expect(README).toContain(table);
    for (const c of CATALOGUE[kind]!.columns) {
      const line = table.split('\n').find((l) => l.startsWith(`| \`${c.name}\` |`));
      expect(line, c.name).toBeDefined();
      expect(line!.split('|')[2]!.trim() === 'yes').toBe(c.required);
    }
  });

  it('every top-level manifest field is documented', () => {
    for (const name of Object.keys((MANIFEST_SCHEMA as { properties: object }).properties)) {
      if (name !== '$schema') expect(README).toContain(`| \`${name}\` |`);
    }
  });
});
