/** Help text of the command line (our own wording). Each command also answers `--help`. */
export const USAGE = `looprig - try PID gains on a simulated process before touching the real one

Usage:
  looprig [FILE]                 the terminal screen on FILE (no FILE: the bundled demo plant);
                                 without a terminal, the run summary instead
  looprig run FILE [options]     simulate the file's trial and report metrics and requirements
  looprig check FILE|DIR...      validate plant files, run their trials, check their requirements
                                 (exit 0 all pass, 1 a requirement failed, 2 an invalid file)
  looprig diagnose FILE          is plain PID enough? operating point, poles and zeros, margins, flags
  looprig suggest FILE           every published tuning rule, each simulated on the full plant
  looprig optimize FILE          gains that minimise IAE (or ITAE) subject to Ms <= 1.6; --write saves
  looprig compare FILE           controller structures side by side, each tuned to the same Ms
  looprig diff FILE [--from REV] [--to REV]
                                 what a change to a plant file does to its loop between two git
                                 revisions (or: looprig diff OLD.yaml NEW.yaml); --markdown for a
                                 pull-request comment (exit 1 when a requirement newly fails)
  looprig fit LOG.csv            fit a model to a logged bump test; --out writes a plant file;
                                 --setpoint COL for a log of the loop in automatic; --plant FILE
                                 validates a plant file (--params A,B estimates its params)
  looprig bump-plan [FILE]       plan a bump test (step size, interval, timing, PRBS) and write it
                                 as a trial to rehearse
  looprig export FILE            the gains in your controller's form and units, and discrete
                                 velocity-form coefficients
  looprig schema                 print the JSON Schema of plant files (for editors)
  looprig help                   show this text
  looprig --version              print the version
  looprig COMMAND --help         the options of one command

Options for run:
  --json              print one JSON document on stdout instead of the summary
  --csv OUT           also write the trace (t, setpoint, output, measured, u, disturbances) to OUT
  --svg OUT           also write a plot of the trial (setpoint, output, controller output,
                      requirement bands; with --set, the file's gains as the set in service) to OUT
  --svg-frequency OUT also write the loop's frequency plots (Bode magnitude and phase of L with the
                      crossovers, |S| and |T| with Ms and Mt, Nyquist with the 1/Ms circle) at the
                      worst operating point to OUT (with --set, the file's gains in service as well)
  --set NAME=VALUE    override a controller field in the file's form, e.g. --set kc=2.5 --set ti=40s
                      (repeatable; times may carry a unit: ms, s, min, h)
  --duration T        override the trial duration, e.g. --duration 20min
  --step DT           override the integration step, e.g. --step 0.01s
  --tweak             print the tweak guide: what +10 % and -10 % on each controller parameter do
                      to rise, overshoot, settling, IAE, peak output, travel and Ms, simulated
                      (--json always carries it under "tweak"; --tweak holds its runs to the budget)
  --no-limits         run even when the run is over the resource budget (every command
                      takes it; README "Errors and limits")
  -h, --help          show this text

Exit status: 0 the command completed (a diverging loop is a result, reported as such),
1 a requirement failed (check) or newly fails (diff), 2 bad arguments or a plant file with errors (printed as
FILE:LINE:COL: message).

Simulated gains are a starting point: verify them on the equipment with interlocks in place and a
manual fallback ready, and defer to local codes and licensed practice.
`;
