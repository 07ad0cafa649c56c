/**
 * The largest models the loader accepts. Every state, measurement and the output become generated
 * code inlined into the integrator step, and parameters become slots: tens of thousands of ode
 * parameters took most of a minute to load and compile, and a linear model's order sets the cost
 * of its eigenvalues and of every step. Far above any hand-written plant.
 */
export const MODEL_LIMITS = {
  /** ode parameters. */
  params: 1000,
  /** States: ode states, state-space order, transfer-function denominator degree. */
  states: 100,
  /** ode disturbances. */
  disturbances: 100,
  /** ode measurements. */
  measurements: 100,
} as const;
