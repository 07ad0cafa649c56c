/**
 * The one map from a controller structure name to the PID law it runs. The plant file reader
 * uses it to read the law's terms, tune/ to choose the law it tunes and compare to build its
 * candidates, so a structure means the same law everywhere.
 *
 * - p, pi, pd, pid: the law of that name.
 * - pi_d, i_pd: setpoint weights by name (b 1 / b 0, c 0) of the PID law.
 * - smith_pi: a PI inside the predictor (the structure's name says so).
 * - feedforward, cascade, scheduled: these wrap a feedback law without naming it; the law is
 *   what the file's controller writes: PID when it has derivative action (td > 0, a schedule row
 *   with td > 0), else PI.
 */
import type { ControllerStructure, StructureName } from './types.js';

/**
 * The PID law a structure runs.
 * @param derivative whether the file's controller writes derivative action (td > 0); only the
 *   wrapping structures (feedforward, cascade, scheduled) read it. Pass true for the widest law
 *   a structure may write, i.e. which terms its block may hold.
 */
export function structureLaw(name: StructureName, derivative: boolean): ControllerStructure {
  switch (name) {
    case 'p':
    case 'pi':
    case 'pd':
    case 'pid':
      return name;
    case 'pi_d':
    case 'i_pd':
      return 'pid';
    case 'smith_pi':
      return 'pi';
    case 'feedforward':
    case 'cascade':
    case 'scheduled':
      return derivative ? 'pid' : 'pi';
  }
}
