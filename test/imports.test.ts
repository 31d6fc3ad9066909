import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const sourceFolder = resolve(import.meta.dirname, '../src');

function sourceFiles(folder: string): string[] {
  return readdirSync(folder, { withFileTypes: true }).flatMap((entry) => {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) return sourceFiles(path);
    return /\.(ts|mjs)$/.test(entry.name) ? [path] : [];
  });
}

/** Every relative import and re-export of each module, type-only ones included: a circle of types is still a circle. */
function importGraph(): Map<string, string[]> {
  const graph = new Map<string, string[]>();
  for (const file of sourceFiles(sourceFolder)) {
    const text = readFileSync(file, 'utf8');
    const targets = [...text.matchAll(/^\s*(?:import|export)\b[^'";]*?\bfrom\s+'(\.[^']+)'/gm)].map((match) => resolve(dirname(file), match[1]!));
    graph.set(file, targets);
  }
  return graph;
}

function importCircles(graph: Map<string, string[]>): string[] {
  const circles: string[] = [];
  const state = new Map<string, 'open' | 'done'>();
  const visit = (file: string, path: string[]) => {
    state.set(file, 'open');
    path.push(file);
    for (const target of graph.get(file) ?? []) {
      if (state.get(target) === 'open') {
        circles.push([...path.slice(path.indexOf(target)), target].map((each) => relative(sourceFolder, each)).join(' -> '));
      } else if (!state.has(target)) visit(target, path);
    }
    path.pop();
    state.set(file, 'done');
  };
  for (const file of graph.keys()) if (!state.has(file)) visit(file, []);
  return circles;
}

describe('the module layout', () => {
  it('has no import circle in src, not even one of types only', () => {
    expect(importCircles(importGraph())).toEqual([]);
  });
});

/** The modules a module loads when it runs: relative imports that are not type-only, followed to the end. */
function loadedAtStart(entry: string): string[] {
  const reached = new Set<string>();
  const visit = (file: string) => {
    if (reached.has(file)) return;
    reached.add(file);
    const text = readFileSync(file, 'utf8');
    for (const match of text.matchAll(/^\s*(?:import|export)\s+(?!type\b)[^'";]*?\bfrom\s+'(\.[^']+)'/gm)) visit(resolve(dirname(file), match[1]!));
  };
  visit(entry);
  return [...reached].map((file) => relative(sourceFolder, file));
}

describe('the command line at start-up', () => {
  // --help and usage errors answer before any stage of a command is loaded; each command loads its own on demand.
  it('loads neither the study parser, the pipeline, the report nor the archive before a command runs', () => {
    const heavy = loadedAtStart(join(sourceFolder, 'cli/main.ts')).filter((file) =>
      /^(study\/parse|pipeline|report\/|archive\/|execute\/session)/.test(file),
    );
    expect(heavy).toEqual([]);
  });
});
