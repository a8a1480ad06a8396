/** The archive's message catalogue: every message says what is wrong and how to fix it (a habit of all our catalogues). */
import { describe, expect, it } from 'vitest';
import { ARCHIVE_MSG } from '../../src/archive/messages.js';

describe('ARCHIVE_MSG', () => {
  it('gives every message a stable code, one sentence of problem and one of fix', () => {
    const codes = new Set<string>();
    for (const [name, make] of Object.entries(ARCHIVE_MSG)) {
      // Fill each parameter with a sample text (numbers are only written into the text); unknownField's and releaseUnknownStudy's second is a list.
      const args = name === 'unknownField' || name === 'releaseUnknownStudy' ? ['colour', ['title', 'lab']] : Array.from({ length: make.length }, (_, i) => `sample${i}`);
      const m = (make as (...a: unknown[]) => { severity: string; code: string; message: string; fix: string })(...args);
      expect(m.code, name).toMatch(/^(archive|release)\.[a-z-]+$/);
      expect(['error', 'warning'], name).toContain(m.severity);
      expect(m.message, name).toMatch(/\.$/);
      expect(m.fix, name).toMatch(/\.$/);
      expect(m.fix.length, name).toBeGreaterThan(15);
      codes.add(`${m.code} ${name}`);
    }
    expect(codes.size).toBe(Object.keys(ARCHIVE_MSG).length);
  });
});
