/**
 * Write the demo archive data-demo-archive/ from its seeded scenarios (archive-scenario.ts), the way a
 * lab would have made it:
 *   1. the three study folders, the panel with its ATPase rates as first recorded (one variant's too high);
 *   2. `myofolio build` of the archive (into a temporary folder) and `myofolio release` of the panel,
 *      dated 2025-03-14, with the build time stamp fixed (SOURCE_DATE_EPOCH), so the release is reproducible;
 *   3. the corrected atpase-rates.csv written into the panel's folder.
 * A later `myofolio build data-demo-archive` then shows the corrected call as changed since the release.
 *
 * Run: npm run demo:archive (compiles, then runs dist/demo/generate-archive.js [out-dir], default
 * data-demo-archive). An existing out-dir is replaced only when it is a demo archive (its archive.json
 * says synthetic and has the demo's title); anything else is refused.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { MANIFEST_NAME } from '../study/schemas.js';
import { DEMO_RELEASE, DEMO_RELEASE_EPOCH, archiveManifest, archiveStudies, releasedRates } from './archive-scenario.js';

const out = process.argv[2] ?? 'data-demo-archive';
const manifest = archiveManifest();
const cli = fileURLToPath(new URL('../cli/myofolio.js', import.meta.url));
if (!existsSync(cli)) throw new Error(`generate-archive: ${cli} is missing; run it as 'npm run demo:archive', which compiles first.`);

if (existsSync(out) && readdirSync(out).length > 0) {
  let ours = false;
  try {
    const existing = JSON.parse(readFileSync(join(out, 'archive.json'), 'utf8')) as { synthetic?: unknown; title?: unknown };
    ours = existing.synthetic === true && existing.title === manifest.title;
  } catch {
    ours = false;
  }
  if (!ours) throw new Error(`generate-archive: '${out}' exists and is not the demo archive; choose another folder.`);
  rmSync(out, { recursive: true, force: true });
}

// 1. The folders, the panel as first recorded.
mkdirSync(out, { recursive: true });
writeFileSync(join(out, 'archive.json'), `${JSON.stringify(manifest, null, 2)}\n`);
const studies = archiveStudies();
for (const s of studies) {
  const dir = join(out, ...s.path.split('/'));
  mkdirSync(dir, { recursive: true });
  // The schema pointer, for editors, from a study folder two levels below the archive folder.
  writeFileSync(join(dir, MANIFEST_NAME), `${JSON.stringify({ ...s.study.manifest, $schema: '../../../schemas/manifest.schema.json' }, null, 2)}\n`);
  for (const [path, text] of Object.entries(s.study.files)) writeFileSync(join(dir, path), s.id === DEMO_RELEASE.study && path === 'atpase-rates.csv' ? releasedRates(text) : text);
}

// 2. Built and released as a lab does, with the CLI.
const built = mkdtempSync(join(tmpdir(), 'myofolio-demo-archive-'));
try {
  const env = { ...process.env, SOURCE_DATE_EPOCH: String(DEMO_RELEASE_EPOCH) };
  const site = join(built, 'site');
  execFileSync(process.execPath, [cli, 'build', out, '--out', site], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  execFileSync(process.execPath, [cli, 'release', out, DEMO_RELEASE.study, '--note', DEMO_RELEASE.note, '--date', DEMO_RELEASE.date, '--out', site], { env, stdio: ['ignore', 'ignore', 'inherit'] });
} finally {
  rmSync(built, { recursive: true, force: true });
}

// 3. The correction, after the release.
const panel = studies.find((s) => s.id === DEMO_RELEASE.study)!;
const corrected = panel.study.files['atpase-rates.csv'];
if (corrected === undefined) throw new Error(`the demo study ${panel.id} has no atpase-rates.csv to correct`);
writeFileSync(join(out, ...panel.path.split('/'), 'atpase-rates.csv'), corrected);
process.stdout.write(`wrote the demo archive to ${out}: ${studies.length} studies, one release of ${DEMO_RELEASE.study} (${DEMO_RELEASE.date}) and the correction after it\n`);
