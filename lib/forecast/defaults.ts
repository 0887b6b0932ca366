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
