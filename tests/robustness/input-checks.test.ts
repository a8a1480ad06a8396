/**
 * The hostile corpus of issue 22's input checks (a case each): the lab mistakes that used to pass
 * silently, repeat themselves hundreds of times, or crash. Every case ends clean: either exit 1
 * with a located message (file:line:col or file:/json/path) and its fix, no stack trace and nothing
 * written; or a correct acceptance (exit 0, the site built, each expected warning printed once and,
 * when it touches a variant, shown on that variant's report). No case may change the study folder
 * (damage) or give a wrong result. Figures are printed at the end (cases, clean errors, correct
 * acceptances, crashes, damage).
 *
 * Studies are small copies of the demo study (invented data; tests/robustness/helpers.ts). Line and
 * column numbers are counted from the generated files (line 1 a '#' comment, line 2 the header);
 * expected values are worked out from the demo's invented numbers in each case's comment (common
 * practice, no source), with the unit factors of the SI Brochure (2019), Tables 7–8.
 */
import { existsSync, lstatSync, mkdirSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CRASH, cleanup, copyDemo, hashTree, readManifest, runCli, tempRoot, writeManifest } from './helpers.js';

const root = tempRoot('input-checks');
const RATES = 'atpase-rates.csv';
const VEL = 'motility-velocities.csv';
const FORCE = 'force-pca.csv';

/** Outcome figures, printed after the last case. */
const figures = { cases: 0, cleanErrors: 0, acceptances: 0, crashes: 0, damage: 0 };
afterAll(() => {
  // eslint-disable-next-line no-console
  console.log(`issue 22 hostile corpus: ${figures.cases} cases, ${figures.cleanErrors} clean errors, ${figures.acceptances} correct acceptances, ${figures.crashes} crashes, ${figures.damage} damage`);
  cleanup(root);
});

function edit(dir: string, file: string, change: (text: string) => string): void {
  writeFileSync(join(dir, file), change(readFileSync(join(dir, file), 'utf8')));
}
function editRows(dir: string, file: string, change: (cells: string[], line: number) => string[] | null): void {
  edit(dir, file, (text) =>
    text
      .replace(/\n$/, '')
      .split('\n')
      .flatMap((l, i) => {
        if (i < 2) return [l];
        const out = change(l.split(','), i + 1);
        return out === null ? [] : [out.join(',')];
      })
      .join('\n') + '\n',
  );
}
function editManifest(dir: string, change: (m: Record<string, any>) => void): void {
  const m = readManifest(dir);
  change(m);
  writeManifest(dir, m);
}

interface Located {
  code: string;
  /** The printed location, e.g. 'atpase-rates.csv:2:6' or 'study.json:/variants/1/label'. */
  at: string;
  text?: string;
}

interface Case {
  name: string;
  make(dir: string): void;
  /** Errors the check must report (exit 1), or warnings of an accepted study (exit 0). */
  errors?: Located[];
  warnings?: Located[];
  /** Codes that must appear exactly once (one message per problem). */
  once?: string[];
  /** A variant report (its page's file name, without .html) that must show a warning with this code. */
  report?: { page: string; code: string };
  /** Lines of output about one file that may be printed at most (one message per problem). */
  maxLinesFor?: { file: string; lines: number };
}

let n = 0;
function studyFor(c: Case): { dir: string; site: string } {
  const base = join(root, `case-${++n}`);
  const dir = copyDemo(join(base, 'study'));
  c.make(dir);
  return { dir, site: join(base, 'site') };
}

/** Is this printed line at `at`? A bare file name stands for any line of that file. */
function isAt(l: string, at: string, severity: string): boolean {
  if (at.includes(':')) return l.startsWith(`${at}: ${severity}: `);
  return new RegExp(`^${at.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}:\\d+(:\\d+)?: ${severity}: `).test(l);
}

function located(out: string, e: Located, severity: 'error' | 'warning'): void {
  const hit = out.split('\n').find((l) => isAt(l, e.at, severity) && l.includes(e.text ?? ''));
  expect(hit, `expected ${severity} ${e.code} at ${e.at}${e.text ? ` with "${e.text}"` : ''} in:\n${out}`).toBeDefined();
  expect(hit).toMatch(/: (error|warning): .+ — .+/);
}

/** Find the report page of a variant in a built site (its file under the variants folder). */
function reportPage(site: string, page: string): string {
  const dir = join(site, 'variants');
  const name = readdirSync(dir).find((f) => f === `${page}.html`);
  expect(name, `no report ${page}.html in ${dir}`).toBeDefined();
  return readFileSync(join(dir, name!), 'utf8');
}

const CASES: Case[] = [
  // ---- silent unit mistakes: accepted, with one warning naming the column whose unit is the likely cause ----
  {
    name: 'rate column headed 1/min with values in 1/s',
    // Demo WT kcat ≈ 4.9 s⁻¹ (its wtBaselines mean); read as per minute it is ≈ 4.9/60 = 0.08 s⁻¹.
    make: (dir) => edit(dir, RATES, (t) => t.replace('rate (1/s)', 'rate (1/min)')),
    warnings: [{ code: 'study.implausible-wt', at: `${RATES}:2:6`, text: "read as 1/s, the values would give" }],
    once: ['study.implausible-wt'],
    report: { page: 'zzmyo1-a318t', code: 'study.implausible-wt' },
  },
  {
    name: 'tension column headed Pa with values in kPa',
    // force µN / area µm² × 1000 = tension in kPa (1 µN/µm² = 1000 kPa); headed Pa, read 1000 times too small.
    make: (dir) =>
      edit(dir, FORCE, (t) =>
        t
          .replace(/\n$/, '')
          .split('\n')
          .map((l, i) => {
            if (i === 0) return l;
            if (i === 1) return 'variant,preparation,batch,pCa,tension (Pa)';
            const [v, p, b, pCa, f, a] = l.split(',');
            return [v, p, b, pCa, ((Number(f) / Number(a)) * 1000).toFixed(4)].join(',');
          })
          .join('\n') + '\n',
      ),
    warnings: [{ code: 'study.implausible-wt', at: `${FORCE}:2:5`, text: 'read as kPa, the values would give' }],
    once: ['study.implausible-wt'],
    report: { page: 'zzmyo1-s58i', code: 'study.implausible-wt' },
  },
  {
    name: 'actin headed mM with values in µM (hundreds of cells beyond 1 mM)',
    // Every actin above 1 µM becomes > 1000 µM: the cells are flagged one by one, and KM (tens of µM) reads 1000 times too large.
    make: (dir) => edit(dir, RATES, (t) => t.replace('actin (uM)', 'actin (mM)')),
    warnings: [{ code: 'study.implausible-wt', at: `${RATES}:2:5`, text: "The unit of 'actin'" }],
    maxLinesFor: { file: RATES, lines: 1 },
  },
  // ---- one message per problem ----
  {
    name: 'a file in decimal commas, not declared (every number cell)',
    make: (dir) => edit(dir, VEL, (t) => t.replace(/,/g, ';').replace(/(\d)\.(\d)/g, '$1,$2')),
    errors: [{ code: 'csv.decimal-comma', at: `${VEL}:3:6`, text: 'in all, lines 3–' }],
    maxLinesFor: { file: VEL, lines: 1 },
  },
  {
    name: 'a misspelt variant label on 96 rows',
    make: (dir) => editRows(dir, RATES, (c) => (c[0] === 'A318T' ? ['A31T8', ...c.slice(1)] : c)),
    errors: [{ code: 'csv.unknown-variant', at: RATES, text: "The variant 'A31T8' is not declared in the manifest. Did you mean 'A318T'?" }],
    once: ['csv.unknown-variant'],
  },
  {
    name: 'a 10 MB number cell',
    make: (dir) => editRows(dir, RATES, (c, line) => (line === 3 ? [...c.slice(0, 5), `${'7'.repeat(10_000_000)}x`] : c)),
    errors: [{ code: 'csv.not-a-number', at: `${RATES}:3:6`, text: '… (10,000,001 characters)' }],
  },
  {
    name: 'a manifest schema error does not hide a missing file (every problem at once)',
    make: (dir) =>
      editManifest(dir, (m) => {
        delete m.lab;
        m.files.push({ path: 'turnover.csv', kind: 'turnover' });
      }),
    errors: [
      { code: 'manifest.required', at: 'study.json:/lab' },
      { code: 'folder.file-not-found', at: 'study.json:/files/3/path' },
    ],
  },
  // ---- duplicates refused ----
  {
    name: 'the same rows in two files of one kind',
    make: (dir) => {
      writeFileSync(join(dir, 'motility-velocities-copy.csv'), readFileSync(join(dir, VEL)));
      editManifest(dir, (m) => m.files.push({ path: 'motility-velocities-copy.csv', kind: 'motility-velocities' }));
    },
    errors: [{ code: 'csv.duplicate-across-files', at: 'motility-velocities-copy.csv:3', text: "repeats the observation on line 3 of 'motility-velocities.csv'" }],
    once: ['csv.duplicate-across-files'],
  },
  {
    name: 'a corrected ATPase file listed beside the old one',
    make: (dir) => {
      writeFileSync(join(dir, 'atpase-rates-corrected.csv'), readFileSync(join(dir, RATES), 'utf8').replace(/,0\.0532\n/, ',0.0530\n'));
      editManifest(dir, (m) => m.files.push({ path: 'atpase-rates-corrected.csv', kind: 'atpase-rates' }));
    },
    errors: [{ code: 'csv.duplicate-across-files', at: 'atpase-rates-corrected.csv:3', text: "of 'atpase-rates.csv' (variant WT, preparation WT-B1-1, batch B1, actin 0 µM, replicate w1)" }],
    once: ['csv.duplicate-across-files'],
  },
  {
    name: 'the same observation twice in one file',
    make: (dir) => edit(dir, VEL, (t) => t.replace('WT,WT-B1-1,B1,m1,f2,780.4\n', 'WT,WT-B1-1,B1,m1,f2,780.4\nWT,WT-B1-1,B1,m1,f2,781.0\n')),
    errors: [{ code: 'csv.duplicate-observation', at: `${VEL}:5`, text: 'repeats the observation on line 4' }],
  },
  {
    name: 'duplicate JSON keys in the manifest ("synthetic": true, then false)',
    make: (dir) => edit(dir, 'study.json', (t) => t.replace('"synthetic": true,', '"synthetic": true,\n  "synthetic": false,')),
    // copyDemo writes the manifest without $schema: line 9 holds "synthetic" (after title, lab, 5 lines of dates).
    errors: [{ code: 'manifest.duplicate-key', at: 'study.json:10:3', text: "The field 'synthetic' appears twice in the same object (first on line 9)" }],
  },
  {
    name: "a label equal to another variant's short form",
    make: (dir) =>
      editManifest(dir, (m) => {
        m.variants[2].label = 'C122K-renamed';
        m.variants[1].label = 'C122K';
      }),
    errors: [{ code: 'manifest.label-names-other', at: 'study.json:/variants/1/label', text: 'ZZMYO1 p.Cys122Lys' }],
  },
  {
    name: "a label equal to another variant's HGVS",
    make: (dir) => editManifest(dir, (m) => (m.variants[1].label = 'p.Cys122Lys')),
    errors: [{ code: 'manifest.label-names-other', at: 'study.json:/variants/1/label' }],
  },
  {
    name: 'two gene symbols that differ only by case',
    make: (dir) =>
      editManifest(dir, (m) => {
        m.genes.push({ symbol: 'zzmyo1', domains: [] });
        for (const v of m.variants) v.gene = 'ZZMYO1';
      }),
    errors: [{ code: 'manifest.gene-case', at: 'study.json:/genes/1/symbol', text: "'ZZMYO1' and 'zzmyo1' differ only by case" }],
  },
  // ---- the preparation column and the first study ----
  {
    name: "the preparation column under its former name 'unit'",
    make: (dir) => edit(dir, RATES, (t) => t.replace('variant,preparation,', 'variant,unit,')),
    errors: [{ code: 'csv.renamed-column', at: `${RATES}:2:2`, text: "Rename the header 'unit' to 'preparation'" }],
    once: ['csv.renamed-column'],
  },
  {
    name: "an exclusion of the former kind 'unit'",
    make: (dir) => editManifest(dir, (m) => (m.exclusions = [{ kind: 'unit', unit: 'E333V-p2', reason: 'torn' }])),
    errors: [
      { code: 'manifest.renamed-value', at: 'study.json:/exclusions/0/kind' },
      { code: 'manifest.renamed-field', at: 'study.json:/exclusions/0/unit' },
    ],
  },
  {
    name: 'a study whose files hold no data row',
    make: (dir) => {
      for (const f of [RATES, VEL, FORCE]) edit(dir, f, (t) => t.split('\n').slice(0, 2).join('\n') + '\n');
    },
    errors: [{ code: 'study.no-data', at: 'study.json:/files', text: 'none of its 3 files holds a data row' }],
    once: ['study.no-data'],
  },
  {
    name: 'a study that declares only the wild type',
    make: (dir) =>
      editManifest(dir, (m) => {
        m.variants = [{ wt: true, label: 'WT' }];
        m.exclusions = [];
      }),
    errors: [{ code: 'study.no-variants', at: 'study.json:/variants' }],
  },
  // ---- accepted, with a warning on the variant's report ----
  {
    name: 'one preparation label in two batches of a variant',
    // A318T-p3 (batch B2) renamed A318T-p2, the name of its preparation in batch B3.
    make: (dir) => editRows(dir, RATES, (c) => (c[1] === 'A318T-p3' ? [...c.slice(0, 1), 'A318T-p2', ...c.slice(2)] : c)),
    warnings: [{ code: 'study.preparation-in-two-batches', at: RATES, text: "'A318T-p2' (batches 'B3', 'B2') of 'A318T'" }],
    report: { page: 'zzmyo1-a318t', code: 'study.preparation-in-two-batches' },
  },
  {
    name: 'too few known controls for any evidence level',
    // Only S58I (pathogenic) and H35W (benign) keep their class: 1 + 1 controls reach nothing (computed from the formula of Brnich et al. 2020: PS3 1·2/2 = 1, BS3 2/(1·2) = 1).
    make: (dir) =>
      editManifest(dir, (m) => {
        for (const v of m.variants.slice(2)) if (v.hgvs !== 'p.H35W') delete v.control;
      }),
    warnings: [{ code: 'study.too-few-controls', at: 'study.json:/variants', text: 'With 1 pathogenic and 1 benign control measured' }],
  },
  {
    name: 'rows of one preparation split over two files without repeats (how a large file is split)',
    make: (dir) => {
      const lines = readFileSync(join(dir, VEL), 'utf8').replace(/\n$/, '').split('\n');
      const half = 1000; // inside a preparation's rows
      writeFileSync(join(dir, VEL), lines.slice(0, half).join('\n') + '\n');
      writeFileSync(join(dir, 'motility-velocities-2.csv'), [lines[0], lines[1], ...lines.slice(half)].join('\n') + '\n');
      editManifest(dir, (m) => m.files.splice(2, 0, { path: 'motility-velocities-2.csv', kind: 'motility-velocities' }));
    },
    warnings: [],
  },
];

describe.each(CASES.map((c) => [c.name, c] as const))('%s', (_name, c) => {
  it('ends clean: located messages and the right exit code, no stack, the study untouched', async () => {
    figures.cases++;
    const { dir, site } = studyFor(c);
    const before = hashTree(dir);
    const check = await runCli(['check', dir], root);
    const build = await runCli(['build', dir, '--out', site], root);
    const all = check.out + check.err + build.out + build.err;
    if (CRASH.test(all)) figures.crashes++;
    expect(all).not.toMatch(CRASH);
    const unchanged = JSON.stringify(hashTree(dir)) === JSON.stringify(before);
    if (!unchanged) figures.damage++;
    expect(unchanged, 'the study folder changed').toBe(true);
    for (const out of [check.out, build.out]) {
      for (const e of c.errors ?? []) located(out, e, 'error');
      for (const w of c.warnings ?? []) located(out, w, 'warning');
      for (const code of c.once ?? []) {
        const lines = out.split('\n').filter((l) => l.includes(': error: ') || l.includes(': warning: '));
        const matching = [...(c.errors ?? []), ...(c.warnings ?? [])].find((e) => e.code === code)!;
        expect(lines.filter((l) => l.startsWith(matching.at.split(':')[0] ?? matching.at) && l.includes(matching.text ?? '')).length, `one message for ${code}:\n${out}`).toBe(1);
      }
      if (c.maxLinesFor) expect(out.split('\n').filter((l) => l.startsWith(`${c.maxLinesFor!.file}:`)).length, out).toBeLessThanOrEqual(c.maxLinesFor.lines);
      // A long cell never floods the output.
      expect(Math.max(...out.split('\n').map((l) => l.length))).toBeLessThan(4000);
    }
    if (c.errors) {
      expect(check.code, check.out).toBe(1);
      expect(build.code, build.out).toBe(1);
      expect(build.out).toContain('nothing was built');
      expect(existsSync(site)).toBe(false);
      figures.cleanErrors++;
    } else {
      expect(check.code, check.out).toBe(0);
      expect(build.code, build.out + build.err).toBe(0);
      expect(check.out).not.toContain(': error: ');
      if ((c.warnings ?? []).length === 0) expect(check.out).toBe('No problems found.\n');
      expect(existsSync(join(site, 'index.html'))).toBe(true);
      const results = JSON.parse(readFileSync(join(site, 'downloads', 'results.json'), 'utf8'));
      for (const w of c.warnings ?? []) expect(results.issues.map((i: { code: string }) => i.code)).toContain(w.code);
      if (c.report) {
        const page = reportPage(site, c.report.page);
        expect(page).toContain('Warnings about the input');
        expect(page).toMatch(new RegExp(`class="notice notice-input-warnings"[^]*${c.report.code}`));
        const v = results.variants.find((x: { id: string }) => x.id === c.report!.page);
        expect(v.warnings.map((i: { code: string }) => i.code)).toContain(c.report.code);
      }
      figures.acceptances++;
    }
  }, 120_000);
});

describe('a preparation split over two files gives the results of the unsplit study (no wrong result)', () => {
  it('same calls and numbers; only the provenance differs', async () => {
    const whole = copyDemo(join(root, 'whole', 'study'));
    const split = studyFor(CASES.find((c) => c.name.startsWith('rows of one preparation split'))!);
    const a = await runCli(['build', whole, '--out', join(root, 'whole', 'site')], root);
    const b = await runCli(['build', split.dir, '--out', split.site], root);
    expect(a.code + b.code, a.out + b.out).toBe(0);
    const ra = JSON.parse(readFileSync(join(root, 'whole', 'site', 'downloads', 'results.json'), 'utf8'));
    const rb = JSON.parse(readFileSync(join(split.site, 'downloads', 'results.json'), 'utf8'));
    expect(rb.variants).toEqual(ra.variants);
    expect(rb.comparisons).toEqual(ra.comparisons);
    // Units: the same values; their source ranges name the file each row came from.
    expect(rb.units.map((u: { metrics: unknown }) => u.metrics)).toEqual(ra.units.map((u: { metrics: unknown }) => u.metrics));
  }, 120_000);
});

describe('init for a first study', () => {
  it('an empty starter is refused by check, one error per thing to add', async () => {
    figures.cases++;
    const dir = join(root, 'first', 'my-study');
    const init = await runCli(['init', dir, '--assays', 'atpase-rates,force-pca'], root);
    expect(init.code, init.err).toBe(0);
    const before = hashTree(dir);
    const check = await runCli(['check', dir], root);
    expect(check.code).toBe(1);
    expect(check.out).toMatch(/^study\.json:\/files: error: The study has no data: none of its 2 files holds a data row.* — Add one row per observation/m);
    expect(check.out).toMatch(/^study\.json:\/variants: error: The manifest declares only the wild type.* — Add each variant you measured/m);
    expect(check.out).toMatch(/^2 error\(s\), 0 warning\(s\)\.$/m);
    expect(check.out + check.err).not.toMatch(CRASH);
    expect(hashTree(dir)).toEqual(before);
    figures.cleanErrors++;
  });

  const initFails = (name: string, where: (base: string) => string, text: RegExp) =>
    it(name, async () => {
      figures.cases++;
      const base = join(root, `init-${name.replace(/\W+/g, '-')}`);
      mkdirSync(base, { recursive: true });
      const target = where(base);
      const before = readdirSync(base).sort();
      const r = await runCli(['init', target], root);
      expect(r.code, r.out + r.err).toBe(1);
      expect(r.err).toMatch(text);
      expect(r.out + r.err).not.toMatch(CRASH);
      expect(readdirSync(base).sort(), 'nothing left behind').toEqual(before);
      figures.cleanErrors++;
    });

  initFails(
    'under a file',
    (base) => {
      writeFileSync(join(base, 'notes.txt'), 'a file, not a folder\n');
      return join(base, 'notes.txt', 'my-study');
    },
    /^myofolio init: cannot write the starter study to '.*': a part of the path is a file, not a folder\. Nothing was left behind/,
  );
  initFails(
    'on a file',
    (base) => {
      writeFileSync(join(base, 'taken'), 'x\n');
      return join(base, 'taken');
    },
    /exists and is not a folder/,
  );
  initFails(
    'on a dangling symbolic link',
    (base) => {
      symlinkSync(join(base, 'nowhere'), join(base, 'link'));
      return join(base, 'link');
    },
    /is a symbolic link to '.*nowhere', which does not exist\.\n  fix: remove the link/,
  );
  initFails(
    'in a place it may not write (a read-only file system, or a read-only folder)',
    (base) => {
      // As root, folder permissions do not bind: /proc refuses new folders to everyone.
      if (process.getuid?.() === 0) return join('/proc', `myofolio-${process.pid}`, 'my-study');
      const ro = join(base, 'ro');
      mkdirSync(ro, { mode: 0o555 });
      return join(ro, 'my-study');
    },
    /^myofolio init: cannot write the starter study to '.*': .+\. Nothing was left behind/,
  );

  it('an unknown kind in --assays is a usage error that suggests the kind meant', async () => {
    figures.cases++;
    const r = await runCli(['init', join(root, 'typo'), '--assays', 'turnovr'], root);
    expect(r.code).toBe(2);
    expect(r.err).toContain("'turnovr' is not an input kind or assay. Did you mean 'turnover'?");
    expect(existsSync(join(root, 'typo'))).toBe(false);
    expect(lstatSync(root).isDirectory()).toBe(true);
    figures.cleanErrors++;
  });
});

afterAll(() => rmSync(join(root, 'never'), { force: true }));
