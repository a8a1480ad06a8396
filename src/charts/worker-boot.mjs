// Worker bootstrap: lets a worker thread run a TypeScript module through tsx (the same way
// src/cli/myofolio.js does for the main thread), then imports it. `--import tsx` in a
// worker's execArgv does not reach the worker's entry module on Node 20, hence this file.
//
// Packages named in workerData.preload are imported first, by Node's own loader: once tsx's
// hooks are registered, every module a package imports is resolved and loaded through them, in
// a thread of their own. For vega and vega-lite (about two hundred modules) that cost a chart
// worker some 0.8 s of CPU at start, and made it ready for its first chart 0.4 s later. Modules
// loaded first are the ones the worker's TypeScript gets when it imports the same package.
import { workerData } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

for (const name of workerData.preload ?? []) await import(name);
register();
await import(workerData.script);
