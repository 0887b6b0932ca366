import { describe, expect, it } from "vitest";
import { computeScenario } from "@/lib/planning/compute";
import { generateJustification } from "@/lib/planning/justification";
import { scenarioTemplate } from "@/lib/planning/templates";
import { demoRateBook } from "@/scripts/demo-data";

describe("a justification written from a template", () => {
  it("never quotes the template's example words as the study's own", () => {
    const inputs = scenarioTemplate("two-proportions");
    const study = { startDate: "2027-07-01", sponsorCap: null };
    const text = generateJustification(inputs, computeScenario(inputs, demoRateBook(1), study), study);
    expect(text).not.toMatch(/Example:/);
    expect(text).toContain("[the primary outcome: the template's example is still in place]");
  });
});
