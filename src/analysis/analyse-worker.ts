/** Worker thread of analyseUnitsParallel (parallel.ts): runs registry modules' analyse() on one chunk. */
import { parentPort } from 'node:worker_threads';
import { assayById } from '../assays/registry.js';
import type { UnitResult } from '../results/types.js';
import type { AnalyseJob } from './parallel.js';

parentPort?.on('message', (msg: { id: number; input: AnalyseJob }) => {
  try {
    const output: Record<string, UnitResult[]> = {};
    for (const id of msg.input.moduleIds) {
      const m = assayById(id);
      if (!m) throw new Error(`unknown assay module '${id}'`);
      output[id] = m.analyse(msg.input.study);
    }
    parentPort?.postMessage({ id: msg.id, output });
  } catch (err) {
    parentPort?.postMessage({ id: msg.id, error: err instanceof Error ? (err.stack ?? err.message) : String(err) });
  }
});
