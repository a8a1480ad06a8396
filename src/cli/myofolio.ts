#!/usr/bin/env node
// The command-line entry point (compiled to dist/cli/myofolio.js, the package's `bin`).
import { enlargeYoungGeneration } from '../pipeline/young-generation.js';

enlargeYoungGeneration();
const { main } = await import('./main.js');
const { invocation } = await import('./invocation.js');
process.exitCode = await main(process.argv.slice(2), { stdout: process.stdout, stderr: process.stderr, cwd: process.cwd(), command: invocation(process.env, process.argv[1], process.cwd()) });
