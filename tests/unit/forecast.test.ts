/**
 * The recruitment forecast and assurance (lib/forecast), against the issue's reference values
 * (computed with R's F distribution and by numerical integration in R) and against this test's own
 * seeded simulations, which share no code with the product's samplers: gamma rates of shape 2 are
 * drawn here as the sum of two exponentials, and enrolment is simulated participant by participant.
 */
import { describe, expect, it } from "vitest";
import { jStat } from "@/lib/power/special";
import { solve } from "@/lib/power";
import { computeTimeline } from "@/lib/costing";
import { DEFAULT_RATE_SHAPE, forecastRecruitment, ForecastInputError, PUBLISHED_QUARTILES, shapeForQuartileRatio } from "@/lib/forecast/recruitment";
import { assurance, assuranceWithSd } from "@/lib/forecast/assurance";
import { favourablePower } from "@/lib/forecast/favourable-power";
import { seededRandom } from "@/lib/forecast/random";
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";
import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";

/** mulberry32: a small seeded generator, independent of the product's. */
function testRandom(seed: number) {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 1) / 4294967297;
  };
  const exponential = (mean: number) => -mean * Math.log(uniform());
  const normal = () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  return { uniform, exponential, normal };
}

/** Months from the study's start to the n-th enrolment, simulated participant by participant; rates of shape 2 around the mean. */
function simulateFinish(n: number, mean: number, starts: number[], runs: number, seed: number): number[] {
  const rng = testRandom(seed);
  const sorted = [...starts].sort((a, b) => a - b);
  const out: number[] = [];
  for (let r = 0; r < runs; r++) {
    const rates = sorted.map(() => rng.exponential(mean / 2) + rng.exponential(mean / 2));
    let t = sorted[0]!;
    let open = 0;
    let rate = 0;
    let enrolled = 0;
    while (enrolled < n) {
      while (open < sorted.length && sorted[open]! <= t) rate += rates[open++]!;
      const gap = rng.exponential(1 / rate);
      const next = sorted[open];
      // Memoryless: if a site opens before the next arrival, move to its opening and draw again.
      if (next !== undefined && t + gap > next) {
        t = next;
        continue;
      }
      t += gap;
      enrolled++;
    }
    out.push(t);
  }
  return out.sort((a, b) => a - b);
}

const share = (sorted: number[], month: number) => sorted.filter((t) => t <= month).length / sorted.length;
const median = (sorted: number[]) => sorted[Math.floor(sorted.length / 2)]!;

describe("recruitment forecast: 20 sites open from month 0, shape 2, mean 0.92 a month, 400 participants (issue's values from R's F distribution)", () => {
  const input = { target: 400, ratePerSiteMonth: 0.92, activationMonths: Array<number>(20).fill(0), rateShape: 2, deadlines: { enrolment: 24 } };
  const f = forecastRecruitment(input);

  it("the plan at the mean rate takes 400 / (20 × 0.92) = 21.74 months", () => {
    expect(f.plannedMonths).toBeCloseTo(21.739, 3);
  });
  it("closed form, to three decimals: P(finish within 24 months) = 0.706, median 21.90, 90th percentile 27.28", () => {
    expect(f.method).toMatch(/closed form/);
    expect(f.probability.byEnrolmentDeadline).toBeCloseTo(0.706, 3);
    expect(f.monthsToEnrol.median).toBeCloseTo(21.9, 2);
    expect(f.monthsToEnrol.p90).toBeCloseTo(27.28, 2);
    // The same by R: 21.739 × qf(c(.5, .9), 800, 80), checked here with jStat's F distribution.
    expect(f.monthsToEnrol.p90).toBeCloseTo((400 / 18.4) * jStat.centralF.inv(0.9, 800, 80), 6);
  });
  it("this test's own simulation (4,000 runs, participant by participant) agrees within three standard errors", () => {
    const times = simulateFinish(400, 0.92, input.activationMonths, 4000, 11);
    const p = share(times, 24);
    const se = Math.sqrt((0.706 * 0.294) / times.length);
    expect(Math.abs(p - f.probability.byEnrolmentDeadline)).toBeLessThan(3 * se);
    expect(Math.abs(median(times) - f.monthsToEnrol.median)).toBeLessThan(0.35);
  });
  it("the product's own simulation (used when sites are staggered) agrees with the closed form within three standard errors", () => {
    const nearlyTogether = forecastRecruitment({ ...input, activationMonths: input.activationMonths.map((_, i) => i * 1e-9) });
    expect(nearlyTogether.method).toMatch(/simulation of 5,000/);
    const se = Math.sqrt((0.706 * 0.294) / 5000);
    expect(Math.abs(nearlyTogether.probability.byEnrolmentDeadline - f.probability.byEnrolmentDeadline)).toBeLessThan(3 * se);
    expect(Math.abs(nearlyTogether.monthsToEnrol.p90 - f.monthsToEnrol.p90)).toBeLessThan(0.3);
  });
});

describe("recruitment forecast with staggered sites (no closed form): the product's simulation against this test's", () => {
  const starts = Array.from({ length: 12 }, (_, i) => 4 + 2 * i);
  const input = { target: 300, ratePerSiteMonth: 1.5, activationMonths: starts, rateShape: 2, deadlines: { enrolment: 30, funded: 34 } };
  const f = forecastRecruitment(input);
  const times = simulateFinish(300, 1.5, starts, 4000, 29);

  it("probability of finishing by each deadline, within three combined standard errors", () => {
    for (const [deadline, p] of [
      [30, f.probability.byEnrolmentDeadline],
      [34, f.probability.byFundedEnd!],
    ] as const) {
      const mine = share(times, deadline);
      const se = Math.sqrt((mine * (1 - mine)) / times.length + (p * (1 - p)) / 5000) || 0.01;
      expect(Math.abs(mine - p)).toBeLessThan(3 * se);
    }
  });
  it("the median month agrees, and the percentiles are in order", () => {
    expect(Math.abs(median(times) - f.finishMonth.median)).toBeLessThan(0.4);
    expect(f.finishMonth.median).toBeLessThan(f.finishMonth.p80);
    expect(f.finishMonth.p80).toBeLessThan(f.finishMonth.p90);
    expect(f.monthsToEnrol.median).toBeCloseTo(f.finishMonth.median - 4, 9);
  });
  it("the milestone table: the plan as the timeline floors it, inside a 10–90 % band that ends at the target", () => {
    const tl = computeTimeline({ sites: 12, startupMonths: 4, staggerMonths: 2, ratePerSiteMonth: 1.5, closeoutMonths: 0 }, 300, 0, "2027-01-01");
    let cumulative = 0;
    tl.enrolledByMonth.forEach((k, m) => {
      cumulative += k;
      expect(f.milestones[m]!.planned).toBe(cumulative);
    });
    for (const row of f.milestones) {
      expect(row.low).toBeLessThanOrEqual(row.median);
      expect(row.median).toBeLessThanOrEqual(row.high);
      expect(row.high).toBeLessThanOrEqual(300);
    }
    expect(f.milestones.at(-1)!.high).toBe(300);
  });
  it("the same inputs give the same forecast (seeded)", () => {
    expect(forecastRecruitment(input)).toEqual(f);
  });
});

describe("recruitment forecast: defaults and bad input", () => {
  it(`the default spread is the gamma shape whose quartiles are in the ratio of ${PUBLISHED_QUARTILES.source}'s (2.79 / 0.43)`, () => {
    const ratio = jStat.gamma.inv(0.75, DEFAULT_RATE_SHAPE, 1) / jStat.gamma.inv(0.25, DEFAULT_RATE_SHAPE, 1);
    expect(ratio).toBeCloseTo(2.79 / 0.43, 1);
    expect(shapeForQuartileRatio(2.79 / 0.43)).toBeCloseTo(DEFAULT_RATE_SHAPE, 3);
  });
  it("refuses input it cannot forecast, naming the field", () => {
    const ok = { target: 100, ratePerSiteMonth: 1, activationMonths: [0], rateShape: 2, deadlines: { enrolment: 12 } };
    expect(() => forecastRecruitment({ ...ok, target: 0 })).toThrow(ForecastInputError);
    expect(() => forecastRecruitment({ ...ok, ratePerSiteMonth: 0 })).toThrow(/Enrolled per site per month/);
    expect(() => forecastRecruitment({ ...ok, activationMonths: [] })).toThrow(/Sites/);
    expect(() => forecastRecruitment({ ...ok, rateShape: Number.NaN })).toThrow(/Uncertainty/);
    expect(() => forecastRecruitment({ ...ok, target: 1_000_000, ratePerSiteMonth: 0.01 })).toThrow(/more than 1200 months/);
  });
});

describe("the product's samplers (moments of 200,000 draws: mean and variance within 2 %)", () => {
  const r = seededRandom(3);
  for (const shape of [0.5, 2, 400]) {
    it(`gamma, shape ${shape}: mean and variance ${shape}`, () => {
      let s = 0;
      let s2 = 0;
      for (let i = 0; i < 200000; i++) {
        const x = r.gamma(shape);
        s += x;
        s2 += x * x;
      }
      const m = s / 200000;
      expect(m / shape).toBeCloseTo(1, 1);
      expect((s2 / 200000 - m * m) / shape).toBeGreaterThan(0.98);
      expect((s2 / 200000 - m * m) / shape).toBeLessThan(1.02);
    });
  }
  for (const mean of [3, 18, 250]) {
    it(`Poisson, mean ${mean}: mean and variance ${mean}`, () => {
      let s = 0;
      let s2 = 0;
      for (let i = 0; i < 200000; i++) {
        const x = r.poisson(mean);
        s += x;
        s2 += x * x;
      }
      const m = s / 200000;
      expect(Math.abs(m / mean - 1)).toBeLessThan(0.02);
      expect(Math.abs((s2 / 200000 - m * m) / mean - 1)).toBeLessThan(0.02);
    });
  }
});

describe("assurance: prior N(0.5, 0.2²) on d, 86 per group, two-sided 0.05, success = significant in the new treatment's favour (issue's values, R numerical integration)", () => {
  const result = solve({ design: "two-means", effectSize: 0.5, n1: 86 });
  const exact = favourablePower(result)!;
  const normal = favourablePower(result, "normal")!;
  const prior = { mean: 0.5, sd: 0.2 };

  it("exact t: power 0.903 at d = 0.5, assurance 0.786", () => {
    expect(exact.powerAt(0.5)).toBeCloseTo(0.903, 3);
    expect(assurance(exact.powerAt, prior)).toBeCloseTo(0.786, 3);
  });
  it("normal approximation: power 0.906, assurance 0.788, and the closed form Φ((m√(n/2) − z) / √(1 + s²n/2)) to six decimals", () => {
    expect(normal.powerAt(0.5)).toBeCloseTo(0.906, 3);
    const a = assurance(normal.powerAt, prior);
    expect(a).toBeCloseTo(0.788, 3);
    const k = Math.sqrt(43);
    expect(a).toBeCloseTo(jStat.normal.cdf((0.5 * k - jStat.normal.inv(0.975, 0, 1)) / Math.sqrt(1 + 0.04 * 43), 0, 1), 6);
  });
  it("this test's simulation of 4,000 trials (d from the prior, 86 + 86 normal outcomes, Student's t test) agrees within three standard errors", () => {
    const rng = testRandom(5);
    const crit = jStat.studentt.inv(0.975, 170);
    let wins = 0;
    const trials = 4000;
    for (let i = 0; i < trials; i++) {
      const d = 0.5 + 0.2 * rng.normal();
      let sa = 0, sa2 = 0, sb = 0, sb2 = 0;
      for (let j = 0; j < 86; j++) {
        const a = rng.normal() + d;
        const b = rng.normal();
        sa += a; sa2 += a * a; sb += b; sb2 += b * b;
      }
      const ma = sa / 86;
      const mb = sb / 86;
      const pooled = (sa2 - 86 * ma * ma + sb2 - 86 * mb * mb) / 170;
      if ((ma - mb) / Math.sqrt(pooled * (2 / 86)) > crit) wins++;
    }
    const se = Math.sqrt((0.786 * 0.214) / trials);
    expect(Math.abs(wins / trials - assurance(exact.powerAt, prior))).toBeLessThan(3 * se);
  });
  it("a prior with no spread gives the power; the wrong direction never counts as success", () => {
    expect(assurance(exact.powerAt, { mean: 0.5, sd: 0 })).toBeCloseTo(exact.powerAt(0.5), 12);
    expect(assurance(exact.powerAt, { mean: -0.5, sd: 0.01 })).toBeLessThan(1e-6);
  });
  it("an uncertain SD: a pilot with many degrees of freedom gives the known-SD answer; a small pilot lowers a high assurance", () => {
    const known = assurance((delta) => exact.powerAt(delta / 10), { mean: 5, sd: 2 });
    expect(assuranceWithSd(exact.powerAt, { mean: 5, sd: 2 }, { estimate: 10, df: 100000 })).toBeCloseTo(known, 3);
    expect(assuranceWithSd(exact.powerAt, { mean: 5, sd: 2 }, { estimate: 10, df: 10 })).toBeLessThan(known);
  });
});

describe("power in the favourable direction equals the engine's one-sided power at the planned effect, for every design", () => {
  const cases = [
    { design: "two-means", effectSize: 0.4, n1: 80, sides: 1 },
    { design: "one-mean", effectSize: 0.3, n1: 60, sides: 1 },
    { design: "two-proportions", p1: 0.3, p2: 0.45, n1: 150, sides: 1 },
    { design: "two-proportions", p1: 0.45, p2: 0.3, n1: 150, sides: 1 },
    { design: "cluster-two-means", effectSize: 0.3, clustersPerArm: 12, clusterSize: 20, icc: 0.05, sides: 1 },
    { design: "cluster-two-proportions", p1: 0.3, p2: 0.4, clustersPerArm: 15, clusterSize: 25, icc: 0.02, sides: 1 },
    { design: "time-to-event", hazardRatio: 0.7, n1: 200, controlMedian: 12, accrualMonths: 24, followUpMonths: 12, sides: 1 },
  ] as const;
  for (const c of cases) {
    it(c.design + (c.design === "two-proportions" ? ` (p2 ${c.p2})` : ""), () => {
      const result = solve(c as never);
      const fp = favourablePower(result)!;
      const effect = fp.unit === "d" ? result.effectSize! : fp.unit === "p2" ? result.p2! : Math.log(result.hazardRatio!);
      expect(fp.powerAt(effect)).toBeCloseTo(result.power, 6);
    });
  }
});

describe("a scenario's forecast and the cost of a slow enrolment (demo scenario 'Six sites, 90% power')", async () => {
  const { computeScenario } = await import("@/lib/planning/compute");
  const { forecastScenario } = await import("@/lib/planning/forecast");
  const { DEMO_SCENARIOS, demoRateBook } = await import("../../scripts/demo-data");
  const rates = demoRateBook(1);
  const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };
  const scenario = DEMO_SCENARIOS.find((s) => s.name === "Six sites, 90% power")!;
  const results = computeScenario(scenario.inputs, rates, study);
  const f = forecastScenario(scenario.inputs, results, rates, study, { rateShape: 2, fundedMonths: 60 });

  it("forecasts the enrolled number on the plan's sites and schedule, with the plan's deadline", () => {
    expect(f.plannedMonths).toBeGreaterThan(results.ledger.timeline.monthsToEnrol - 1);
    expect(f.plannedMonths).toBeLessThanOrEqual(results.ledger.timeline.monthsToEnrol);
    expect(f.deadlines.enrolment).toBe(results.ledger.timeline.lastEnrolmentMonth + 1);
    expect(f.milestones.at(-1)!.planned).toBe(results.power.funnel.total.enrolled);
    expect(f.shapeSource).toBe("the investigator's choice");
  });
  it("re-costs the plan at the 80th and 90th percentiles' months; the changed lines (F&A included) add up to the total's difference", () => {
    for (const slow of f.slowEnd) {
      if (slow.kind !== "costed") throw new Error(`the ${slow.percentile}th percentile was not costed`);
      const months = slow.percentile === 80 ? f.monthsToEnrol.p80 : f.monthsToEnrol.p90;
      // Costed at the slowest rate whose timeline takes the percentile's months rounded up (47.9 → 48), not 47 by a ratio of rates.
      expect(slow.monthsToEnrol).toBe(Math.ceil(months));
      const sum = slow.lines.reduce((a, l) => a + Math.round(Number(l.difference) * 100), 0);
      expect(sum).toBe(Math.round(Number(slow.difference) * 100));
      expect(Number(slow.difference)).toBeGreaterThan(0);
    }
    const [p80, p90] = f.slowEnd;
    expect(p80?.kind === "costed" && p90?.kind === "costed" && Number(p90.difference) > Number(p80.difference)).toBe(true);
  });
  it("one site with the widest spread the page takes (CV 500%): every percentile is a number (at most the 12,000-month ceiling), so nothing reaches the page as null", () => {
    const one = forecastRecruitment({ target: 216, ratePerSiteMonth: 20, activationMonths: [4], rateShape: 1 / 25, deadlines: { enrolment: 16, funded: null } });
    const back = JSON.parse(JSON.stringify(one)) as typeof one;
    for (const m of [back.monthsToEnrol.median, back.monthsToEnrol.p80, back.monthsToEnrol.p90]) {
      expect(typeof m).toBe("number");
      expect(m).toBeLessThanOrEqual(12_000);
    }
    expect(back.monthsToEnrol.p90).toBe(12_000);
  });
  it("a spread of rates too wide to plan (a CV of 500%, the largest the page takes) says so instead of failing, and costs nothing it cannot plan", () => {
    const wide = forecastScenario(scenario.inputs, results, rates, study, { rateSpread: 5 });
    const p90 = wide.slowEnd.find((x) => x.percentile === 90)!;
    expect(p90.kind).toBe("beyond");
    if (p90.kind === "beyond") expect(p90.reason).toMatch(/^At the 90th percentile enrolment would take (about [\d,]+ months|over 12,000 months), longer than the 1,200 months a budget can be planned over/);
    expect(Number.isFinite(wide.probability.byEnrolmentDeadline)).toBe(true);
  });
});

describe("assurance in the scenario: stored with its prior, quoted in the justification only when asked, and watched by the stale-text guard", async () => {
  const { computeScenario } = await import("@/lib/planning/compute");
  const { generateJustification } = await import("@/lib/planning/justification");
  const { justificationFigures } = await import("@/lib/planning/justification-figures");
  const { scenarioInputsSchema } = await import("@/lib/planning/schema");
  const { DEMO_SCENARIOS, demoRateBook } = await import("../../scripts/demo-data");
  const rates = demoRateBook(1);
  const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };
  const base = DEMO_SCENARIOS.find((s) => s.inputs.design.design === "two-means")!.inputs;
  const withPrior = (inJustification: boolean, sd = 0.1) =>
    scenarioInputsSchema.parse({ ...base, uncertainty: { rateSpread: "60%", effectPrior: { mean: String(base.design.effectSize ?? 0.5), sd: String(sd), source: "the pilot trial's interval", inJustification: inJustification ? "on" : "" } } });

  it("the form's values (a percentage, strings, a checkbox's 'on') become numbers and a flag", () => {
    const inputs = withPrior(true);
    expect(inputs.uncertainty!.rateSpread).toBe(0.6);
    expect(inputs.uncertainty!.effectPrior).toMatchObject({ sd: 0.1, inJustification: true });
  });
  it("half a prior is refused, naming the empty field; an empty one is no prior", () => {
    const half = scenarioInputsSchema.safeParse({ ...base, uncertainty: { effectPrior: { mean: "0.4", sd: "", source: "" } } });
    expect(half.success).toBe(false);
    expect(half.error!.issues.map((x) => x.message).join(" ")).toMatch(/Uncertainty of the effect \(SD\): type how uncertain/);
    expect(scenarioInputsSchema.safeParse({ ...base, uncertainty: { effectPrior: { mean: "", sd: "", source: "" } } }).success).toBe(true);
  });
  it("the justification quotes the assurance only when asked, and the figures the guard watches include it", () => {
    const quiet = withPrior(false);
    const loud = withPrior(true);
    const r = computeScenario(loud, rates, study);
    expect(generateJustification(quiet, computeScenario(quiet, rates, study), study)).not.toMatch(/assurance/);
    const text = generateJustification(loud, r, study);
    expect(text).toMatch(/the probability that the study succeeds \(assurance; O'Hagan, Stevens and Campbell 2005\) is 0\.\d+/);
    const a = justificationFigures(loud, r, study).find((x) => x.key === "assurance")!;
    const wider = justificationFigures(withPrior(true, 0.3), r, study).find((x) => x.key === "assurance")!;
    expect(a.value).not.toBe(wider.value);
  });
});

describe("the product's uniforms are pure-rand's", () => {
  // lib/forecast/random.ts inlines xoroshiro128+ and uniformFloat64 for speed: the stream must stay pure-rand's, bit for bit.
  it("equals xoroshiro128plus with uniformFloat64, draw for draw, for several seeds", () => {
    for (const seed of [0, 1, 3, 20071, -5, 2 ** 31 - 1]) {
      const ours = seededRandom(seed);
      const rng = xoroshiro128plus(seed);
      for (let i = 0; i < 20000; i++) {
        let u = uniformFloat64(rng);
        while (u === 0) u = uniformFloat64(rng);
        expect(ours.uniform()).toBe(u);
      }
    }
  });
});
