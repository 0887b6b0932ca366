/**
 * The forecast's default spread of enrolment rates between sites, from published data: recruitment
 * per site per month had median 0.92 and interquartile range 0.43–2.79 in Walters et al. (2017),
 * BMJ Open 7:e015276. The default gamma shape is the one whose quartiles are in that ratio
 * (2.79 / 0.43): 0.772, a coefficient of variation of about 114 % (checked in tests/unit/forecast.test.ts
 * against `shapeForQuartileRatio`). Kept in its own file so that pages can quote it without loading the simulation.
 */
export const PUBLISHED_QUARTILES = { median: 0.92, q1: 0.43, q3: 2.79, source: "Walters et al. (2017), BMJ Open 7:e015276" } as const;

export const DEFAULT_RATE_SHAPE = 0.772;

/** The same spread as a coefficient of variation of sites' rates: 1 / √shape. */
export const DEFAULT_RATE_SPREAD = 1 / Math.sqrt(DEFAULT_RATE_SHAPE);

/**
 * The longest time to enrol the forecast reports: 12,000 months (a thousand years). With a very wide
 * spread and few sites the percentiles have no useful size (the F distribution with under one degree
 * of freedom in its denominator has no mean), so they are reported as at least this, in words.
 */
export const MONTHS_CEILING = 12_000;

/** Months to enrol as a figure: "47.9", or "over 12,000" at the ceiling. */
export function monthsFigure(m: number): string {
  return m >= MONTHS_CEILING ? `over ${MONTHS_CEILING.toLocaleString("en-US")}` : m.toFixed(1);
}

/** The same with its unit: "47.9 months". */
export const monthsWords = (m: number): string => `${monthsFigure(m)} months`;
