/**
 * The first-order-plus-delay heater the design tests share: 2 e^(−s)/(10 s + 1), h = 0.1 s, an
 * actuator too wide to saturate, one setpoint step. `controller` and `loopExtra` (lines under
 * `loop:`, e.g. requirements) vary per test.
 */
export function heaterText(controller = '{ structure: pi, form: ideal, kc: 1, ti: 10 s }', loopExtra = ''): string {
  return `name: Heater
model: { type: first_order, gain: 2, time_constant: 10 s, delay: 1 s }
actuator: { min: -1000, max: 1000 }
loop:
  sample_time: 0.1 s
  controller: ${controller}
${loopExtra}  trial:
    duration: 60 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
`;
}
