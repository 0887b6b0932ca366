/** The two searches every design shares: the smallest integer n that reaches a power, and the effect that gives it. */
import { normalQuantile } from "./special";

export class UnreachableError extends Error {
  readonly code = "unreachable";
}

/**
 * Smallest integer n in [min, max] with powerAt(n) ≥ target, for a power that does not fall as n rises.
 * Starts from an approximation and needs few exact evaluations: step from the start, gallop, bisect.
 */
export function smallestN(powerAt: (n: number) => number, target: number, start: number, min: number, max: number, what: string): number {
  let n = Math.min(max, Math.max(min, Math.round(Number.isFinite(start) ? start : min)));
  if (powerAt(n) >= target) {
    // Walk down a little, then bisect if the start was far off.
    let lo = n - 1;
    let step = 1;
    while (lo >= min && powerAt(lo) >= target) {
      n = lo;
      step *= 2;
      lo = n - step;
    }
    if (lo < min) {
      if (n === min) return min;
      lo = min;
      if (powerAt(lo) >= target) return lo;
    }
    return bisect(powerAt, target, lo, n);
  }
  let lo = n;
  let step = 1;
  let hi = n + step;
  for (;;) {
    if (hi >= max) {
      hi = max;
      if (powerAt(hi) < target) {
        throw new UnreachableError(`No ${what} up to ${max.toLocaleString("en-US")} reaches power ${target}; the effect is too small to detect with these settings.`);
      }
      break;
    }
    if (powerAt(hi) >= target) break;
    lo = hi;
    step *= 2;
    hi = n + step;
  }
  return bisect(powerAt, target, lo, hi);
}

/** lo fails, hi passes: the smallest passing integer. */
function bisect(powerAt: (n: number) => number, target: number, lo: number, hi: number): number {
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (powerAt(mid) >= target) hi = mid;
    else lo = mid;
  }
  return hi;
}

function probit(p: number): number {
  return normalQuantile(Math.min(1 - 1e-16, Math.max(1e-300, p)));
}

/**
 * The effect e in (lo, hi) with powerAt(e) = target, for a power that rises with e. Secant steps on the
 * probit of power (nearly linear in the effect), kept inside a bracket, with bisection as the fallback.
 */
export function effectForPower(powerAt: (e: number) => number, target: number, start: number, lo: number, hi: number, what: string): number {
  const goal = probit(target);
  const g = (e: number) => probit(powerAt(e)) - goal;
  let L = lo;
  let H = hi;
  if (g(H) < 0) throw new UnreachableError(`No ${what} in the plausible range reaches power ${target} at this sample size.`);
  let a = Math.min(H, Math.max(L, start));
  let ga = g(a);
  if (ga === 0) return a;
  if (ga < 0) L = a;
  else H = a;
  let b = a + (ga < 0 ? 1 : -1) * 0.05 * Math.max(Math.abs(a), 1e-3);
  if (!(b > L && b < H)) b = (L + H) / 2;
  let gb = g(b);
  for (let i = 0; i < 200; i++) {
    if (gb === 0) return b;
    if (gb < 0) L = Math.max(L, b);
    else H = Math.min(H, b);
    let c = gb !== ga ? b - (gb * (b - a)) / (gb - ga) : (L + H) / 2;
    if (!(c > L && c < H) || !Number.isFinite(c)) c = (L + H) / 2;
    if (Math.abs(c - b) <= 1e-12 * Math.max(Math.abs(c), 1e-12) || H - L <= 1e-14 * Math.max(Math.abs(H), 1e-12)) return c;
    a = b;
    ga = gb;
    b = c;
    gb = g(b);
  }
  return b;
}
