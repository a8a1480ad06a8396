/**
 * The import graph of src/, read from the sources: every relative `import … from '…'`,
 * `export … from '…'` and `import('…')` of every .ts file (type-only imports included: they
 * still tie one folder to another). Used by the layout test; no library needed.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';

export interface ImportEdge {
  from: string;
  to: string;
}

function filesUnder(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? filesUnder(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []));
}

const SPECIFIER = /(?:\bfrom\s*|\bimport\s*\(\s*|\bimport\s+)['"]([^'"]+)['"]/g;

/** Relative specifiers imported by a source text (comments are removed first). */
export function importsOf(text: string): string[] {
  const code = text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:'"`])\/\/.*$/gm, '$1');
  return [...code.matchAll(SPECIFIER)].map((m) => m[1] as string).filter((s) => s.startsWith('.'));
}

/** Edges between source files of `srcDir`, as paths relative to it (a '.js' specifier names the '.ts' file). */
export function importEdges(srcDir: string): ImportEdge[] {
  const edges: ImportEdge[] = [];
  for (const file of filesUnder(srcDir)) {
    for (const spec of importsOf(readFileSync(file, 'utf8'))) {
      const target = resolve(dirname(file), spec).replace(/\.js$/, '.ts');
      const to = relative(srcDir, target);
      if (to.startsWith('..')) continue; // outside src/ (schemas, package.json)
      edges.push({ from: relative(srcDir, file), to });
    }
  }
  return edges;
}

/** The folder of a file under src/ ('study' for 'study/load.ts'; the file itself at the top level). */
export function folderOf(path: string): string {
  const i = path.indexOf('/');
  return i < 0 ? path : path.slice(0, i);
}

/**
 * Cycles of a directed graph: its strongly connected components of more than one node (or a
 * node importing itself), by Tarjan's algorithm. Each is returned sorted.
 */
export function cycles(edges: ReadonlyArray<ImportEdge>): string[][] {
  const next = new Map<string, Set<string>>();
  for (const { from, to } of edges) {
    if (!next.has(from)) next.set(from, new Set());
    if (!next.has(to)) next.set(to, new Set());
    next.get(from)!.add(to);
  }
  let counter = 0;
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const found: string[][] = [];
  const visit = (v: string): void => {
    index.set(v, counter);
    low.set(v, counter);
    counter++;
    stack.push(v);
    onStack.add(v);
    for (const w of next.get(v) ?? []) {
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, index.get(w)!));
    }
    if (low.get(v) === index.get(v)) {
      const component: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        component.push(w);
      } while (w !== v);
      if (component.length > 1 || next.get(v)?.has(v)) found.push(component.sort());
    }
  };
  for (const v of [...next.keys()].sort()) if (!index.has(v)) visit(v);
  return found;
}
