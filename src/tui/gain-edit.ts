/**
 * One gain set as the screen edits it, and the controller structure around it: plain data the
 * reducer (state.ts) and the tuning aids' views (tuning-views.ts) both hold, kept in a file of its
 * own so neither of those imports the other.
 */
import type { ControllerSpec, ControllerStructure, GainSet, PidForm, StructureName } from '../model/types.js';

/**
 * What surrounds the edited PID law: the file's own controller structure, or a comparison
 * candidate's. The reducer reads the flags; `spec` is for the engine (engine.ts `frameOf`).
 */
export interface ControllerFrame {
  /** 'file' for the file's own controller; 'candidate:<name>' for a comparison candidate. */
  readonly id: string;
  /** Structure name (pi, i_pd, smith_pi, cascade ...). */
  readonly named: StructureName;
  /** The comparison candidate's name (null: the file's controller). */
  readonly candidate: string | null;
  /** False when the law's gains are not the ones that run (a gain schedule: its table holds them). */
  readonly editable: boolean;
  /** b and c are fixed by the structure's name (pi_d: 1, 0; i_pd: 0, 0): not offered for editing. */
  readonly fixedWeights: boolean;
  /** A structure around the law (Smith predictor, feedforward, cascade, schedule). */
  readonly extended: boolean;
  /** The resolved controller the engine builds around the edited gains. */
  readonly spec: ControllerSpec;
}

/** One gain set as edited: the form the user sees, its values, and the same set in ideal form. */
export interface GainEdit {
  readonly structure: ControllerStructure;
  readonly form: PidForm;
  /** Form parameters as shown (times in s, ki in 1/s). */
  readonly values: Readonly<Record<string, number>>;
  /** Ideal form, what the controller runs. n, b, c, antiWindup and trackingTime live only here. */
  readonly gains: GainSet;
  /** The structure around the law; absent = the file's own controller. */
  readonly frame?: ControllerFrame;
}
