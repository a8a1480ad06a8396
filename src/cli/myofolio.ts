#!/usr/bin/env node
// The command-line entry point (compiled to dist/cli/myofolio.js, the package's `bin`).
import { enlargeYoungGeneration } from '../pipeline/young-generation.js';

enlargeYoungGeneration();
const { runProcess } = await import('./main.js');
await runProcess(process.argv.slice(2));
