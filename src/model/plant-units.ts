/**
 * The engineering units a plant file gives its measured output and its actuator, as one record for
 * the surfaces that print values of either (the screen, run, check, export, diagnose, the SVG
 * plots, and `units` in their JSON). A unit is a label: values are never converted.
 */
import type { ActuatorSpec, ModelSpec } from './types.js';

/** The units of a plant's two quantities; null = not given in the file. */
export interface PlantUnits {
  /** Unit of the controlled output, its setpoint and the errors (`model.output_unit`). */
  output: string | null;
  /** Unit of the actuator position and the controller output (`actuator.unit`). */
  actuator: string | null;
}

/** No units given: what a surface without a plant file (or a file without units) prints with. */
export const NO_UNITS: Readonly<PlantUnits> = Object.freeze({ output: null, actuator: null });

/** The units of a loaded plant file. */
export function plantUnits(plant: { model: ModelSpec; actuator: ActuatorSpec }): PlantUnits {
  return { output: plant.model.outputUnit ?? null, actuator: plant.actuator.unit ?? null };
}

/**
 * A formatted value followed by its unit after a space ("1.3 m", "50 %", "80 °C": SI writes a space
 * before every unit symbol but the plane-angle degree, and these labels are never angles), or the
 * value alone when there is no unit.
 */
export function withUnit(value: string, unit: string | null): string {
  return unit === null ? value : `${value} ${unit}`;
}

/**
 * A heading for values of one quantity, an axis or a chart: "process value (m)", or the quantity
 * alone when there is no unit.
 */
export function quantityLabel(quantity: string, unit: string | null): string {
  return unit === null ? quantity : `${quantity} (${unit})`;
}
