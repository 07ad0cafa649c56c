/**
 * The numbers at which a finding is raised, each with its source. Keep every threshold here so a
 * reader can see and argue with them in one place.
 */
export const THRESHOLDS = {
  /** Complex poles with damping below this are "lightly damped" (issue statement; common practice, no source). */
  lightDamping: 0.3,
  /**
   * Normalised delay τ = L/(L + T) above which a loop is "delay dominated": Åström & Hägglund,
   * Advanced PID Control, ISA 2006, ch. 7 classify τ > 0.5 as delay dominated [from memory];
   * the same split drives the AMIGO set-point weight (reference sheet section 4).
   */
  delayDominated: 0.5,
  /** Above this normalised delay the finding is severe (common practice, no source). */
  delayDominatedSevere: 0.8,
  /**
   * Share of the apparent (half-rule) delay that must be true delay (transport + sensor delay +
   * h/2) for a delay-dominated loop to be called dead-time dominant; below it the apparent delay
   * comes mostly from a chain of lags (Skogestad 2003's half rule folds lags into the delay), a
   * high-order lag. Our choice, no source: the larger part decides.
   */
  trueDelayShare: 0.5,
  /** An unstable pole p with delay θ: p·θ above this makes PID very hard (reference sheet section 9, heuristic from S&P 2005 [mem]). */
  unstableDelayProduct: 0.5,
  /** An RHP zero z closer than this multiple of an unstable pole p (z < 4p) is severe (sheet section 9 [mem]). */
  zeroPoleRatio: 4,
  /** Initial inverse response (fraction of the final change) that counts as non-minimum phase (common practice, no source). */
  inverseResponse: 0.02,
  /** Gain or time-constant ratio across the operating range that flags nonlinearity (common practice, no source). */
  nonlinearFactor: 2,
  /** Ratio above which the nonlinearity finding is a warning rather than info (common practice, no source). */
  nonlinearWarnFactor: 4,
  /** Fraction of the trial with the actuator at a position limit that flags saturation (common practice, no source). */
  saturatedFraction: 0.05,
  /** Fraction of the trial limited by the rate limit that flags rate limiting (common practice, no source). */
  rateLimitedFraction: 0.02,
  /**
   * Sampling: ωc·h above this is slow. Åström & Wittenmark, Computer-Controlled Systems, 3rd ed.,
   * 1997, give ωc h ≈ 0.15 – 0.5 for a good digital design [from memory]; flagging from the middle
   * of that range, 0.3, is common practice, no source (at 0.3 the sampled loop already loses
   * 10–20 % of the gain margin of its continuous design).
   */
  crossoverSampling: 0.3,
  /**
   * Sampling: a derivative filter time td/n shorter than this multiple of h is slow — the discrete
   * derivative (pole ad = td/(td + n h) below 1/2) no longer resembles the continuous filter the
   * gains were designed with (common practice, no source).
   */
  derivativeFilterSampling: 1,
  /** Sampling: h above this fraction of (T + L) of the low-order model is slow (common practice, no source: ~10 samples per response time). */
  responseSampling: 0.1,
  /** Standard deviation of the controller output due to sensor noise, as a share of the actuator range (common practice, no source). */
  noiseShare: 0.05,
  /** ... above which the noise finding is a warning rather than info (common practice, no source). */
  noiseShareWarn: 0.1,
  /** Actuator step used for the open-loop step fit of nonlinear plants, share of the range (issue statement). */
  stepShare: 0.05,
} as const;
