import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

// The project's own layering rules (DEVELOPERS.md, "Layout"): a functional core and a thin shell.
const ROOT = resolve(import.meta.dirname, '..');
const SRC = join(ROOT, 'src');
/** Pure, synchronous folders: no I/O, no clock, no process. */
const CORE = ['pitch', 'tuning', 'midi', 'spelling', 'router', 'chart', 'synth', 'render', 'text', 'score'];
/** The shell: ports, terminal, files, commands, servers. */
const SHELL = ['cli', 'live', 'io', 'page'];
/** Node modules that do I/O or reach the process: the core never imports them. */
const IO_MODULES = /^(node:)?(fs|fs\/promises|child_process|net|http|https|dgram|os|process|readline|worker_threads|tty)$/u;

function files(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? files(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []));
}

/** Every module a file imports (static, re-exports and dynamic), as written. */
function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  for (const m of text.matchAll(/(?:^|\n)\s*(?:import|export)\s[^'";]*?from\s*'([^']+)'/gu)) found.push(m[1]!);
  for (const m of text.matchAll(/(?:^|\n)\s*import\s*'([^']+)'/gu)) found.push(m[1]!);
  for (const m of text.matchAll(/\bimport\(\s*'([^']+)'\s*\)/gu)) found.push(m[1]!);
  return found;
}

const folderOf = (file: string): string => relative(SRC, file).split('/')[0] ?? '';
const sourceFiles = files(SRC);
/** Cycles are looked for in the benches too. */
const graphFiles = [...sourceFiles, ...files(join(ROOT, 'bench'))];
const graph = new Map<string, string[]>(
  graphFiles.map((f) => [f, importsOf(f).filter((s) => s.startsWith('.')).map((s) => resolve(dirname(f), s.replace(/\.js$/u, '.ts')))]),
);

/** Strongly connected components of more than one file (Tarjan), i.e. import cycles. */
function cycles(): string[][] {
  let index = 0;
  const order = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const found: string[][] = [];
  const visit = (v: string): void => {
    order.set(v, index);
    low.set(v, index++);
    stack.push(v);
    onStack.add(v);
    for (const w of graph.get(v) ?? []) {
      if (!graph.has(w)) continue;
      if (!order.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, order.get(w)!));
    }
    if (low.get(v) === order.get(v)) {
      const component: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        component.push(relative(ROOT, w));
      } while (w !== v);
      if (component.length > 1) found.push(component.sort());
    }
  };
  for (const v of graph.keys()) if (!order.has(v)) visit(v);
  return found;
}

describe('the import structure', () => {
  it('has no import cycle', () => {
    expect(cycles()).toEqual([]);
  });

  it('never has a core folder import the shell, or a module that does I/O', () => {
    const wrong: string[] = [];
    for (const file of sourceFiles) {
      if (!CORE.includes(folderOf(file))) continue;
      for (const target of graph.get(file) ?? []) if (SHELL.includes(folderOf(target))) wrong.push(`${relative(ROOT, file)} → ${relative(ROOT, target)}`);
      for (const spec of importsOf(file)) if (IO_MODULES.test(spec)) wrong.push(`${relative(ROOT, file)} → ${spec}`);
    }
    expect(wrong).toEqual([]);
  });

  it('keeps the core free of files and streams: only the shell and the loaders reach src/util/files.ts', () => {
    const wrong = sourceFiles.filter((f) => CORE.includes(folderOf(f)) && (graph.get(f) ?? []).some((t) => t.endsWith(join('util', 'files.ts'))));
    expect(wrong.map((f) => relative(ROOT, f))).toEqual([]);
  });
});

/** A path that leaves the repository for the folder beside it (built from parts, so this file does not name it). */
const BESIDE = new RegExp(['(\\.\\./)+', 'sha', 'red/corpus', "|'\\.\\.',\\s*'sha", "red'", '|(\\.\\./){3}sha', 'red'].join(''), 'u');

describe('a fresh clone has everything its tests and benchmarks read', () => {
  it('no test or benchmark reads a folder beside the repository', () => {
    const readers = [...files(join(ROOT, 'test')), ...files(join(ROOT, 'bench'))].filter((f) => {
      const code = readFileSync(f, 'utf8')
        .split('\n')
        .filter((line) => !/^\s*(\/\/|\*)/u.test(line))
        .join('\n');
      return BESIDE.test(code);
    });
    expect(readers.map((f) => relative(ROOT, f))).toEqual([]);
  });

  it('the corpora the tests use are in the repository, each with its license', () => {
    for (const name of ['mozart', 'mozart-scores', 'scarlatti', 'bach-suites', 'schuetz', 'corelli']) {
      const entries = readdirSync(join(ROOT, 'corpus', name));
      expect(entries, name).toContain('LICENSE.md');
      expect(entries.length, name).toBeGreaterThan(10);
    }
  });
});
