/**
 * The F&A terms a study is costed with: the rate agreement's on-campus or off-campus rate (the study
 * chooses; the rate book holds both), limited by the sponsor's own F&A rule where it has one: a fixed
 * percentage of the base (the lower of it and the agreement's rate applies), and categories of cost
 * on which the sponsor pays no F&A (left out of the base). Common practice for sponsors that limit
 * indirect costs (foundations, some federal programmes); the rate agreement itself is the ceiling.
 */
import { D } from "./money";
import { CostingError } from "./errors";
import type { CostCategory, CostInputs, FaLocation, RateBook } from "./types";

export type FaTerms = {
  /** The rate applied to the base. */
  rate: string;
  /** The rate agreement's rate for the chosen location, before the sponsor's limit. */
  agreementRate: string;
  location: FaLocation;
  /** The sponsor's limit, when it has one and it is lower than the agreement's rate. */
  limitedTo: string | null;
  /** Categories left out of the base because the sponsor pays no F&A on them. */
  excluded: CostCategory[];
};

export function faTerms(inputs: Pick<CostInputs, "faLocation" | "caps">, rates: Pick<RateBook, "faRate" | "faRateOffCampus" | "label">): FaTerms {
  const location = inputs.faLocation ?? "on-campus";
  const agreementRate = location === "off-campus" ? rates.faRateOffCampus : rates.faRate;
  if (agreementRate === undefined || agreementRate === null || agreementRate === "") {
    const edition = rates.label ? `the rate book's edition "${rates.label}"` : "the rate book";
    throw new CostingError(`The study is costed at the off-campus F&A rate, but ${edition} has none. Ask the grants office to add it, or choose the on-campus rate in the study's settings.`);
  }
  const cap = inputs.caps?.faCap;
  const limit = cap?.rate !== undefined && cap?.rate !== null && cap.rate !== "" ? new D(cap.rate) : null;
  const limited = limit !== null && limit.lessThan(agreementRate);
  return {
    rate: limited ? limit.toString() : agreementRate,
    agreementRate,
    location,
    limitedTo: limited ? limit.toString() : null,
    excluded: [...(cap?.excluded ?? [])],
  };
}
