/** In-memory study fixtures for loader tests (invented values; common practice, no source). */
import { loadStudy } from '../../src/study/load.js';
import type { LoadOutcome } from '../../src/study/types.js';

export const SEQ = 'MRLKAGDEFHIKLMNPQRSTVWY';

export function baseManifest(): Record<string, any> {
  return {
    title: 'Fixture study',
    lab: 'Fixture lab (invented)',
    dates: ['2025-01-01'],
    synthetic: true,
    genes: [{ symbol: 'ZZG1', sequence: SEQ, domains: [{ name: 'head', start: 1, end: 10 }] }],
    variants: [{ wt: true }, { hgvs: 'R2Q', control: { class: 'pathogenic', source: 'invented' } }, { hgvs: 'p.Lys4Glu' }],
    direction: 'hypercontractile',
    files: [{ path: 'rates.csv', kind: 'atpase-rates' }],
  };
}

export const RATES = [
  'variant,preparation,batch,actin (uM),rate (1/s)',
  'WT,w1,B1,0,0.03',
  'WT,w1,B1,50,2.6',
  'R2Q,p1,B1,0,0.04',
  'R2Q,p1,B1,50,3.1',
  'K4E,p2,B1,0,0.03',
  'K4E,p2,B1,50,2.5',
].join('\n');

export function load(manifest: unknown = baseManifest(), files: Record<string, string | Uint8Array> = { 'rates.csv': RATES }): LoadOutcome {
  return loadStudy({ manifest: typeof manifest === 'string' ? manifest : JSON.stringify(manifest), files });
}

/** Load with one extra file of a kind (manifest entry merged with `entry`). */
export function loadWith(path: string, kind: string, text: string, entry: Record<string, unknown> = {}, patch?: (m: Record<string, any>) => void): LoadOutcome {
  const m = baseManifest();
  m.files = [{ path, kind, ...entry }];
  patch?.(m);
  return load(m, { [path]: text });
}
