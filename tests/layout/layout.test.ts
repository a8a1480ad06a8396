/**
 * Folders of src/ import downwards only: no cycle between folders, and none between the files of
 * one folder. The graph is read from the sources (tests/layout/import-graph.ts).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { cycles, folderOf, importEdges, importsOf } from './import-graph.js';

const SRC = join(import.meta.dirname, '..', '..', 'src');

describe('the import graph of src/', () => {
  const edges = importEdges(SRC);

  it('reads static, re-exported, type-only and dynamic imports, and ignores comments', () => {
    const text = ["import { a } from './a.js';", "import type { B } from '../b/b.js';", "export { c } from './c.js';", "const d = await import('./d.js');", "import './e.js';", "// import { x } from './commented.js';", "/* import { y } from './block.js'; */", "import { z } from 'vega';"].join('\n');
    expect(importsOf(text)).toEqual(['./a.js', '../b/b.js', './c.js', './d.js', './e.js']);
    expect(edges.length).toBeGreaterThan(100);
  });

  it('finds a cycle when there is one (the check can fail)', () => {
    expect(cycles([{ from: 'a', to: 'b' }, { from: 'b', to: 'c' }, { from: 'c', to: 'a' }, { from: 'c', to: 'd' }])).toEqual([['a', 'b', 'c']]);
    expect(cycles([{ from: 'a', to: 'b' }, { from: 'a', to: 'c' }, { from: 'b', to: 'c' }])).toEqual([]);
  });

  it('has no cycle between folders', () => {
    const between = edges.map((e) => ({ from: folderOf(e.from), to: folderOf(e.to) })).filter((e) => e.from !== e.to);
    expect(cycles(between)).toEqual([]);
  });

  it('has no cycle between files (so none within a folder such as src/cli/)', () => {
    expect(cycles(edges)).toEqual([]);
  });

  it('keeps the folder order: nothing below the pipeline imports it or the command line', () => {
    const upward = edges.filter((e) => !['cli', 'pipeline', 'bench'].includes(folderOf(e.from)) && ['cli', 'pipeline'].includes(folderOf(e.to)));
    expect(upward).toEqual([]);
    const intoCli = edges.filter((e) => folderOf(e.to) === 'cli' && folderOf(e.from) !== 'cli');
    expect(intoCli).toEqual([]);
  });
});
