/**
 * Zero-order-hold discretisation of dx/dt = A x + B u over a step h: Φ = e^{Ah},
 * Γ = ∫₀ʰ e^{As} ds B, from one exponential of the augmented matrix [[A, B], [0, 0]] h
 * (Van Loan, "Computing integrals involving the matrix exponential", IEEE TAC 23 (1978)
 * 395-404). The exponential uses scaling and squaring with a degree-12 Taylor series on a
 * matrix scaled to norm ≤ 1/2 (truncation error below 0.5¹³/13! ≈ 2e-14 relative), which is
 * ample for the small (n ≤ 4) systems it serves.
 */

/**
 * Write Φ (n × n, row-major) and Γ (n) for state matrix `a` (n × n row-major), input vector `b`
 * and step h ≥ 0.
 */
export function zohDiscretise(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  n: number,
  h: number,
  phi: Float64Array,
  gamma: Float64Array,
): void {
  if (!(h >= 0)) throw new RangeError('zohDiscretise: h must be >= 0');
  const N = n + 1;
  const M = new Float64Array(N * N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M[i * N + j] = a[i * n + j] * h;
    M[i * N + n] = b[i] * h;
  }
  // 1-norm (max column sum).
  let norm = 0;
  for (let j = 0; j < N; j++) {
    let s = 0;
    for (let i = 0; i < N; i++) s += Math.abs(M[i * N + j]);
    if (s > norm) norm = s;
  }
  let squarings = 0;
  if (norm > 0.5) {
    squarings = Math.ceil(Math.log2(norm / 0.5));
    const scale = Math.pow(2, -squarings);
    for (let i = 0; i < N * N; i++) M[i] *= scale;
  }
  // E = I + M + M²/2! + … + M¹²/12!  (Horner: I + M(I + M/2(I + M/3(…))))
  let E = new Float64Array(N * N);
  let T = new Float64Array(N * N);
  for (let i = 0; i < N; i++) E[i * N + i] = 1;
  for (let k = 12; k >= 1; k--) {
    // T = I + (M E)/k
    for (let i = 0; i < N; i++) {
      for (let j = 0; j < N; j++) {
        let s = 0;
        for (let l = 0; l < N; l++) s += M[i * N + l] * E[l * N + j];
        T[i * N + j] = (i === j ? 1 : 0) + s / k;
      }
    }
    const tmp = E;
    E = T;
    T = tmp;
  }
  for (let q = 0; q < squarings; q++) {
    for (let i = 0; i < N; i++) {
      for (let j = 0; j < N; j++) {
        let s = 0;
        for (let l = 0; l < N; l++) s += E[i * N + l] * E[l * N + j];
        T[i * N + j] = s;
      }
    }
    const tmp = E;
    E = T;
    T = tmp;
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) phi[i * n + j] = E[i * N + j];
    gamma[i] = E[i * N + n];
  }
}

/**
 * Zero-order hold over a step h (s) whose input arrives a fraction f (0 ≤ f < 1) of a step late:
 * x(k+1) = Φ x(k) + Γ1 u(k−1) + Γ0 u(k), Φ = e^{Ah}, Γ0 = ∫₀^{(1−f)h} e^{As} ds B,
 * Γ1 = e^{A(1−f)h} ∫₀^{fh} e^{As} ds B (Åström & Wittenmark, Computer-Controlled Systems, 3rd ed.
 * 1997, sec. 2.3, from memory). Writes Φ (n × n), Γ0 and Γ1 (n); Γ1 is zero when f = 0.
 */
export function zohFractionalDelay(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  n: number,
  h: number,
  f: number,
  phi: Float64Array,
  gamma0: Float64Array,
  gamma1: Float64Array,
): void {
  const gf = new Float64Array(n);
  zohDiscretise(a, b, n, h, phi, gf);
  if (!(f > 0)) {
    gamma0.set(gf);
    gamma1.fill(0);
    return;
  }
  const phiA = new Float64Array(n * n);
  const phiB = new Float64Array(n * n);
  zohDiscretise(a, b, n, (1 - f) * h, phiA, gamma0);
  zohDiscretise(a, b, n, f * h, phiB, gf);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) s += phiA[i * n + j] * gf[j];
    gamma1[i] = s;
  }
}
