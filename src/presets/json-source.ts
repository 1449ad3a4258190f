import { findNodeAtLocation, parseTree, printParseErrorCode, type Node, type ParseError } from 'jsonc-parser';
import { UserError } from '../util/errors.js';

/** A JSON file's value, with the lines its parts came from (for `FILE:LINE:` problems). */
export interface JsonSource {
  readonly value: unknown;
  /** The 1-based line of the part at a JSON path (`$.output.channels`, `$.controls[2].key`), or of its nearest parent. */
  lineOf(path: string): number | undefined;
}

/** `$.a.b[2]` → `['a', 'b', 2]`. */
export function pathSegments(path: string): Array<string | number> {
  const segments: Array<string | number> = [];
  for (const m of path.replace(/^\$/u, '').matchAll(/\.([^.[\]]+)|\[(\d+)\]/gu)) segments.push(m[2] !== undefined ? Number(m[2]) : m[1]!);
  return segments;
}

function lineAt(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      start = i + 1;
    }
  }
  return { line, column: offset - start + 1 };
}

/**
 * Parses a setup or tuning file as a player may write it: JSON with `//` and `/* *\/` comments and
 * trailing commas. A syntax error is one line naming the file, line and column.
 */
export function parseJsonSource(text: string, file: string): JsonSource {
  if (text.startsWith('MThd')) throw new UserError(`${file}: a Standard MIDI File, not a JSON setup, tuning or programme (diesis spell previews a piece)`);
  if (text.includes('\u0000')) throw new UserError(`${file}: not a text file; setups, tunings and programmes are JSON`);
  const errors: ParseError[] = [];
  const root: Node | undefined = parseTree(text, errors, { allowTrailingComma: true, disallowComments: false, allowEmptyContent: false });
  const first = errors[0];
  if (first || !root) {
    const at = lineAt(text, first?.offset ?? 0);
    const what = first ? printParseErrorCode(first.error).replace(/([a-z])([A-Z])/gu, '$1 $2').toLowerCase() : 'empty file';
    throw new UserError(`${file}:${at.line}:${at.column}: not valid JSON: ${what}`);
  }
  const value = nodeValue(root);
  return {
    value,
    lineOf(path) {
      const segments = pathSegments(path);
      for (let n = segments.length; n >= 0; n--) {
        const node = findNodeAtLocation(root, segments.slice(0, n));
        if (node) return lineAt(text, (node.parent?.type === 'property' ? node.parent.offset : node.offset)).line;
      }
      return undefined;
    },
  };
}

/** The plain value of a parse-tree node (the tree keeps offsets; this drops them). */
function nodeValue(node: Node): unknown {
  switch (node.type) {
    case 'object':
      return Object.fromEntries((node.children ?? []).map((p) => [p.children?.[0]?.value as string, p.children?.[1] ? nodeValue(p.children[1]) : undefined]));
    case 'array':
      return (node.children ?? []).map(nodeValue);
    default:
      return node.value as unknown;
  }
}
