/**
 * Seeded draws for the forecast's simulations: the same inputs give the same answer on every
 * request and in every test. Uniforms are pure-rand's xoroshiro128+ and uniformFloat64; the
 * distributions built on them are the standard published samplers, written here because no kept npm
 * package offers seeded gamma and Poisson draws on a pure-rand generator:
 *   normal: Marsaglia's polar method;
 *   gamma: Marsaglia & Tsang (2000), ACM Transactions on Mathematical Software 26, 363–372
 *          (shape < 1 by the boost U^(1/shape));
 *   Poisson: inversion for small means, Hörmann's PTRS (1993), Insurance: Mathematics and
 *          Economics 12, 39–45, for means of 10 and more.
 *
 * Speed (measured: the 20-site forecast spent over half its time here): the generator's step and
 * uniformFloat64 are inlined into one class with its state in number fields, the spare normal is kept
 * without boxing, and each sampler keeps the constants of its last shape or mean. The draws are pure-rand's
 * bit for bit, in the same order (tests/unit/forecast.test.ts compares them with pure-rand's own).
 */
import { lgamma } from "@/lib/power/special";

export type Random = {
  uniform(): number;
  normal(): number;
  /** Gamma with the given shape and scale 1. */
  gamma(shape: number): number;
  poisson(mean: number): number;
  /** out[i] = gamma(shape) × scale for i < count, drawn in order: the same draws as a loop of gamma() calls. */
  gammas(out: Float64Array, count: number, shape: number, scale: number): void;
};

// pure-rand's uniformFloat64: 26 and 27 bits of two draws, 53 bits in all.
const SCALE26 = 1.4901161193847656e-8;
const SCALE53 = 1.1102230246251565e-16;
const MASK1 = 67108863;
const MASK2 = 134217727;

class SeededRandom implements Random {
  // xoroshiro128+ state as pure-rand keeps it (four 32-bit halves), seeded as xoroshiro128plus(seed) is.
  private s01 = -1;
  private s00: number;
  private s11: number;
  private s10 = 0;
  private spare = 0;
  private hasSpare = false;
  private gammaShape = Number.NaN;
  private gammaD = 0;
  private gammaC = 0;
  private poissonMean = Number.NaN;
  private expMinusMean = 0;
  private slam = 0;
  private loglam = 0;
  private pb = 0;
  private pa = 0;
  private logInvalpha = 0;
  private vr = 0;

  constructor(seed: number) {
    this.s00 = ~seed;
    this.s11 = seed | 0;
  }

  // Uniforms are made 1,024 at a time with the generator's state in local variables (a field write
  // per step cost more than the step), then handed out in order: the same stream, draw for draw.
  private readonly buffer = new Float64Array(1024);
  private position = 1024;

  private refill(): void {
    let s00 = this.s00;
    let s01 = this.s01;
    let s10 = this.s10;
    let s11 = this.s11;
    const buffer = this.buffer;
    let filled = 0;
    while (filled < buffer.length) {
      // Two steps of xoroshiro128+ (pure-rand's next()), then uniformFloat64 of their outputs.
      const out1 = (s00 + s10) | 0;
      let a0 = s10 ^ s00;
      let a1 = s11 ^ s01;
      let t00 = s00;
      let t01 = s01;
      s00 = (t00 << 24) ^ (t01 >>> 8) ^ a0 ^ (a0 << 16);
      s01 = (t01 << 24) ^ (t00 >>> 8) ^ a1 ^ ((a1 << 16) | (a0 >>> 16));
      s10 = (a1 << 5) ^ (a0 >>> 27);
      s11 = (a0 << 5) ^ (a1 >>> 27);
      const out2 = (s00 + s10) | 0;
      a0 = s10 ^ s00;
      a1 = s11 ^ s01;
      t00 = s00;
      t01 = s01;
      s00 = (t00 << 24) ^ (t01 >>> 8) ^ a0 ^ (a0 << 16);
      s01 = (t01 << 24) ^ (t00 >>> 8) ^ a1 ^ ((a1 << 16) | (a0 >>> 16));
      s10 = (a1 << 5) ^ (a0 >>> 27);
      s11 = (a0 << 5) ^ (a1 >>> 27);
      const u = (out1 & MASK1) * SCALE26 + (out2 & MASK2) * SCALE53;
      // Uniform on (0, 1): the samplers take logarithms of it, so a 0 is skipped (as drawing again would).
      if (u !== 0) buffer[filled++] = u;
    }
    this.s00 = s00;
    this.s01 = s01;
    this.s10 = s10;
    this.s11 = s11;
    this.position = 0;
  }

  uniform(): number {
    if (this.position === 1024) this.refill();
    return this.buffer[this.position++]!;
  }

  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let u: number, v: number, s: number;
    do {
      u = 2 * this.uniform() - 1;
      v = 2 * this.uniform() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    this.spare = v * f;
    this.hasSpare = true;
    return u * f;
  }

  gamma(shape: number): number {
    // Not recursive, so that the sampler below can be inlined into the simulation's loops.
    if (shape < 1) return this.gammaAtLeastOne(shape + 1) * Math.exp(Math.log(this.uniform()) * (1 / shape));
    return this.gammaAtLeastOne(shape);
  }

  gammas(out: Float64Array, count: number, shape: number, scale: number): void {
    // A loop inside the class: each draw lands in the typed array, not in a number boxed for a return (measured: a tenth of the forecast's time went to collecting those).
    if (shape < 1) {
      // The boost U^(1/shape) as exp(log U / shape): Math.pow took 100–120 ns here against 55–65 (measured),
      // and the default spread (shape 0.772) takes this branch for every site of every simulated study.
      const inverse = 1 / shape;
      for (let i = 0; i < count; i++) out[i] = this.gammaAtLeastOne(shape + 1) * Math.exp(Math.log(this.uniform()) * inverse) * scale;
    } else {
      for (let i = 0; i < count; i++) out[i] = this.gammaAtLeastOne(shape) * scale;
    }
  }

  private gammaAtLeastOne(shape: number): number {
    if (shape !== this.gammaShape) {
      this.gammaShape = shape;
      this.gammaD = shape - 1 / 3;
      this.gammaC = 1 / Math.sqrt(9 * this.gammaD);
    }
    const d = this.gammaD;
    const c = this.gammaC;
    for (;;) {
      let x: number, v: number;
      do {
        x = this.normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      const u = this.uniform();
      if (u < 1 - 0.0331 * x * x * x * x) return d * v;
      if (Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v;
    }
  }

  poisson(mean: number): number {
    if (mean <= 0) return 0;
    if (mean !== this.poissonMean) {
      this.poissonMean = mean;
      this.expMinusMean = Math.exp(-mean);
      this.slam = Math.sqrt(mean);
      this.loglam = Math.log(mean);
      this.pb = 0.931 + 2.53 * this.slam;
      this.pa = -0.059 + 0.02483 * this.pb;
      this.logInvalpha = Math.log(1.1239 + 1.1328 / (this.pb - 3.4));
      this.vr = 0.9277 - 3.6224 / (this.pb - 2);
    }
    if (mean < 10) {
      // Inversion: walk up the CDF.
      let k = 0;
      let p = this.expMinusMean;
      let cdf = p;
      const u = this.uniform();
      while (u > cdf && k < 1000) {
        k++;
        p *= mean / k;
        cdf += p;
      }
      return k;
    }
    const b = this.pb;
    const a = this.pa;
    for (;;) {
      const U = this.uniform() - 0.5;
      const V = this.uniform();
      const us = 0.5 - Math.abs(U);
      const k = Math.floor(((2 * a) / us + b) * U + mean + 0.43);
      if (us >= 0.07 && V <= this.vr) return k;
      if (k < 0 || (us < 0.013 && V > us)) continue;
      if (Math.log(V) + this.logInvalpha - Math.log(a / (us * us) + b) <= -mean + k * this.loglam - lgamma(k + 1)) return k;
    }
  }
}

export function seededRandom(seed: number): Random {
  return new SeededRandom(seed);
}
