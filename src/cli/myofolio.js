#!/usr/bin/env node
// Launcher: lets Node run the TypeScript sources through tsx, then hands over to main().
import { register } from 'tsx/esm/api';

register();
const { main } = await import('./main.ts');
process.exitCode = await main(process.argv.slice(2), { stdout: process.stdout, stderr: process.stderr, cwd: process.cwd() });
