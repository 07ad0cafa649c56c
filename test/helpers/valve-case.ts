/**
 * A plant file for the valve-element tests: the given model under the given controller, an
 * actuator from `min` to 100 with extra actuator lines (e.g. `  stiction: { ... }`, or '' for a
 * clean valve), sampled at 0.5 s with a 0.1 s step, setpoint 50 stepped to 55 at 10 s.
 */
export function valveCaseText(model: string, controller: string, actuatorLines: string, min: number, duration: number): string {
  return `name: Sticky valve case
model: ${model}
actuator:
  min: ${min}
  max: 100
${actuatorLines}
loop:
  sample_time: 0.5 s
  step: 0.1 s
  controller: ${controller}
  trial:
    duration: ${duration} s
    initial_setpoint: 50
    events:
      - { at: 10 s, setpoint: 55 }
`;
}
