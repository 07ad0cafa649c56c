/**
 * Eigenvalues of a real dense matrix: balancing, reduction to upper Hessenberg form by
 * stabilised elementary similarity transformations, then the Francis double-shift QR iteration.
 * The algorithm is the classical EISPACK sequence balanc / elmhes / hqr (Wilkinson & Reinsch,
 * Handbook for Automatic Computation vol. II, 1971; restated in Press et al., Numerical
 * Recipes, 2nd ed., 1992, sections 11.5-11.6), written here from that description.
 */
import { solveComplexInPlace } from './linalg.js';

/** Eigenvalues as parallel arrays; complex pairs appear as conjugates, positive imaginary part first. */
export interface Eigenvalues {
  re: Float64Array;
  im: Float64Array;
}

const EPS = 2.220446049250313e-16;

/**
 * Balance in place (row/column scaling by powers of 2 so that row and column norms match):
 * a similarity transform that leaves eigenvalues unchanged and makes them better conditioned.
 */
export function balance(a: Float64Array, n: number): void {
  const RADIX = 2;
  const SQRDX = RADIX * RADIX;
  let done = false;
  let sweeps = 0;
  while (!done && sweeps++ < 100) {
    done = true;
    for (let i = 0; i < n; i++) {
      let r = 0;
      let c = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        c += Math.abs(a[j * n + i]);
        r += Math.abs(a[i * n + j]);
      }
      if (c === 0 || r === 0) continue;
      let g = r / RADIX;
      let f = 1;
      const s = c + r;
      while (c < g) {
        f *= RADIX;
        c *= SQRDX;
      }
      g = r * RADIX;
      while (c > g) {
        f /= RADIX;
        c /= SQRDX;
      }
      if ((c + r) / f < 0.95 * s) {
        done = false;
        const inv = 1 / f;
        for (let j = 0; j < n; j++) a[i * n + j] *= inv;
        for (let j = 0; j < n; j++) a[j * n + i] *= f;
      }
    }
  }
}

/**
 * Reduce to upper Hessenberg form in place (Gaussian elimination with pivoting, EISPACK elmhes);
 * entries below the subdiagonal are zeroed. The reduction is a similarity H = T⁻¹ A T; each of
 * `left` (column vectors b, length n) is replaced by T⁻¹ b, `right` (a row vector c) by c T, so
 * that c (sI − A)⁻¹ b = c T (sI − H)⁻¹ T⁻¹ b: a transfer function evaluated on the Hessenberg
 * form (analysis/freq-response.ts).
 */
export function hessenberg(a: Float64Array, n: number, left: readonly Float64Array[] = [], right?: Float64Array): void {
  for (let m = 1; m < n - 1; m++) {
    let x = 0;
    let piv = m;
    for (let j = m; j < n; j++) {
      if (Math.abs(a[j * n + m - 1]) > Math.abs(x)) {
        x = a[j * n + m - 1];
        piv = j;
      }
    }
    if (piv !== m) {
      for (let j = m - 1; j < n; j++) {
        const t = a[piv * n + j];
        a[piv * n + j] = a[m * n + j];
        a[m * n + j] = t;
      }
      for (let j = 0; j < n; j++) {
        const t = a[j * n + piv];
        a[j * n + piv] = a[j * n + m];
        a[j * n + m] = t;
      }
      // The same interchange P (P⁻¹ = P) on both vectors.
      for (const b of left) [b[piv], b[m]] = [b[m], b[piv]];
      if (right !== undefined) [right[piv], right[m]] = [right[m], right[piv]];
    }
    if (x === 0) continue;
    for (let i = m + 1; i < n; i++) {
      let y = a[i * n + m - 1];
      if (y === 0) continue;
      y /= x;
      a[i * n + m - 1] = 0;
      for (let j = m; j < n; j++) a[i * n + j] -= y * a[m * n + j];
      for (let j = 0; j < n; j++) a[j * n + m] += y * a[j * n + i];
      // Row i −= y row m is T⁻¹'s step (applied to b), column m += y column i is T's (applied to c).
      for (const b of left) b[i] -= y * b[m];
      if (right !== undefined) right[m] += y * right[i];
    }
  }
  for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) a[i * n + j] = 0;
}

/**
 * Eigenvalues of an upper Hessenberg matrix by the Francis double-shift QR iteration; `h` is
 * destroyed. Throws Error when an eigenvalue needs more than 60 iterations (practically never
 * after balancing; exceptional shifts are applied at iterations 10, 20, ...).
 */
export function hessenbergEigenvalues(h: Float64Array, n: number): Eigenvalues {
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  let anorm = 0;
  for (let i = 0; i < n; i++) for (let j = Math.max(i - 1, 0); j < n; j++) anorm += Math.abs(h[(i) * n + (j)]);
  let nn = n - 1;
  let t = 0;
  let p = 0;
  let q = 0;
  let r = 0;
  let s = 0;
  let w = 0;
  let x = 0;
  let y = 0;
  let z = 0;
  while (nn >= 0) {
    let its = 0;
    let l: number;
    do {
      // Look for a single small subdiagonal element.
      for (l = nn; l >= 1; l--) {
        s = Math.abs(h[(l - 1) * n + (l - 1)]) + Math.abs(h[(l) * n + (l)]);
        if (s === 0) s = anorm;
        if (Math.abs(h[(l) * n + (l - 1)]) <= EPS * s) {
          h[l * n + l - 1] = 0;
          break;
        }
      }
      x = h[(nn) * n + (nn)];
      if (l === nn) {
        // One root found.
        wr[nn] = x + t;
        wi[nn] = 0;
        nn--;
      } else {
        y = h[(nn - 1) * n + (nn - 1)];
        w = h[(nn) * n + (nn - 1)] * h[(nn - 1) * n + (nn)];
        if (l === nn - 1) {
          // Two roots found.
          p = 0.5 * (y - x);
          q = p * p + w;
          z = Math.sqrt(Math.abs(q));
          x += t;
          if (q >= 0) {
            z = p + (p >= 0 ? Math.abs(z) : -Math.abs(z));
            wr[nn - 1] = wr[nn] = x + z;
            if (z !== 0) wr[nn] = x - w / z;
            wi[nn - 1] = wi[nn] = 0;
          } else {
            wr[nn - 1] = wr[nn] = x + p;
            wi[nn - 1] = z;
            wi[nn] = -z;
          }
          nn -= 2;
        } else {
          if (its >= 60) throw new Error('eigenvalues: QR iteration did not converge');
          if (its % 10 === 0 && its > 0) {
            // Exceptional shift, to break a cycle.
            t += x;
            for (let i = 0; i <= nn; i++) h[i * n + i] -= x;
            s = Math.abs(h[(nn) * n + (nn - 1)]) + Math.abs(h[(nn - 1) * n + (nn - 2)]);
            y = x = 0.75 * s;
            w = -0.4375 * s * s;
          }
          its++;
          // Form the shift and look for two consecutive small subdiagonal elements.
          let m: number;
          for (m = nn - 2; m >= l; m--) {
            z = h[(m) * n + (m)];
            r = x - z;
            s = y - z;
            p = (r * s - w) / h[(m + 1) * n + (m)] + h[(m) * n + (m + 1)];
            q = h[(m + 1) * n + (m + 1)] - z - r - s;
            r = h[(m + 2) * n + (m + 1)];
            s = Math.abs(p) + Math.abs(q) + Math.abs(r);
            p /= s;
            q /= s;
            r /= s;
            if (m === l) break;
            const u = Math.abs(h[(m) * n + (m - 1)]) * (Math.abs(q) + Math.abs(r));
            const v = Math.abs(p) * (Math.abs(h[(m - 1) * n + (m - 1)]) + Math.abs(z) + Math.abs(h[(m + 1) * n + (m + 1)]));
            if (u <= EPS * v) break;
          }
          for (let i = m + 2; i <= nn; i++) {
            h[i * n + i - 2] = 0;
            if (i !== m + 2) h[i * n + i - 3] = 0;
          }
          // Double QR step on rows l..nn and columns m..nn.
          for (let k = m; k <= nn - 1; k++) {
            if (k !== m) {
              p = h[(k) * n + (k - 1)];
              q = h[(k + 1) * n + (k - 1)];
              r = 0;
              if (k !== nn - 1) r = h[(k + 2) * n + (k - 1)];
              x = Math.abs(p) + Math.abs(q) + Math.abs(r);
              if (x !== 0) {
                p /= x;
                q /= x;
                r /= x;
              }
            }
            const root = Math.sqrt(p * p + q * q + r * r);
            s = p >= 0 ? root : -root;
            if (s !== 0) {
              if (k === m) {
                if (l !== m) h[k * n + k - 1] = -h[(k) * n + (k - 1)];
              } else {
                h[k * n + k - 1] = -s * x;
              }
              p += s;
              x = p / s;
              y = q / s;
              z = r / s;
              q /= p;
              r /= p;
              for (let j = k; j <= nn; j++) {
                p = h[(k) * n + (j)] + q * h[(k + 1) * n + (j)];
                if (k !== nn - 1) {
                  p += r * h[(k + 2) * n + (j)];
                  h[(k + 2) * n + j] -= p * z;
                }
                h[(k + 1) * n + j] -= p * y;
                h[k * n + j] -= p * x;
              }
              const mmin = nn < k + 3 ? nn : k + 3;
              for (let i = l; i <= mmin; i++) {
                p = x * h[(i) * n + (k)] + y * h[(i) * n + (k + 1)];
                if (k !== nn - 1) {
                  p += z * h[(i) * n + (k + 2)];
                  h[i * n + k + 2] -= p * r;
                }
                h[i * n + k + 1] -= p * q;
                h[i * n + k] -= p;
              }
            }
          }
        }
      }
    } while (l < nn - 1);
  }
  return orderPairs({ re: wr, im: wi });
}

/** Put each conjugate pair as (+im, −im), and pairs next to each other. */
function orderPairs(e: Eigenvalues): Eigenvalues {
  const n = e.re.length;
  for (let i = 0; i + 1 < n; i++) {
    if (e.im[i] !== 0 && e.im[i + 1] === -e.im[i] && e.re[i] === e.re[i + 1]) {
      if (e.im[i] < 0) {
        e.im[i] = -e.im[i];
        e.im[i + 1] = -e.im[i + 1];
      }
      i++;
    }
  }
  return e;
}

/**
 * Eigenvalues of a real n×n row-major matrix (input not modified). Throws RangeError on
 * non-finite entries and Error if the QR iteration fails to converge.
 */
export function eigenvalues(a: ArrayLike<number>, n: number): Eigenvalues {
  if (a.length < n * n) throw new RangeError('eigenvalues: matrix too small');
  const h = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    const v = a[i];
    if (!Number.isFinite(v)) throw new RangeError('eigenvalues: matrix has a non-finite entry');
    h[i] = v;
  }
  if (n === 0) return { re: new Float64Array(0), im: new Float64Array(0) };
  balance(h, n);
  hessenberg(h, n);
  return hessenbergEigenvalues(h, n);
}

/**
 * An eigenvector for eigenvalue `lambda` = (re, im) of the real matrix A, by two steps of inverse
 * iteration with a slightly perturbed shift. Returned normalised to unit 2-norm as (re, im) parts.
 */
export function eigenvector(a: ArrayLike<number>, n: number, re: number, im: number): { re: Float64Array; im: Float64Array } {
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(a[i]));
  // A shift just off the eigenvalue keeps the factorisation non-singular while the solve is
  // still dominated by the wanted eigen-direction.
  const shiftR = re + 1e-10 * (scale + Math.abs(re) + 1e-300);
  const shiftI = im;
  let vr: Float64Array = new Float64Array(n).fill(1);
  let vi: Float64Array = new Float64Array(n);
  for (let i = 0; i < n; i++) vr[i] = 1 + i / (n + 1);
  const mr = new Float64Array(n * n);
  const mi = new Float64Array(n * n);
  for (let iter = 0; iter < 3; iter++) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        mr[i * n + j] = a[i * n + j] - (i === j ? shiftR : 0);
        mi[i * n + j] = i === j ? -shiftI : 0;
      }
    }
    const br = vr.slice();
    const bi = vi.slice();
    if (!solveComplexInPlace(mr, mi, n, br, bi)) break;
    let norm = 0;
    for (let i = 0; i < n; i++) norm += br[i] * br[i] + bi[i] * bi[i];
    norm = Math.sqrt(norm);
    if (!(norm > 0) || !Number.isFinite(norm)) break;
    for (let i = 0; i < n; i++) {
      br[i] /= norm;
      bi[i] /= norm;
    }
    vr = br;
    vi = bi;
  }
  return { re: vr, im: vi };
}
