import { normalQuantile } from "../special";

/** n2 = ceil(r·n1), guarding against 0.3·10 = 3.0000000000000004 becoming 4. */
export function secondArm(n1: number, ratio: number): number {
  return Math.max(1, Math.ceil(ratio * n1 - 1e-9));
}

/** z for the test's critical value and for the target power. */
export function zPair(alpha: number, sides: 1 | 2, power: number): number {
  return normalQuantile(1 - alpha / sides) + normalQuantile(power);
}
