/**
 * How each site is paid (DESIGN.md, "Site arrangement"): internal (the institution's own lines),
 * subaward (a subrecipient, 2 CFR 200.331: one consortium line with its own indirects), or contract
 * (a vendor paid per participant and visit under a services contract, wholly in MTDC).
 */
import { DE_MINIMIS_RATE, FOREIGN_FA_LIMIT, type CostInputs, type SiteArrangement } from "./types";
import { D } from "./money";

export type SiteTermsResolved = { index: number; arrangement: SiteArrangement; indirectRate: string; foreign: boolean };

// rate > limit in exact decimals, remembered: the reach curve asks the same for every point it prices.
const aboveMemo = new Map<string, boolean>();
function above(rate: string, limit: string): boolean {
  const key = `${rate}|${limit}`;
  let v = aboveMemo.get(key);
  if (v === undefined) {
    if (aboveMemo.size > 1000) aboveMemo.clear();
    aboveMemo.set(key, (v = new D(rate).greaterThan(limit)));
  }
  return v;
}

/** Each enrolling site's terms: its own, else the study's default arrangement (internal when none). */
export function siteTerms(inputs: Pick<CostInputs, "siteArrangement" | "sites" | "foreignFaLimit">, sites: number): SiteTermsResolved[] {
  const limit = inputs.foreignFaLimit === undefined ? FOREIGN_FA_LIMIT : inputs.foreignFaLimit;
  return Array.from({ length: sites }, (_, index) => {
    const own = inputs.sites?.[index];
    const arrangement = own?.arrangement ?? inputs.siteArrangement ?? "internal";
    const foreign = own?.foreign === true;
    let rate = own?.indirectRate ?? DE_MINIMIS_RATE;
    // NIH Grants Policy Statement 16.6: a foreign subaward's indirects at most 8% of its own base, where the sponsor says so.
    if (foreign && limit !== null && above(rate, limit)) rate = limit;
    return { index, arrangement, indirectRate: arrangement === "subaward" ? rate : "0", foreign };
  });
}
