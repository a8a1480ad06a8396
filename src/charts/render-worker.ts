/** Worker thread of the chart pool (src/charts/pool.ts): renders one spec at a time with renderSvg. */
import { parentPort } from 'node:worker_threads';
import type { ChartSpec } from '../assays/types.js';
import { renderSvg, type RenderOptions } from './render.js';

parentPort?.on('message', async (msg: { id: number; input: { spec: ChartSpec; options: RenderOptions } }) => {
  try {
    const output = await renderSvg(msg.input.spec, msg.input.options);
    parentPort?.postMessage({ id: msg.id, output });
  } catch (err) {
    parentPort?.postMessage({ id: msg.id, error: err instanceof Error ? (err.stack ?? err.message) : String(err) });
  }
});
