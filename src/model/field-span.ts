/**
 * Where a field of a plant file is written, for messages about values the loader accepted but a
 * later check refuses (the resource budget): `fieldSpan(text, ['loop', 'trial', 'duration'])`.
 */
import type { Span } from './types.js';
import { parsePlantYaml, type YNode } from './yaml-doc.js';

/**
 * The span of the value at `path` in the plant file `text`. When the path stops early (a field
 * left out, e.g. `loop.step` when the step is chosen), the key of the deepest field that is
 * written; [0, 0] when not even the first is.
 */
export function fieldSpan(text: string, path: readonly string[]): Span {
  let node: YNode | null = parsePlantYaml(text).root;
  let span: Span = [0, 0];
  for (let i = 0; i < path.length; i++) {
    if (node === null || node.kind !== 'map') break;
    const entry = node.entries.find((e) => e.key === path[i]);
    if (entry === undefined) break;
    span = i === path.length - 1 ? entry.value.span : entry.keySpan;
    node = entry.value;
  }
  return span;
}
