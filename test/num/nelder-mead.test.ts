import { describe, it, expect } from 'vitest';
import { nelderMead, nelderMeadSearch } from '../../src/num/index.js';
import { expectClose } from '../helpers/expect-close.js';

describe('nelderMead', () => {
  it('finds the Rosenbrock minimum (1, 1) from (-1.2, 1)', () => {
    // Rosenbrock, Computer Journal 3 (1960) 175-184: f = 100 (y − x²)² + (1 − x)², minimum 0 at (1, 1);
    // (−1.2, 1) is the customary start.
    const res = nelderMead((x) => 100 * (x[1] - x[0] * x[0]) ** 2 + (1 - x[0]) ** 2, [-1.2, 1]);
    expectClose(res.x[0], 1, { abs: 1e-4 });
    expectClose(res.x[1], 1, { abs: 1e-4 });
    expect(res.f).toBeLessThan(1e-8);
    expect(res.converged).toBe(true);
  });

  it('is deterministic: same inputs give bit-identical results', () => {
    const f = (x: Float64Array): number => (x[0] - 3) ** 2 + 10 * (x[1] + 1) ** 2 + Math.sin(x[0]);
    const a = nelderMead(f, [0, 0]);
    const b = nelderMead(f, [0, 0]);
    expect(Array.from(a.x)).toEqual(Array.from(b.x));
    expect(a.evaluations).toBe(b.evaluations);
  });

  it('driven one evaluation at a time (nelderMeadSearch), stopped and resumed, it is the same search', () => {
    const f = (x: Float64Array): number => 100 * (x[1] - x[0] * x[0]) ** 2 + (1 - x[0]) ** 2;
    const whole = nelderMead(f, [-1.2, 1], { maxEvaluations: 400 });
    const search = nelderMeadSearch([-1.2, 1], { maxEvaluations: 400 });
    const seen: number[] = [];
    let next = search.next();
    while (!next.done) {
      seen.push(next.value[0]);
      // A pause between evaluations changes nothing: the generator keeps the simplex.
      next = search.next(f(next.value));
    }
    expect(Array.from(next.value.x)).toEqual(Array.from(whole.x));
    expect(next.value.evaluations).toBe(whole.evaluations);
    expect(seen).toHaveLength(whole.evaluations);
  });

  it('respects box bounds: minimum of (x − 2)² on [−1, 1] is at the bound x = 1', () => {
    const res = nelderMead((x) => (x[0] - 2) ** 2, [0], { lower: [-1], upper: [1] });
    expectClose(res.x[0], 1, { abs: 1e-6 });
  });

  it('minimises a 4-d quadratic to its known centre', () => {
    const c = [1, -2, 3, 0.5];
    const res = nelderMead((x) => {
      let s = 0;
      for (let i = 0; i < 4; i++) s += (i + 1) * (x[i] - c[i]) ** 2;
      return s;
    }, [0, 0, 0, 0]);
    for (let i = 0; i < 4; i++) expectClose(res.x[i], c[i], { abs: 1e-4 });
  });

  it('treats NaN cost as +Infinity and moves away from it', () => {
    const res = nelderMead((x) => (x[0] < 0 ? NaN : (x[0] - 1) ** 2), [0.5]);
    expectClose(res.x[0], 1, { abs: 1e-5 });
  });
});
