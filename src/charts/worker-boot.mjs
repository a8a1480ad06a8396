// Worker bootstrap: lets a worker thread run a TypeScript module through tsx (the same way
// src/cli/myofolio.js does for the main thread), then imports it. `--import tsx` in a
// worker's execArgv does not reach the worker's entry module on Node 20, hence this file.
import { workerData } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();
await import(workerData.script);
