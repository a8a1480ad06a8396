/**
 * The store serves only what it stored under the same key and fingerprint, checked against the
 * hash in the entry's header; anything else at an entry's path (other bytes, a cut entry, a FIFO,
 * a link, a folder) is discarded and counted, never served, and never blocks or throws.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CACHE } from '../../src/defaults.js';
import { Store, defaultStoreDir, storeDirFor } from '../../src/pipeline/store.js';

const root = mkdtempSync(join(tmpdir(), 'myofolio-store-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('Store', () => {
  it('gives back what was put under a key, and nothing under another key or fingerprint', async () => {
    const store = new Store(join(root, 'a'), 'f1');
    const key = store.key('units', ['B1', 1]);
    expect(key).toMatch(/^[0-9a-f]{64}$/);
    store.put('units', key, 'payload');
    expect(store.get('units', key)?.toString()).toBe('payload');
    expect(store.get('units', store.key('units', ['B1', 2]))).toBeUndefined();
    const other = new Store(join(root, 'a'), 'f2');
    expect(other.key('units', ['B1', 1])).not.toBe(key);
    expect(store.counts).toMatchObject({ hits: 1, misses: 1, discarded: [] });
  });

  const damages: Array<[string, (file: string) => void]> = [
    ['one byte of the payload flipped', (f) => {
      const b = readFileSync(f);
      b[b.length - 1]! ^= 0x01;
      writeFileSync(f, b);
    }],
    ['a byte of the header flipped', (f) => {
      const b = readFileSync(f);
      b[20]! ^= 0x01;
      writeFileSync(f, b);
    }],
    ['cut short', (f) => writeFileSync(f, readFileSync(f).subarray(0, 30))],
    ['emptied', (f) => writeFileSync(f, '')],
    ['replaced by a FIFO', (f) => {
      rmSync(f);
      execFileSync('mkfifo', [f]);
    }],
    ['replaced by a link to another file', (f) => {
      const elsewhere = `${f}-elsewhere`;
      writeFileSync(elsewhere, readFileSync(f));
      rmSync(f);
      symlinkSync(elsewhere, f);
    }],
    ['replaced by a folder', (f) => {
      rmSync(f);
      mkdirSync(f);
    }],
  ];
  for (const [what, damage] of damages) {
    it(`an entry ${what} is discarded, counted and not served; a new put is served again`, async () => {
      const store = new Store(join(root, 'damage'), 'f');
      const key = store.key('svg', what);
      store.put('svg', key, 'x'.repeat(100));
      const file = store.path('svg', key);
      damage(file);
      expect(store.get('svg', key)).toBeUndefined();
      expect(store.counts.discarded).toEqual([file]);
      expect(existsSync(file)).toBe(false);
      store.put('svg', key, 'x'.repeat(100));
      expect(store.get('svg', key)?.toString()).toBe('x'.repeat(100));
    });
  }

  it('an unreadable entry is discarded (when not run as root, which reads everything)', async () => {
    const store = new Store(join(root, 'unreadable'), 'f');
    const key = store.key('svg', 1);
    store.put('svg', key, 'svg');
    const file = store.path('svg', key);
    execFileSync('chmod', ['000', file]);
    const asRoot = process.getuid?.() === 0;
    expect(store.get('svg', key)?.toString()).toBe(asRoot ? 'svg' : undefined);
  });

  it('prunes entries unused for CACHE.keepDays, at most once per CACHE.pruneEveryHours, and nothing else', async () => {
    const dir = join(root, 'prune');
    const store = new Store(dir, 'f');
    const old = store.key('units', 'old');
    const fresh = store.key('units', 'fresh');
    store.put('units', old, 'o');
    store.put('units', fresh, 'f');
    const foreign = join(dir, 'units', 'notes.txt');
    writeFileSync(foreign, 'mine');
    const longAgo = new Date(Date.now() - (CACHE.keepDays + 1) * 24 * 3600 * 1000);
    for (const f of [store.path('units', old), foreign]) utimesSync(f, longAgo, longAgo);
    expect(store.prune()).toBe(1);
    expect(existsSync(store.path('units', old))).toBe(false);
    expect(existsSync(store.path('units', fresh))).toBe(true);
    expect(existsSync(foreign)).toBe(true);
    // Pruned just now: not again within the interval.
    utimesSync(store.path('units', fresh), longAgo, longAgo);
    expect(store.prune()).toBe(0);
    expect(store.prune(Date.now() + CACHE.pruneEveryHours * 3600 * 1000 + 1000)).toBe(1);
  });

  it('a hit marks an entry used a day or more ago as used now', async () => {
    const store = new Store(join(root, 'mark'), 'f');
    const key = store.key('svg', 'm');
    store.put('svg', key, 's');
    const twoDays = new Date(Date.now() - 2 * 24 * 3600 * 1000);
    utimesSync(store.path('svg', key), twoDays, twoDays);
    store.get('svg', key);
    expect(Date.now() - statSync(store.path('svg', key)).mtimeMs).toBeLessThan(3600 * 1000);
  });
});

describe('where the store is', () => {
  it('$XDG_CACHE_HOME/myofolio when it is absolute, else ~/.cache/myofolio (XDG Base Directory spec)', () => {
    expect(defaultStoreDir({ XDG_CACHE_HOME: '/x/cache' }, '/home/u')).toBe('/x/cache/myofolio');
    expect(defaultStoreDir({ XDG_CACHE_HOME: 'relative/cache' }, '/home/u')).toBe('/home/u/.cache/myofolio');
    expect(defaultStoreDir({}, '/home/u')).toBe('/home/u/.cache/myofolio');
  });

  it('a folder inside the study folder is refused for the default, with a note', () => {
    const got = storeDirFor('/data/study', '/data/study/.cache');
    expect(got.dir).toBe(defaultStoreDir());
    expect(got.note).toMatch(/inside the study folder/);
    expect(storeDirFor('/data/study', '/data/cache')).toEqual({ dir: '/data/cache' });
  });
});
