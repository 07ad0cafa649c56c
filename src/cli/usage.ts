/** Help text of the command line (our own wording). */
export const USAGE = `looprig - try PID gains on a simulated process before touching the real one

Usage:
  looprig                       run the bundled demo plant (surge tank level)
  looprig run FILE [options]    simulate the trial described in a plant file and report metrics
  looprig check FILE|DIR...      validate plant files, run their trials, check their requirements;
                                exit 0 all pass, 1 a requirement failed, 2 an invalid file
                                (looprig check --help)
  looprig export FILE [options] the gains in your controller's form and units, and discrete
                                velocity-form coefficients (looprig export --help)
  looprig compare FILE [--json] the file's candidate controllers (or ones chosen from the
                                diagnosis) on the same trial, side by side (looprig compare --help)
  looprig schema                print the JSON Schema of plant files (for editors)
  looprig help                  show this text

Options for run:
  --json              print one JSON document on stdout instead of the summary
  --csv OUT           also write the trace (t, setpoint, output, measured, u, disturbances) to OUT
  --svg OUT           also write a plot of the trial (setpoint, output, controller output,
                      requirement bands; with --set, the file's gains as baseline) to OUT
  --set NAME=VALUE    override a controller field in the file's form, e.g. --set kc=2.5 --set ti=40s
                      (repeatable; times may carry a unit: ms, s, min, h)
  --duration T        override the trial duration, e.g. --duration 20min
  --step DT           override the integration step, e.g. --step 0.01s
  -h, --help          show this text

Exit status: 0 the run completed (a diverging loop is a result, reported as such),
2 bad arguments or a plant file with errors (printed as FILE:LINE:COL: message).
`;
