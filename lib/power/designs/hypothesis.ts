/**
 * What the analysis claims. Superiority tests for any difference (one- or two-sided); non-inferiority
 * is one-sided at alpha against H0: difference ≤ −margin; equivalence is two one-sided tests, each at
 * alpha, against H0: |difference| ≥ margin (Schuirmann 1987). Under a margin the effect is the
 * expected true difference (positive favours the new treatment) and may be 0 or negative.
 */
export const HYPOTHESES = ["superiority", "non-inferiority", "equivalence"] as const;
export type Hypothesis = (typeof HYPOTHESES)[number];

export type HypothesisTest = { hypothesis: Hypothesis; margin: number };

export const HYPOTHESIS_NAMES: Record<Hypothesis, string> = {
  superiority: "Superiority",
  "non-inferiority": "Non-inferiority",
  equivalence: "Equivalence",
};

export const hasMargin = (h: Hypothesis | undefined): h is "non-inferiority" | "equivalence" => h === "non-inferiority" || h === "equivalence";

/** Several arms against one control: no adjustment, Bonferroni (alpha / k), or Dunnett's critical value. */
export const MULTIPLICITY = ["none", "bonferroni", "dunnett"] as const;
export type Multiplicity = (typeof MULTIPLICITY)[number];
