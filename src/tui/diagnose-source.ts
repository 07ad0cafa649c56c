/**
 * The notices panel's source when the diagnose core is there: its flags about the plant (made
 * once, when the screen first asks), and the loop margins of each edited gain set at the trial's
 * operating points the diagnosis prepared (loop/'s worst over the points, as check and the tuning
 * commands report them; an edit only re-evaluates the controller factors).
 */
import { diagnosePlant, type Diagnosis, type Flag } from '../diagnose/index.js';
import { pointFigures, worstMargins, worstPoint } from '../loop/index.js';
import type { PlantSpec } from '../model/types.js';
import type { MarginsView, Notice, NoticeSource } from './notices.js';

const TONE: Record<Flag['severity'], Notice['tone']> = { info: 'info', warning: 'warn', severe: 'bad' };

/** One flag as a notice: its kind in words, then the diagnosis's own advice. */
export function flagNotice(f: Flag): Notice {
  return { tone: TONE[f.severity], title: f.kind.replace(/_/g, ' '), text: f.advice };
}

export function diagnoseSource(plant: PlantSpec): NoticeSource {
  let diagnosis: Diagnosis | null | undefined;
  let failure = '';
  const get = (): Diagnosis | null => {
    if (diagnosis === undefined) {
      try {
        diagnosis = diagnosePlant(plant);
      } catch (error) {
        // The screen stays usable without a diagnosis; the panel says why there is none.
        diagnosis = null;
        failure = (error as Error).message;
      }
    }
    return diagnosis;
  };
  return {
    available: true,
    plantNotices: () => {
      const d = get();
      if (d === null) return [{ tone: 'warn', text: `diagnosis failed: ${failure}` }];
      if (d.flags.length === 0) return [{ tone: 'info', text: 'diagnosis: no flags; plain PID suits this loop' }];
      return d.flags.map(flagNotice);
    },
    margins: (gains): MarginsView | null => {
      const d = get();
      if (d === null) return null;
      // The closed-loop poles cost more than the margins: only when the file asks for damping.
      const withDamping = plant.loop.requirements.dampingRatio !== undefined;
      const figures = pointFigures(d.points, gains, plant, withDamping);
      const m = worstMargins(figures);
      if (m === null) return null;
      return {
        gainMargin: m.gainMargin,
        phaseMarginDeg: m.phaseMarginDeg,
        maxSensitivity: m.maxSensitivity,
        // The worst point as check's requirement rows take it (loop's worstPoint).
        bandwidth: worstPoint(figures, 'bandwidth').value,
        ...(withDamping && { dampingRatio: worstPoint(figures, 'dampingRatio').value }),
        closedLoopStable: m.closedLoopStable,
        // Where they were read: the one level when GM, PM and Ms are all worst there.
        ...(figures.length > 1 &&
          (m.worstAt.gm === m.worstAt.pm && m.worstAt.pm === m.worstAt.ms ? { level: figures[m.worstAt.ms].point.level } : { points: figures.length })),
      };
    },
  };
}
