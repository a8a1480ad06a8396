import { describe, expect, it } from 'vitest';
import { createProgress, progressLine } from '../../src/cli/progress.js';

function sink(isTTY: boolean) {
  const out: string[] = [];
  return { out, stream: { isTTY, columns: 80, write: (s: string) => out.push(s) } };
}

describe('progress', () => {
  it('draws a bar (common practice, no source)', () => {
    expect(progressLine('charts', 5, 10, 10)).toBe('charts  [#####.....]  5/10');
    expect(progressLine('pages', 0, 0, 4)).toBe('pages  [....]  0/0');
  });

  it('redraws one line on a TTY, throttled, and always draws the last step and phase changes', () => {
    const { out, stream } = sink(true);
    let t = 0;
    const p = createProgress(stream, { now: () => t });
    for (let i = 0; i <= 100; i++) {
      t += 1; // 1 ms apart: most steps are skipped
      p.onProgress('charts', i, 100);
    }
    p.onProgress('pages', 0, 1);
    p.done();
    expect(out.length).toBeGreaterThan(2);
    expect(out.length).toBeLessThan(10);
    expect(out.some((s) => s.includes('100/100'))).toBe(true);
    expect(out.some((s) => s.includes('pages'))).toBe(true);
    expect(out.every((s) => !s.includes('\n'))).toBe(true);
  });

  it('prints nothing per step off a TTY, phase names only when asked', () => {
    const quiet = sink(false);
    const p = createProgress(quiet.stream);
    for (let i = 0; i < 50; i++) p.onProgress('charts', i, 50);
    p.done();
    expect(quiet.out).toEqual([]);
    const named = sink(false);
    const q = createProgress(named.stream, { phases: true });
    for (let i = 0; i < 50; i++) q.onProgress('charts', i, 50);
    q.onProgress('pages', 0, 1);
    expect(named.out).toEqual(['charts\n', 'pages\n']);
  });
});
