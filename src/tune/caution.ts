/**
 * Words shown wherever the relay experiment or the ultimate-cycle rules are offered (CLI and screen
 * print this constant; the core never prints).
 */

/** Caution about driving a loop into sustained oscillation. */
export const RELAY_CAUTION =
  'Caution: a relay test (and the ultimate-cycle method) drives the loop into a sustained oscillation. ' +
  'On real equipment this can damage the actuator or the process and upset production. Do it only with ' +
  "the operator's agreement, with a small relay amplitude, with limits and a way to stop it in place. " +
  'Here it runs on the simulated plant only.';
