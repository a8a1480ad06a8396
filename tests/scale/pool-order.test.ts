/**
 * The chart pool's two queues: a chart asked for with `later` is drawn only when no other chart
 * waits (src/charts/pool.ts). The study pages' charts use it so that the variant pages'
 * pipeline, which waits on its charts, is not held up behind them.
 */
import { afterAll, describe, expect, it } from 'vitest';
import type { ChartSpec } from '../../src/assays/types.js';
import { POOL_SPAWN_BACKLOG, WorkerPool, createChartRenderer } from '../../src/charts/pool.js';

const renderer = createChartRenderer({ workers: 1, cacheDir: false });
afterAll(() => renderer.close());

const spec = (n: number): ChartSpec =>
  ({
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    data: { values: [{ x: n, y: n }] },
    mark: 'point',
    encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } },
  }) as ChartSpec;

describe('chart pool order', () => {
  it('draws charts asked for later after every chart asked for now, each queue in order', async () => {
    const done: string[] = [];
    const ask = (name: string, n: number, later: boolean) => renderer.render(spec(n), { key: name }, later).then(() => done.push(name));
    // One worker: the first chart is drawn at once; the rest wait in the queues.
    await Promise.all([ask('now-1', 1, false), ask('later-1', 2, true), ask('later-2', 3, true), ask('now-2', 4, false), ask('now-3', 5, false)]);
    expect(done).toEqual(['now-1', 'now-2', 'now-3', 'later-1', 'later-2']);
  }, 60_000);
});

describe('chart pool size', () => {
  it('starts a worker more only when enough charts wait to keep it busy (POOL_SPAWN_BACKLOG)', async () => {
    const pool = new WorkerPool<{ spec: ChartSpec; options: { key: string } }, string>(new URL('../../src/charts/render-worker.ts', import.meta.url), 2);
    try {
      // A few charts at once: one worker draws them all.
      const few = await Promise.all([1, 2, 3].map((n) => pool.run({ spec: spec(n), options: { key: `few-${n}` } })));
      expect(few.every((svg) => svg.startsWith('<svg'))).toBe(true);
      expect(pool.started).toBe(1);
      // Many at once: the second worker starts.
      const many = Array.from({ length: POOL_SPAWN_BACKLOG + 4 }, (_, n) => pool.run({ spec: spec(n), options: { key: `many-${n}` } }));
      expect(pool.started).toBe(2);
      await Promise.all(many);
    } finally {
      await pool.close();
    }
  }, 60_000);
});
