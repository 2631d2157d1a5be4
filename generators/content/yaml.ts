/**
 * YAML with positions: the parsed value plus a locator from a field path to its line and column,
 * so that schema errors can point at the line the user wrote. Pure (no file access).
 */
import { isMap, isScalar, isSeq, LineCounter, parseDocument, type Node as YamlNode } from 'yaml';
import { KilnInputError } from '../errors.ts';

export type FieldPath = readonly (string | number)[];
export interface Position {
  line: number;
  column: number;
}

export interface YamlText {
  file: string;
  value: unknown;
  /** Line of the deepest existing node on `path` (the key where there is one). */
  locate(path: FieldPath): Position | undefined;
}

/** Alias expansions allowed per document: content files need few; a bomb needs millions (common practice, no source). */
export const MAX_ALIAS_COUNT = 100;

export function parseYaml(text: string, file: string): YamlText {
  const lineCounter = new LineCounter();
  // YAML 1.2 core schema: dates stay strings; duplicate keys are errors.
  const doc = parseDocument(text, { lineCounter, prettyErrors: false, uniqueKeys: true, version: '1.2' });
  const problem = doc.errors[0] ?? doc.warnings[0];
  if (problem) {
    const pos = lineCounter.linePos(problem.pos[0]);
    throw new KilnInputError(`YAML syntax: ${problem.message.split('\n')[0]}`, {
      file,
      line: pos.line,
      field: `column ${pos.col}`,
      expected: 'well-formed YAML',
    });
  }
  let value: unknown;
  try {
    value = doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (e) {
    // The parser's own guard against alias bombs ("billion laughs") and other resolution errors.
    throw new KilnInputError(`YAML could not be resolved: ${(e instanceof Error ? e.message : String(e)).split('\n')[0]}`, {
      file,
      expected: `well-formed YAML with at most ${MAX_ALIAS_COUNT} alias expansions`,
    });
  }
  const at = (offset: number): Position => {
    const p = lineCounter.linePos(offset);
    return { line: p.line, column: p.col };
  };
  const locate = (path: FieldPath): Position | undefined => {
    let node: unknown = doc.contents;
    let best: Position | undefined = node && (node as YamlNode).range ? at((node as YamlNode).range![0]) : undefined;
    for (const seg of path) {
      if (isMap(node)) {
        const pair = node.items.find((p) => (isScalar(p.key) ? String(p.key.value) : String(p.key)) === String(seg));
        if (!pair) break;
        const key = pair.key as YamlNode | null;
        if (key?.range) best = at(key.range[0]);
        node = pair.value;
      } else if (isSeq(node) && typeof seg === 'number') {
        const item = node.items[seg] as YamlNode | undefined;
        if (!item) break;
        if (item.range) best = at(item.range[0]);
        node = item;
      } else break;
    }
    return best;
  };
  return { file, value, locate };
}
