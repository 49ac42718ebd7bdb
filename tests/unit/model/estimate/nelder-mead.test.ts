import { describe, expect, it } from 'vitest';
import { nelderMead } from '@/lib/model/optim/nelder-mead';

// [pub] Rosenbrock (1960, Computer Journal 3:175–184): f = Σ 100(x_{i+1} − x_i²)² + (1 − x_i)², minimum 0
// at (1, …, 1).
const rosenbrock = (x: Float64Array) => {
  let s = 0;
  for (let i = 0; i + 1 < x.length; i++) s += 100 * (x[i + 1]! - x[i]! ** 2) ** 2 + (1 - x[i]!) ** 2;
  return s;
};

describe('nelderMead', () => {
  it('finds the Rosenbrock minimum from the classic start (−1.2, 1)', () => {
    const res = nelderMead(rosenbrock, [-1.2, 1], { xTol: 1e-10, fTol: 1e-14, maxIterations: 5000, maxEvaluations: 10000 });
    expect(res.converged).toBe(true);
    expect(res.x[0]).toBeCloseTo(1, 6);
    expect(res.x[1]).toBeCloseTo(1, 6);
    expect(res.fx).toBeLessThan(1e-12);
  });
  // From (−1, 1.5, 0.5, −0.5) the 4-D function leads Nelder–Mead into its known local minimum near
  // (−0.776, 0.613, 0.382, 0.146), f ≈ 3.70 [calc]; from the origin it reaches the global one.
  it('finds the 4-D Rosenbrock minimum with adaptive coefficients', () => {
    const res = nelderMead(rosenbrock, [0, 0, 0, 0], {
      adaptive: true,
      step: 0.5,
      xTol: 1e-9,
      fTol: 1e-14,
      maxIterations: 20000,
      maxEvaluations: 40000,
    });
    for (const v of res.x) expect(v).toBeCloseTo(1, 5);
  });
  it('finds the minimum of a rotated, badly scaled quadratic', () => {
    // [calc] f = (x−c)ᵀA(x−c) + 3 with A positive definite: minimum 3 at c
    const c = [2, -3, 0.5];
    const A = [
      [10, 2, 0],
      [2, 1, 0.3],
      [0, 0.3, 0.2],
    ];
    const f = (x: Float64Array) => {
      let s = 3;
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += (x[i]! - c[i]!) * A[i]![j]! * (x[j]! - c[j]!);
      return s;
    };
    const res = nelderMead(f, [0, 0, 0], { step: 1, xTol: 1e-9, fTol: 1e-15, maxIterations: 5000, maxEvaluations: 10000 });
    expect(res.converged).toBe(true);
    expect(res.fx).toBeCloseTo(3, 10);
    res.x.forEach((v, i) => expect(v).toBeCloseTo(c[i]!, 5));
  });
  it('reports non-convergence when the iteration cap bites', () => {
    const res = nelderMead(rosenbrock, [-1.2, 1], { maxIterations: 10 });
    expect(res.converged).toBe(false);
    expect(res.iterations).toBe(10);
  });
  it('steps away from infeasible (NaN) regions', () => {
    // [calc] minimum of (x − 2)² on x > 0 is at 2; NaN for x ≤ 0
    const f = (x: Float64Array) => (x[0]! > 0 ? (x[0]! - 2) ** 2 : Number.NaN);
    const res = nelderMead(f, [0.05], { step: -0.1 });
    expect(res.x[0]).toBeCloseTo(2, 6);
  });
});
