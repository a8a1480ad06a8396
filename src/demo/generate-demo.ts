/**
 * Write the demo study folder data-demo/ from the seeded demo scenario.
 * Run: npx tsx src/demo/generate-demo.ts [out-dir]   (default: data-demo)
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { MANIFEST_NAME } from '../study/schemas.js';
import { demoScenario } from './scenario.js';
import { simulateStudy } from './simulate.js';

const out = process.argv[2] ?? 'data-demo';
const { manifest, files } = simulateStudy(demoScenario());
mkdirSync(out, { recursive: true });
writeFileSync(join(out, MANIFEST_NAME), JSON.stringify(manifest, null, 2) + '\n');
for (const [path, text] of Object.entries(files)) writeFileSync(join(out, path), text);
process.stdout.write(`wrote ${Object.keys(files).length + 1} files to ${out}\n`);
