/**
 * Each tuning rule against the computed check values of the reference sheet
 * (shared/reference/published-checks.md beside the repository; "computed" values were produced for the sheet from
 * the formulas, so they check how we copied each published formula). Values on the sheet are
 * rounded to 4 decimals: tolerance abs 1e-4 covers that rounding (and the rounding of Ku/Tu inputs).
 */
import { describe, expect, it } from 'vitest';
import { expectClose } from '../helpers/expect-close.js';
import { znStepP, znStepPi, znStepPid } from '../../src/tune/rules/ziegler-nichols-step.js';
import { znUltimateP, znUltimatePi, znUltimatePid } from '../../src/tune/rules/ziegler-nichols-ultimate.js';
import { cohenCoonP, cohenCoonPi, cohenCoonPid } from '../../src/tune/rules/cohen-coon.js';
import { lambdaPi } from '../../src/tune/rules/lambda.js';
import { imcPi, imcPid } from '../../src/tune/rules/imc.js';
import { simcImprovedPid, simcIntegratingPi, simcPi, simcPid } from '../../src/tune/rules/simc.js';
import { amigoPi, amigoPid, amigoSetpointWeight } from '../../src/tune/rules/amigo.js';
import type { RuleGains } from '../../src/tune/low-order.js';

const A = 1e-4;
function expectGains(g: RuleGains, kc: number, ti: number, td: number, abs = A): void {
  expectClose(g.kc, kc, { abs });
  if (ti === Infinity) expect(g.ti).toBe(Infinity);
  else expectClose(g.ti, ti, { abs });
  expectClose(g.td, td, { abs });
}

const lagDominant = { k: 1, tau1: 1, theta: 0.2 };
const balanced = { k: 1, tau1: 1, theta: 1 };

describe('Ziegler–Nichols step-response rule (Ziegler & Nichols, Trans. ASME 64, 1942; sheet §1 computed values)', () => {
  it('K=1, T=1, L=0.2 (a = 0.2): P 5; PI 4.5 / 0.6667 (Ti = L/0.3, not 3 L); PID 6 / 0.4 / 0.1', () => {
    expectGains(znStepP(lagDominant), 5, Infinity, 0);
    expectGains(znStepPi(lagDominant), 4.5, 0.6667, 0);
    expectGains(znStepPid(lagDominant), 6, 0.4, 0.1);
  });
  it('K=1, T=1, L=1 (a = 1): PI 0.9 / 3.3333; PID 1.2 / 2 / 0.5', () => {
    expectGains(znStepPi(balanced), 0.9, 3.3333, 0);
    expectGains(znStepPid(balanced), 1.2, 2, 0.5);
  });
  it('a zero delay is refused (the rule divides by L)', () => {
    expect(() => znStepPi({ k: 1, tau1: 1, theta: 0 })).toThrow(RangeError);
  });
});

describe('Ziegler–Nichols ultimate-cycle rule (Trans. ASME 64, 1942; sheet §1 computed values)', () => {
  it('Ku = 8.5024, Tu = 0.7442 -> PID 5.1015 / 0.3721 / 0.0930', () => {
    expectGains(znUltimatePid({ ku: 8.5024, tu: 0.7442 }), 5.1015, 0.3721, 0.093);
  });
  it('Ku = 2.2618, Tu = 3.0971 -> PID 1.3571 / 1.5485 / 0.3871', () => {
    expectGains(znUltimatePid({ ku: 2.2618, tu: 3.0971 }), 1.3571, 1.5485, 0.3871);
  });
  it('PI is 0.45 Ku, Tu/1.2 (ZN 1942; not the rounded 0.4 Ku, 0.8 Tu), P is Ku/2', () => {
    expectGains(znUltimatePi({ ku: 8, tu: 3.6276 }), 3.6, 3.023, 0);
    expectGains(znUltimateP({ ku: 8, tu: 3.6276 }), 4, Infinity, 0);
  });
});

describe('Cohen–Coon (Trans. ASME 75, 1953; sheet §2 computed values, PI factor 0.9 + r/12 [mem])', () => {
  it('K=1, T=1, L=0.2: P 5.3333; PI 4.5833 / 0.4708; PID 6.9167 / 0.4548 / 0.0702', () => {
    expectGains(cohenCoonP(lagDominant), 5.3333, Infinity, 0);
    expectGains(cohenCoonPi(lagDominant), 4.5833, 0.4708, 0);
    expectGains(cohenCoonPid(lagDominant), 6.9167, 0.4548, 0.0702);
  });
  it('K=1, T=1, L=1: P 1.3333; PI 0.9833 / 1.1379; PID 1.5833 / 1.8095 / 0.3077', () => {
    expectGains(cohenCoonP(balanced), 1.3333, Infinity, 0);
    expectGains(cohenCoonPi(balanced), 0.9833, 1.1379, 0);
    expectGains(cohenCoonPid(balanced), 1.5833, 1.8095, 0.3077);
  });
  it('as r -> 0 the PI gain tends to ZN 0.9/a (why 0.9, not the misprinted 1.1)', () => {
    const m = { k: 1, tau1: 1e6, theta: 1 };
    expectClose(cohenCoonPi(m).kc / znStepPi(m).kc, 1, { abs: 1e-6 });
  });
});

describe('Lambda and IMC (Rivera, Morari & Skogestad, IECPDD 25, 1986; sheet §5 computed values)', () => {
  it('lambda PI with lambda = T: 0.8333 / 1 (L = 0.2), 0.5 / 1 (L = 1)', () => {
    expectGains(lambdaPi(lagDominant, 1), 0.8333, 1, 0);
    expectGains(lambdaPi(balanced, 1), 0.5, 1, 0);
  });
  it('Padé-IMC PID with lambda = L: 3.6667 / 1.1 / 0.0909 (L = 0.2), 1 / 1.5 / 0.3333 (L = 1)', () => {
    expectGains(imcPid(lagDominant, 0.2), 3.6667, 1.1, 0.0909);
    expectGains(imcPid(balanced, 1), 1, 1.5, 0.3333);
  });
  it('IMC PI row [mem]: Kc = (2T + L)/(2 K lambda), Ti = T + L/2', () => {
    expectGains(imcPi({ k: 2, tau1: 10, theta: 2 }, 4), 22 / 16, 11, 0);
  });
});

describe('SIMC (Skogestad, J. Process Control 13, 2003; sheet §3)', () => {
  it('E1 reduced model k=1, tau1=1.1, theta=0.1: PI Kc = 5.5, tauI = min(1.1, 0.8) = 0.8', () => {
    const g = simcPi({ k: 1, tau1: 1.1, theta: 0.1 });
    expect(g.form).toBe('series');
    expectGains(g, 5.5, 0.8, 0);
  });
  it('E2 first-order model k=1, tau1=2.5, theta=1.47: PI Kc = 0.850, tauI = 2.5', () => {
    expectGains(simcPi({ k: 1, tau1: 2.5, theta: 1.47 }), 0.85, 2.5, 0, 5e-4);
  });
  it('E2 second-order model tau1=2, tau2=1.2, theta=0.77: series PID 1.30 / 2 / 1.2', () => {
    const g = simcPid({ k: 1, tau1: 2, tau2: 1.2, theta: 0.77 });
    expect(g.form).toBe('series');
    expectGains(g, 1.3, 2, 1.2, 5e-3);
  });
  it('tauc defaults to theta and is a parameter (larger tauc -> smaller gain)', () => {
    const m = { k: 2, tau1: 10, theta: 1 };
    expectGains(simcPi(m), 10 / (2 * 2), 8, 0);
    expectGains(simcPi(m, 4), 10 / (2 * 5), 10, 0);
  });
  it('integrating kv exp(-theta s)/s with tauc = theta: Kc = 1/(2 kv theta), tauI = 8 theta', () => {
    expectGains(simcIntegratingPi({ kv: 0.5, theta: 2 }), 0.5, 16, 0);
  });
  it('improved SIMC [mem form] tauD = theta/3: 2.6667 / 1.0667 / 0.0667 (L=0.2); 0.6667 / 1.3333 / 0.3333 (L=1)', () => {
    expectGains(simcImprovedPid(lagDominant), 2.6667, 1.0667, 0.0667);
    expectGains(simcImprovedPid(balanced), 0.6667, 1.3333, 0.3333);
  });
  it('pure delay: improved SIMC gives Kc = 1/(6k), tauI = theta/3 (sheet §3, [math])', () => {
    // tau1 = 0 is outside the FOPDT rule's domain (tau1 > 0); use a tiny lag.
    expectGains(simcImprovedPid({ k: 2, tau1: 1e-12, theta: 3 }), 1 / 12, 1, 1, 1e-9);
  });
  it('zero delay with the default tauc is refused', () => {
    expect(() => simcPi({ k: 1, tau1: 1, theta: 0 })).toThrow(RangeError);
  });
});

describe('AMIGO (Åström & Hägglund, J. Process Control 14, 2004; sheet §4 computed values, formulas [mem])', () => {
  it('K=1, T=1, L=1: PI 0.25 / 1.0; PID 0.65 / 1.0909 / 0.3846', () => {
    expectGains(amigoPi(balanced), 0.25, 1, 0);
    expectGains(amigoPid(balanced), 0.65, 1.0909, 0.3846);
  });
  it('K=1, T=1, L=0.2: PI 1.2056 / 0.7765; PID 2.45 / 0.5867 / 0.0943', () => {
    expectGains(amigoPi(lagDominant), 1.2056, 0.7765, 0);
    expectGains(amigoPid(lagDominant), 2.45, 0.5867, 0.0943);
  });
  it('K=2, T=10, L=2: PI 0.6028 / 7.7652; PID 1.225 / 5.8667 / 0.9434 (PID gain is a product)', () => {
    expectGains(amigoPi({ k: 2, tau1: 10, theta: 2 }), 0.6028, 7.7652, 0);
    expectGains(amigoPid({ k: 2, tau1: 10, theta: 2 }), 1.225, 5.8667, 0.9434);
  });
  it('integrating limit T -> inf, Kv = K/T: PI 0.35/(Kv L), 13.35 L; PID 0.45/(Kv L), 8 L, 0.5 L (sheet §4 [math])', () => {
    const T = 1e7;
    const kv = 0.1;
    const m = { k: kv * T, tau1: T, theta: 2 };
    expectGains(amigoPi(m), 0.35 / (kv * 2), 13.35 * 2, 0, 1e-4);
    expectGains(amigoPid(m), 0.45 / (kv * 2), 16, 1, 1e-4);
  });
  it('set-point weight b: 0 for tau_n <= 0.5, 1 above [mem]', () => {
    expect(amigoSetpointWeight(lagDominant)).toBe(0);
    expect(amigoSetpointWeight(balanced)).toBe(0);
    expect(amigoSetpointWeight({ k: 1, tau1: 1, theta: 2 })).toBe(1);
  });
});
