/**
 * The import graph of the code under server/ and src/ (type imports included), read from the
 * source text: relative paths and the aliases @/ (src/) and @schemas/ (server/schemas/).
 */
import fs from 'node:fs';
import path from 'node:path';

const IMPORT = /^\s*(?:import|export)\s[^'"]*?from\s+['"]([^'"]+)['"]|^\s*import\s+['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)/gm;

export function sourceFiles(root: string, dirs: string[]): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(p);
      else if (/\.(ts|tsx)$/.test(entry.name) && !entry.name.endsWith('.d.ts')) out.push(path.relative(root, p));
    }
  };
  for (const d of dirs) walk(path.join(root, d));
  return out.sort();
}

function resolve(root: string, from: string, spec: string): string | null {
  let base: string;
  if (spec.startsWith('@/')) base = path.join('src', spec.slice(2));
  else if (spec.startsWith('@schemas/')) base = path.join('server', 'schemas', spec.slice('@schemas/'.length));
  else if (spec.startsWith('.')) base = path.join(path.dirname(from), spec);
  else return null; // a package
  const bare = base.replace(/\.(js|ts|tsx|mjs)$/, '');
  for (const candidate of [`${bare}.ts`, `${bare}.tsx`, path.join(bare, 'index.ts')]) {
    if (fs.existsSync(path.join(root, candidate))) return path.normalize(candidate);
  }
  return null;
}

/** file → the project files it imports. */
export function importGraph(root: string, files: string[]): Map<string, string[]> {
  const graph = new Map<string, string[]>();
  for (const file of files) {
    const text = fs.readFileSync(path.join(root, file), 'utf8');
    const targets = new Set<string>();
    for (const m of text.matchAll(IMPORT)) {
      const target = resolve(root, file, m[1] ?? m[2] ?? m[3]);
      if (target) targets.add(target);
    }
    graph.set(file, [...targets]);
  }
  return graph;
}

/** The strongly connected components with more than one file (import circles), by Tarjan's algorithm. */
export function importCircles(graph: Map<string, string[]>): string[][] {
  let index = 0;
  const indices = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const circles: string[][] = [];
  const visit = (v: string) => {
    indices.set(v, index);
    low.set(v, index++);
    stack.push(v);
    onStack.add(v);
    for (const w of graph.get(v) ?? []) {
      if (!indices.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, indices.get(w)!));
    }
    if (low.get(v) === indices.get(v)) {
      const component: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        component.push(w);
      } while (w !== v);
      if (component.length > 1) circles.push(component.sort());
    }
  };
  for (const v of graph.keys()) if (!indices.has(v)) visit(v);
  return circles;
}
