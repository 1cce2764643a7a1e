/**
 * The import graph of the source tree, read with TypeScript's own scanner
 * (`ts.preProcessFile`): every static import and re-export, `import type`
 * included, and every dynamic `import()`. Only relative specifiers make
 * edges; packages and `node:` modules are outside the graph. Paths are
 * repository-relative with forward slashes ("src/http/app.ts").
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, sep } from 'node:path';
import ts from 'typescript';

/** One file's imports of other files of the repository. */
export type ImportGraph = Map<string, Set<string>>;

/** An import whose target is not a file of the repository (a typo the compiler would also refuse). */
export interface UnresolvedImport {
  from: string;
  specifier: string;
}

function toRepoPath(root: string, absolute: string): string {
  return relative(root, absolute).split(sep).join('/');
}

function sourceFiles(directory: string): string[] {
  const files: string[] = [];
  for (const entry of readdirSync(directory, { withFileTypes: true })) {
    const path = join(directory, entry.name);
    if (entry.isDirectory()) files.push(...sourceFiles(path));
    else if (entry.name.endsWith('.ts')) files.push(path);
  }
  return files.sort();
}

/** "./x.js" from src/a/b.ts → src/a/x.ts (ESM imports name the compiled .js; the source is .ts). */
function resolveSpecifier(root: string, fromAbsolute: string, specifier: string): string | null {
  const base = join(dirname(fromAbsolute), specifier);
  const candidates = [base.replace(/\.js$/, '.ts'), base, `${base}.ts`, join(base, 'index.ts')];
  const found = candidates.find((candidate) => existsSync(candidate) && candidate.endsWith('.ts'));
  return found === undefined ? null : toRepoPath(root, found);
}

/** Reads every .ts file under `root/directory` and the files they import (which may lie outside it). */
export function readImportGraph(
  root: string,
  directory: string,
): { graph: ImportGraph; unresolved: UnresolvedImport[] } {
  const graph: ImportGraph = new Map();
  const unresolved: UnresolvedImport[] = [];
  for (const absolute of sourceFiles(join(root, directory))) {
    const from = toRepoPath(root, absolute);
    const targets = new Set<string>();
    const { importedFiles } = ts.preProcessFile(readFileSync(absolute, 'utf8'), true, true);
    for (const { fileName: specifier } of importedFiles) {
      if (!specifier.startsWith('.')) continue;
      const target = resolveSpecifier(root, absolute, specifier);
      if (target === null) unresolved.push({ from, specifier });
      else if (target !== from) targets.add(target);
    }
    graph.set(from, targets);
  }
  return { graph, unresolved };
}

function edgesWithout(graph: ImportGraph, ignored: ReadonlySet<string>): (from: string) => string[] {
  return (from) => [...(graph.get(from) ?? [])].filter((to) => !ignored.has(`${from} -> ${to}`)).sort();
}

/**
 * The graph's circles: one per strongly connected component of more than one
 * file, each given as a shortest path from its first file (in sort order)
 * back to itself, e.g. [a, b, a]. Edges in `ignored` ("from -> to") are left
 * out first.
 */
export function findCycles(graph: ImportGraph, ignored: ReadonlySet<string> = new Set()): string[][] {
  const edges = edgesWithout(graph, ignored);
  return stronglyConnected(graph, ignored)
    .map((component) => shortestCircle(component, edges))
    .sort((a, b) => a[0]!.localeCompare(b[0]!));
}

/** The strongly connected components of more than one file (Tarjan's algorithm), each sorted. */
export function stronglyConnected(graph: ImportGraph, ignored: ReadonlySet<string> = new Set()): string[][] {
  const edges = edgesWithout(graph, ignored);
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const onStack = new Set<string>();
  const stack: string[] = [];
  const components: string[][] = [];
  let next = 0;

  // Iterative Tarjan: the source tree is small, but a recursion depth tied to the input is avoided anyway.
  for (const start of [...graph.keys()].sort()) {
    if (index.has(start)) continue;
    const work: { node: string; children: string[]; at: number }[] = [{ node: start, children: edges(start), at: 0 }];
    index.set(start, next);
    low.set(start, next++);
    stack.push(start);
    onStack.add(start);
    while (work.length > 0) {
      const frame = work[work.length - 1]!;
      if (frame.at < frame.children.length) {
        const child = frame.children[frame.at++]!;
        if (!index.has(child)) {
          index.set(child, next);
          low.set(child, next++);
          stack.push(child);
          onStack.add(child);
          work.push({ node: child, children: edges(child), at: 0 });
        } else if (onStack.has(child)) {
          low.set(frame.node, Math.min(low.get(frame.node)!, index.get(child)!));
        }
        continue;
      }
      work.pop();
      const parent = work[work.length - 1];
      if (parent) low.set(parent.node, Math.min(low.get(parent.node)!, low.get(frame.node)!));
      if (low.get(frame.node) === index.get(frame.node)) {
        const component: string[] = [];
        let member: string;
        do {
          member = stack.pop()!;
          onStack.delete(member);
          component.push(member);
        } while (member !== frame.node);
        if (component.length > 1) components.push(component.sort());
      }
    }
  }
  return components;
}

/** Breadth-first from the component's first file back to it, staying inside the component. */
function shortestCircle(component: string[], edges: (from: string) => string[]): string[] {
  const members = new Set(component);
  const start = component[0]!;
  const previous = new Map<string, string>();
  const queue = [start];
  for (let head = 0; head < queue.length; head++) {
    const node = queue[head]!;
    for (const to of edges(node)) {
      if (!members.has(to)) continue;
      if (to === start) {
        const path = [start];
        for (let at: string | undefined = node; at !== undefined && at !== start; at = previous.get(at)) path.push(at);
        return [start, ...path.slice(1).reverse(), start];
      }
      if (!previous.has(to)) {
        previous.set(to, node);
        queue.push(to);
      }
    }
  }
  return [...component, start];
}
