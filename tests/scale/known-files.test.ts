/**
 * Files known by their identity (src/study/read-folder.ts): a rebuild with a cache takes the
 * SHA-256 of an unchanged file from the record and reads the file only when the loader asks for
 * its bytes; a changed file is read and hashed again; a file changed after it was looked at is
 * refused when it is read. Study: the benchmark generator's (synthetic, invented values).
 */
import { createHash } from 'node:crypto';
import { appendFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { syntheticStudy, writeStudy } from '../../src/bench/synthetic.js';
import { loadStudy } from '../../src/study/load.js';
import { type KnownFiles, oldEnoughToRecord, readStudyFolder } from '../../src/study/read-folder.js';

const tmp = mkdtempSync(join(tmpdir(), 'myofolio-known-files-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const made = syntheticStudy({ variants: 4, perBatch: 2, filaments: 10, turnoverPoints: 30, maxRowsPerFile: 500 });
const dir = join(tmp, 'study');
writeStudy(dir, made);
const paths = Object.keys(made.files);
const sha = (path: string) => createHash('sha256').update(readFileSync(join(dir, path))).digest('hex');

function memoryKnown() {
  const record = new Map<string, string>();
  let hits = 0;
  const known: KnownFiles = {
    sha256: (id) => {
      const got = record.get(id);
      if (got !== undefined) hits++;
      return got;
    },
    record: (id, s) => void record.set(id, s),
  };
  return { known, record, hits: () => hits };
}

describe('readStudyFolder with known files', () => {
  it('records every file read, then takes their SHA-256 from the record; loading gives the same study', () => {
    const m = memoryKnown();
    const first = readStudyFolder(dir, { known: m.known, knownMinAgeMs: 0 });
    expect(m.record.size).toBe(paths.length);
    const again = readStudyFolder(dir, { known: m.known, knownMinAgeMs: 0 });
    expect(m.hits()).toBe(paths.length);
    for (const p of paths) {
      expect(again.files.has(p)).toBe(true);
      expect(again.sha256?.get(p)).toBe(sha(p));
    }
    const whole = loadStudy(first);
    const lazy = loadStudy(again);
    expect(lazy.issues).toEqual(whole.issues);
    expect(lazy.study?.files).toEqual(whole.study?.files);
    expect(lazy.study?.rows).toEqual(whole.study?.rows);
  });

  it('does not record a file changed shortly before it was read: 3 s on a coarse clock, 100 ms on a fine one', () => {
    const now = 1_700_000_000_000;
    const at = (msAgo: number, subMs: bigint) => {
      const ns = BigInt(now - msAgo) * 1_000_000n + subMs;
      return { mtimeNs: ns, ctimeNs: ns };
    };
    expect(oldEnoughToRecord(at(50, 123_456n), now)).toBe(false);
    expect(oldEnoughToRecord(at(200, 123_456n), now)).toBe(true);
    expect(oldEnoughToRecord(at(2_000, 0n), now)).toBe(false);
    expect(oldEnoughToRecord(at(4_000, 0n), now)).toBe(true);
    // The newer of the two times counts.
    expect(oldEnoughToRecord({ mtimeNs: at(10_000, 5n).mtimeNs, ctimeNs: at(20, 5n).ctimeNs }, now)).toBe(false);
    // Just written: not recorded.
    const m = memoryKnown();
    appendFileSync(join(dir, paths[0]), '\n');
    readStudyFolder(dir, { known: m.known, knownMinAgeMs: 60_000 });
    expect(m.record.size).toBe(0);
  });

  it('reads a changed file again, and refuses a file changed after it was looked at', () => {
    const m = memoryKnown();
    readStudyFolder(dir, { known: m.known, knownMinAgeMs: 0 });
    const [changed, later] = paths.filter((p) => p.endsWith('.csv'));
    appendFileSync(join(dir, changed), '\n');
    const again = readStudyFolder(dir, { known: m.known, knownMinAgeMs: 0 });
    expect(m.hits()).toBe(paths.length - 1);
    expect(again.sha256?.get(changed)).toBe(sha(changed));
    // Looked at (known, not read) and then changed before the loader asked for it.
    appendFileSync(join(dir, later), '\n');
    expect(() => again.files.get(later)).toThrow(/changed while myofolio was reading/);
  });
});
