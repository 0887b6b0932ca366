/**
 * Seeded draws for the forecast's simulations: the same inputs give the same answer on every
 * request and in every test. Uniforms come from pure-rand's xoroshiro128+; the distributions built
 * on them are the standard published samplers, written here because no kept npm package offers
 * seeded gamma and Poisson draws on a pure-rand generator:
 *   normal: Marsaglia's polar method;
 *   gamma: Marsaglia & Tsang (2000), ACM Transactions on Mathematical Software 26, 363–372
 *          (shape < 1 by the boost U^(1/shape));
 *   Poisson: inversion for small means, Hörmann's PTRS (1993), Insurance: Mathematics and
 *          Economics 12, 39–45, for means of 10 and more.
 */
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { lgamma } from "@/lib/power/special";

export type Random = {
  uniform(): number;
  normal(): number;
  /** Gamma with the given shape and scale 1. */
  gamma(shape: number): number;
  poisson(mean: number): number;
};

export function seededRandom(seed: number): Random {
  const rng = xoroshiro128plus(seed);
  // Uniform on (0, 1): the samplers below take logarithms of it.
  const uniform = () => {
    let u = uniformFloat64(rng);
    while (u === 0) u = uniformFloat64(rng);
    return u;
  };
  let spare: number | null = null;
  const normal = () => {
    if (spare !== null) {
      const z = spare;
      spare = null;
      return z;
    }
    let u: number, v: number, s: number;
    do {
      u = 2 * uniform() - 1;
      v = 2 * uniform() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    spare = v * f;
    return u * f;
  };
  const gamma = (shape: number): number => {
    if (shape < 1) return gamma(shape + 1) * Math.pow(uniform(), 1 / shape);
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      let x: number, v: number;
      do {
        x = normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      const u = uniform();
      if (u < 1 - 0.0331 * x * x * x * x) return d * v;
      if (Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v;
    }
  };
  const poisson = (mean: number): number => {
    if (mean <= 0) return 0;
    if (mean < 10) {
      // Inversion: walk up the CDF.
      let k = 0;
      let p = Math.exp(-mean);
      let cdf = p;
      const u = uniform();
      while (u > cdf && k < 1000) {
        k++;
        p *= mean / k;
        cdf += p;
      }
      return k;
    }
    const slam = Math.sqrt(mean);
    const loglam = Math.log(mean);
    const b = 0.931 + 2.53 * slam;
    const a = -0.059 + 0.02483 * b;
    const invalpha = 1.1239 + 1.1328 / (b - 3.4);
    const vr = 0.9277 - 3.6224 / (b - 2);
    for (;;) {
      const U = uniform() - 0.5;
      const V = uniform();
      const us = 0.5 - Math.abs(U);
      const k = Math.floor(((2 * a) / us + b) * U + mean + 0.43);
      if (us >= 0.07 && V <= vr) return k;
      if (k < 0 || (us < 0.013 && V > us)) continue;
      if (Math.log(V) + Math.log(invalpha) - Math.log(a / (us * us) + b) <= -mean + k * loglam - lgamma(k + 1)) return k;
    }
  };
  return { uniform, normal, gamma, poisson };
}
