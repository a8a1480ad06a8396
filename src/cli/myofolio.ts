#!/usr/bin/env node
// The command-line entry point (compiled to dist/cli/myofolio.js, the package's `bin`).
import { runProcess } from './main.js';

await runProcess(process.argv.slice(2));
