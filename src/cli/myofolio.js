#!/usr/bin/env node
// Launcher: lets Node run the TypeScript sources through tsx, then hands over to main().
import { register } from 'tsx/esm/api';

// Packages the `build` command loads, imported first by Node's own loader: once tsx's hooks are
// registered, every module of a package is resolved and loaded through them (in a thread of
// their own), which for these (several hundred modules) cost about a second of CPU and half a
// second before the build began. The build's TypeScript gets these same modules when it imports them.
const BUILD_PRELOAD = ['vega', 'vega-lite', '@11ty/eleventy'];

if (process.argv[2] === 'build') for (const name of BUILD_PRELOAD) await import(name);
register();
const { main } = await import('./main.ts');
process.exitCode = await main(process.argv.slice(2), { stdout: process.stdout, stderr: process.stderr, cwd: process.cwd() });
