/**
 * Worker thread of analyseUnitsParallel (parallel.ts): runs registry modules' analyse() on one chunk.
 * Each module's input rows are decoded (analyse-worker-rows.ts) just before it runs and dropped
 * once no later module reads them, so the worker holds one assay's rows at a time.
 */
import { parentPort } from 'node:worker_threads';
import { assayById } from '../assays/registry.js';
import type { UnitResult } from '../results/types.js';
import type { Study } from '../study/types.js';
import { decodeRows } from './analyse-worker-rows.js';
import type { AnalyseJob } from './parallel.js';

parentPort?.on('message', (msg: { id: number; input: AnalyseJob }) => {
  try {
    const { study: meta, rows: encoded, moduleIds } = msg.input;
    const modules = moduleIds.map((id) => {
      const m = assayById(id);
      if (!m) throw new Error(`unknown assay module '${id}'`);
      return m;
    });
    const output: Record<string, UnitResult[]> = {};
    const rows: Record<string, unknown[]> = {};
    modules.forEach((m, i) => {
      for (const kind of m.inputs) if (!(kind in rows) && encoded[kind]) rows[kind] = decodeRows(encoded[kind]);
      output[m.id] = m.analyse({ ...meta, rows } as Study);
      for (const kind of Object.keys(rows)) if (!modules.slice(i + 1).some((later) => (later.inputs as string[]).includes(kind))) delete rows[kind];
    });
    parentPort?.postMessage({ id: msg.id, output });
  } catch (err) {
    parentPort?.postMessage({ id: msg.id, error: err instanceof Error ? (err.stack ?? err.message) : String(err) });
  }
});
