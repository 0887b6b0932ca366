import { describe, expect, it } from "vitest";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import { validDemoInputs } from "@/scripts/seed";
import { scenarioInputsSchema } from "@/lib/planning/schema";

describe("the demo seed stores only states a user could save", () => {
  it.each(DEMO_SCENARIOS.map((s) => [s.name, s] as const))("%s passes the scenario schema unchanged", (_name, s) => {
    // Unchanged: nothing the schema would drop or default is stored by the seed alone.
    expect(validDemoInputs(s.name, s.inputs)).toEqual(s.inputs);
  });
  it("refuses a demo scenario the schema refuses, naming it and the field", () => {
    const bad = { ...DEMO_SCENARIOS[0]!.inputs, recruitment: { ...DEMO_SCENARIOS[0]!.inputs.recruitment, attrition: 1.5 } };
    expect(() => validDemoInputs("Broken", bad)).toThrow(/Demo scenario "Broken".*recruitment\.attrition: Attrition: from 0 to below 1, like 0\.35 or 35%\./);
    expect(scenarioInputsSchema.safeParse(bad).success).toBe(false);
  });
});
