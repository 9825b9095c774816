// The one rounding rule of money (costing, landed cost, price lists): half away from zero, forgiving binary float
// error below 1e-7 of the last digit (1.005 × 100 is 100.49999999999999 in doubles, and 1.005 must round to 1.01).

const ROUND_EPS = 1e-7;

/** Rounds to an integer, half away from zero, forgiving float error below 1e-7. */
export function roundHalfUp(x: number): number {
  return x >= 0 ? Math.floor(x + 0.5 + ROUND_EPS) : -Math.floor(-x + 0.5 + ROUND_EPS);
}
