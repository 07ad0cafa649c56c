/**
 * Runs a long computation in slices from timers, so that keys and frames are handled between
 * them: `step` does one slice and says whether the work is finished.
 */

export class SliceRunner {
  private timer: ReturnType<typeof setTimeout> | null = null;

  /** @param gapMs pause between slices, ms (a timer, so input and drawing run in between) */
  constructor(private readonly gapMs = 0) {}

  get running(): boolean {
    return this.timer !== null;
  }

  /**
   * Start (any running work is stopped first). `after` runs after each slice with whether the
   * work is finished; an exception thrown by `step` stops the run and goes to `fail`.
   */
  start(step: () => boolean, after: (finished: boolean) => void, fail: (error: Error) => void, firstDelayMs = this.gapMs): void {
    this.stop();
    const tick = (): void => {
      this.timer = null;
      let finished: boolean;
      try {
        finished = step();
      } catch (error) {
        fail(error instanceof Error ? error : new Error(String(error)));
        return;
      }
      if (!finished) this.timer = setTimeout(tick, this.gapMs);
      after(finished);
    };
    this.timer = setTimeout(tick, firstDelayMs);
  }

  stop(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
  }
}
