/** The hand-built StudyResults of the archive tests stay valid results.json (schemas/results.schema.json). */
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { fakeSha, makeResults } from './study-results.js';

describe('tests/archive/study-results.ts', () => {
  it('builds StudyResults that schemas/results.schema.json accepts, for every feature the tests use', () => {
    const schema = JSON.parse(readFileSync('schemas/results.schema.json', 'utf8'));
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema);
    const samples = [
      makeResults({ variants: [] }),
      makeResults({
        title: 'Every feature',
        genes: ['ZZMYO9', 'ZZACT2'],
        variants: [
          { hgvs: 'p.Arg403Gln', short: 'R403Q', residue: 403, overall: 'hypercontractile', metrics: { 'atpase.kcat': [1.5, 1.3, 1.7, 'increased'], 'atpase.basal': [0.01, -0.01, 0.03, 'indeterminate'] } },
          { hgvs: 'p.Gly700Asp', short: 'G700D', overall: 'within WT range', control: 'benign', metrics: { 'motility.velocity': [1, 0.9, 1.1, 'within WT range'] } },
          { gene: 'ZZACT2', hgvs: 'p.Glu99Lys', short: 'E99K', overall: 'indeterminate', metrics: { 'force.pCa50': [null, null, null, 'not estimable'] }, files: { force: 'force-extra.csv' } },
        ],
        settings: { evidenceCap: 'moderate', bands: { 'atpase.kcat': [0.85, 1.2] } },
        scales: { 'atpase.basal': 'ratio' },
        files: [{ path: 'atpase-rates.csv', kind: 'atpase-rates', sha256: fakeSha('x'), rows: 3 }],
      }),
    ];
    for (const results of samples) {
      const ok = validate(JSON.parse(JSON.stringify(results)));
      expect(validate.errors ?? [], 'schema errors').toEqual([]);
      expect(ok).toBe(true);
    }
  });

  it('is checked for real: a broken object is refused by the same validator', () => {
    const schema = JSON.parse(readFileSync('schemas/results.schema.json', 'utf8'));
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema);
    const broken = JSON.parse(JSON.stringify(makeResults({ variants: [] })));
    broken.provenance.manifestSha256 = 'not hex';
    expect(validate(broken)).toBe(false);
  });
});
