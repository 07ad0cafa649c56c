/**
 * The comparison's candidates as gain sets the screen can edit. A candidate that is the file's
 * own kind of controller (same structure name, no structure around the law on either side) is
 * edited in the file's frame, so it can be saved; any other one runs in its own frame (its
 * resolved structure, model-derived values as the comparison set them up) and cannot be written
 * into the file. A gain schedule's gains are in its table: shown, read-only.
 */
import type { CompareResult } from '../tune/index.js';
import { runnable } from './compare-view.js';
import { editWithGains, fileFrame, frameOf, structureName, type LoopSetup } from './engine.js';
import { frameId, sameEdit, type GainEdit } from './gain-edit.js';
import type { CandidateEntry } from './tuning-views.js';

/** Entries for the candidates that ran (the indexing of compare-view's `runnable`), in `form` where it holds them. */
export function candidateEntries(setup: LoopSetup, result: CompareResult, form: GainEdit['form']): CandidateEntry[] {
  const file = setup.controller;
  return runnable(result).map((c) => {
    const spec = c.controller!;
    const plainLikeFile = spec.extension === undefined && file.extension === undefined && structureName(spec) === structureName(file);
    const frame = plainLikeFile ? fileFrame(setup) : frameOf(spec, `candidate:${c.name}`, c.name);
    return { name: c.name, structure: c.structure, edit: editWithGains(spec.gains, spec.structure, form, frame) };
  });
}

/** The entry the current gain set already is: the candidate of its frame, or a file-frame candidate with the same gains. */
export function editedEntry(entries: readonly CandidateEntry[], current: GainEdit): number | null {
  const byFrame = entries.findIndex((e) => e.edit.frame?.candidate != null && frameId(e.edit) === frameId(current));
  if (byFrame >= 0) return byFrame;
  const same = entries.findIndex((e) => sameEdit(e.edit, current));
  return same >= 0 ? same : null;
}
