/**
 * A plant file whose run diverges whatever the controller does: dx/dt = x^2 from x = 1 blows up
 * at t = 1 s (x = 1/(1 - t)); kc = 0, a setpoint step at 0.1 s, a 3 s trial.
 */
export const BLOW_UP_PLANT = [
  'name: Finite-time blow-up',
  'model:',
  '  type: ode',
  '  params: { unused: 0 }',
  '  states: { x: { initial: 1 } }',
  '  input: u',
  '  derivatives: { x: x*x + 0*u }',
  '  output: x',
  'loop:',
  '  sample_time: 0.01 s',
  '  step: 0.001 s',
  '  controller: { structure: p, form: ideal, kc: 0 }',
  '  trial: { duration: 3 s, events: [ { at: 0.1 s, setpoint: 2 } ] }',
  '',
].join('\n');
