/**
 * Writing the edited gain set into the plant file: read what is on disk now, refuse to write over
 * a file changed since loading (the reducer then asks), plan the edit on the text, check that the
 * result loads, and write it through the CLI's writer.
 */
import { useRef } from 'react';
import { gainNote, loadPlant } from '../../model/index.js';
import type { PidForm } from '../../model/types.js';
import { planSave } from '../save-gains.js';
import type { Action, ScreenState } from '../screen-state.js';

/** File access the screen needs; tests pass a fake, the command passes the real files. */
export interface ScreenIo {
  /** Read the file; an error with `code` 'ENOENT' means it is gone (a save writes it anew). */
  readText(path: string): string;
  /**
   * Write the file keeping its link, mode and owner (the CLI's writer). Returns sentences about
   * anything unusual (a link followed, a non-atomic write, the file recreated); fakes may not.
   */
  writeText(path: string, text: string, options?: { expectExisting?: boolean }): { notes: readonly string[] } | void;
}

export interface SaveTarget {
  io: ScreenIo;
  /** Path used for reading and writing. */
  filePath: string;
  /** Name shown in messages. */
  fileName: string;
  /** The file text as loaded. */
  text: string;
  /** The form the file writes its gains in. */
  fileForm: PidForm;
}

/** A function that saves the state's edited set (`onDiskText`: write into the text now on disk, after a conflict was accepted). */
export function useSave(target: SaveTarget, dispatch: (a: Action) => void): (state: ScreenState, onDiskText: boolean, structure: boolean) => void {
  const loaded = useRef(target.text);
  return (state, onDiskText, structure) => {
    const { io, filePath, fileName } = target;
    // null: the file was deleted since loading; the loaded text gets the edit and is written anew.
    let disk: string | null;
    try {
      disk = io.readText(filePath);
    } catch (error) {
      if ((error as { code?: string }).code !== 'ENOENT') {
        // Unreadable is not absent: never write over a file we could not compare.
        dispatch({ type: 'save_failed', text: `not written: cannot read ${fileName}: ${(error as Error).message}` });
        return;
      }
      disk = null;
    }
    if (!onDiskText && disk !== null && disk !== loaded.current) {
      dispatch({ type: 'save_conflict', structure });
      return;
    }
    // The record beside each saved value: today's date and where the gains came from.
    const base = onDiskText && disk !== null ? disk : loaded.current;
    const plan = planSave(base, state.file, state.current, target.fileForm, gainNote(new Date().toISOString().slice(0, 10), 'screen'), { structure });
    if (!plan.ok) {
      dispatch({ type: 'save_failed', text: `not written: ${plan.error}` });
      return;
    }
    // Never write a file the loader would reject.
    const check = loadPlant(plan.text, fileName);
    if (check.plant === undefined) {
      dispatch({ type: 'save_failed', text: `not written: the edited file would not load (${check.diagnostics[0]?.message ?? 'unknown error'})` });
      return;
    }
    let notes: readonly string[];
    try {
      notes = io.writeText(filePath, plan.text, { expectExisting: true })?.notes ?? [];
    } catch (error) {
      dispatch({ type: 'save_failed', text: `cannot write ${fileName}: ${(error as Error).message}` });
      return;
    }
    loaded.current = plan.text;
    dispatch({ type: 'saved', notes: plan.formNote === null ? notes : [...notes, plan.formNote], warn: notes.length > 0 });
  };
}
