/**
 * The source tree's layers (DEVELOPERS.md, "Layers"): a module imports only
 * from its own area or from a lower layer, and no import circle exists.
 * Areas of one layer do not import each other. Type-only imports count: a
 * type import ties two modules as firmly for the next reader as a value does.
 *
 * Synthetic: the test sets the truth (the layer table below is the rule).
 */
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { findCycles, readImportGraph, stronglyConnected, type ImportGraph } from './import-graph.js';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));

/**
 * Bottom first. An area is a folder under src/ (src/engine/...), a single
 * file at src/'s top (src/server.ts is the area "server"), or a top folder
 * outside src/ that a source file imports (migrations/).
 */
const LAYERS: readonly { name: string; areas: readonly string[] }[] = [
  // Each stands alone: the engine computes, lib holds small shared pieces, domain the errors and roles,
  // migrations the schema's history.
  { name: 'foundations', areas: ['engine', 'lib', 'domain', 'migrations'] },
  // Pure readers of public station files into the engine's types.
  { name: 'station files', areas: ['station-archives'] },
  // Storage (SQL) and reports (pure: plain data in, text out) know nothing of each other.
  { name: 'storage and reports', areas: ['store', 'reports'] },
  { name: 'services', areas: ['services'] },
  // The edges: HTTP and the command line translate; config reads the environment; process-guard the process's faults.
  { name: 'edges', areas: ['http', 'cli', 'config', 'process-guard'] },
  // The composition root: configuration, database, migrations, the app.
  { name: 'server', areas: ['server'] },
  // The demo seeds a database and starts the server.
  { name: 'demo', areas: ['demo'] },
];

/**
 * Drawing stays at the edges: services hand plain data up and HTTP or the
 * command line draws it (charts, HTML). A chart's points (*-points.ts) are
 * data, not drawing. Statements are the exception by design (their stored
 * copies are renderings), so src/reports/statement is not drawing here.
 */
function isDrawing(path: string): boolean {
  return /^src\/reports\/(svg|html)\//.test(path) && !path.endsWith('-points.ts');
}

/**
 * Upward or sideways imports that exist today, allowed until they are fixed
 * (issue 18). Each entry must still exist: when one is fixed, delete it here,
 * so the list only shrinks.
 */
const ALLOWED_LAYER_VIOLATIONS: readonly string[] = [];

/**
 * Imports that close a circle today, allowed until it is broken; each must
 * still close a circle. Without them the graph must have none.
 */
const ALLOWED_CYCLE_EDGES: readonly string[] = [];

function areaOf(path: string): string {
  const parts = path.split('/');
  if (parts[0] !== 'src') return parts[0]!;
  return parts.length === 2 ? parts[1]!.replace(/\.ts$/, '') : parts[1]!;
}

const LAYER_OF = new Map(LAYERS.flatMap((layer, rank) => layer.areas.map((area) => [area, rank] as const)));

function layerViolations(graph: ImportGraph): { violations: string[]; unplaced: string[] } {
  const violations: string[] = [];
  const unplaced = new Set<string>();
  for (const [from, targets] of graph) {
    for (const to of targets) {
      const fromArea = areaOf(from);
      const toArea = areaOf(to);
      if (fromArea === toArea) continue;
      const fromRank = LAYER_OF.get(fromArea);
      const toRank = LAYER_OF.get(toArea);
      if (fromRank === undefined) unplaced.add(fromArea);
      if (toRank === undefined) unplaced.add(toArea);
      if (fromRank === undefined || toRank === undefined) continue;
      if (toRank >= fromRank || (fromArea === 'services' && isDrawing(to))) violations.push(`${from} -> ${to}`);
    }
  }
  return { violations: violations.sort(), unplaced: [...unplaced].sort() };
}

function describeViolation(edge: string): string {
  const [from, to] = edge.split(' -> ') as [string, string];
  if (areaOf(from) === 'services' && isDrawing(to))
    return `${edge} (a service draws: charts and HTML are drawn by http or cli)`;
  const fromLayer = LAYERS[LAYER_OF.get(areaOf(from))!]!.name;
  const toLayer = LAYERS[LAYER_OF.get(areaOf(to))!]!.name;
  return `${edge} (${areaOf(from)}, layer "${fromLayer}", imports ${areaOf(to)}, layer "${toLayer}")`;
}

const { graph, unresolved } = readImportGraph(ROOT, 'src');

describe('the import graph', () => {
  it('is read whole: every relative import names a file', () => {
    expect(graph.size).toBeGreaterThan(100); // the source tree has a few hundred modules
    expect(unresolved).toEqual([]);
  });

  it('places every area in a layer', () => {
    expect(layerViolations(graph).unplaced).toEqual([]);
  });
});

describe('layers', () => {
  const { violations } = layerViolations(graph);

  it('no module imports from its own layer or above, and no service draws, beyond the listed ones', () => {
    const unlisted = violations.filter((edge) => !ALLOWED_LAYER_VIOLATIONS.includes(edge));
    expect(unlisted.map(describeViolation)).toEqual([]);
  });

  it('every listed violation still exists (delete an entry once it is fixed)', () => {
    expect(ALLOWED_LAYER_VIOLATIONS.filter((edge) => !violations.includes(edge))).toEqual([]);
  });
});

describe('the circle finder', () => {
  // Synthetic: the test sets the truth.
  const toy: ImportGraph = new Map([
    ['a', new Set(['b'])],
    ['b', new Set(['c', 'd'])],
    ['c', new Set(['a'])],
    ['d', new Set<string>()],
    ['e', new Set(['f'])],
    ['f', new Set(['e'])],
  ]);

  it('reports each circle as a path back to its first module', () => {
    expect(findCycles(toy)).toEqual([
      ['a', 'b', 'c', 'a'],
      ['e', 'f', 'e'],
    ]);
  });

  it('leaves the ignored imports out', () => {
    expect(findCycles(toy, new Set(['c -> a', 'f -> e']))).toEqual([]);
  });
});

describe('import circles', () => {
  it('none, once the listed imports are left out', () => {
    const circles = findCycles(graph, new Set(ALLOWED_CYCLE_EDGES));
    expect(circles.map((circle) => circle.join(' -> '))).toEqual([]);
  });

  it('every listed import still closes a circle (delete an entry once its circle is broken)', () => {
    const stale = ALLOWED_CYCLE_EDGES.filter((edge) => {
      const others = new Set(ALLOWED_CYCLE_EDGES.filter((other) => other !== edge));
      const [from, to] = edge.split(' -> ') as [string, string];
      // With the edge kept, it closes a circle exactly when both ends fall in one strongly connected component.
      const closes =
        graph.get(from)?.has(to) === true &&
        stronglyConnected(graph, others).some((component) => component.includes(from) && component.includes(to));
      return !closes;
    });
    expect(stale).toEqual([]);
  });
});
