import { describe, expect, it } from "vitest";
import { DESIGNS } from "@/lib/power";
import { DESIGN_NAMES, designName } from "@/lib/power/design-names";
import { effectUnit, effectUnitOfDesign, formatEffect, sameUnit } from "@/lib/power/effect-units";

describe("an effect shown with its unit", () => {
  it("writes each unit as a person reads it", () => {
    expect(formatEffect("effectSize", 0.5671)).toBe("d = 0.567");
    expect(formatEffect("p2", 0.55)).toBe("p2 = 0.550 (proportion)");
    expect(formatEffect("hazardRatio", 1.5)).toBe("HR 1.500");
    expect(formatEffect("hazardRatio", 0.7184, 2)).toBe("HR 0.72");
    expect(formatEffect("effectSize", 0.567, 2)).toBe("d = 0.57");
  });
  it("shows a dash, never NaN, for a value that is not a number", () => {
    expect(formatEffect("effectSize", Number.NaN)).toBe("—");
    expect(formatEffect("p2", null)).toBe("—");
    expect(formatEffect("hazardRatio", undefined)).toBe("—");
    expect(formatEffect("p2", Number.POSITIVE_INFINITY)).toBe("—");
  });
  it("knows each design's unit: means in d, proportions as p2, time to event as a hazard ratio", () => {
    expect(effectUnitOfDesign("two-means").symbol).toBe("d");
    expect(effectUnitOfDesign("one-mean").symbol).toBe("d");
    expect(effectUnitOfDesign("cluster-two-means").symbol).toBe("d");
    expect(effectUnitOfDesign("two-proportions").symbol).toBe("p2");
    expect(effectUnitOfDesign("cluster-two-proportions").symbol).toBe("p2");
    expect(effectUnitOfDesign("time-to-event").symbol).toBe("HR");
    expect(effectUnit("something-else").name).toBe("effectSize");
  });
  it("tells whether effects may share one axis", () => {
    expect(sameUnit([])).toBe(true);
    expect(sameUnit(["effectSize", "effectSize"])).toBe(true);
    expect(sameUnit(["effectSize", "p2"])).toBe(false);
    expect(sameUnit(["p2", "hazardRatio"])).toBe(false);
  });
});

describe("design names", () => {
  it("every design has a name a person reads, never its identifier", () => {
    for (const d of DESIGNS) {
      expect(designName(d)).toBe(DESIGN_NAMES[d]);
      expect(designName(d)).not.toBe(d);
    }
    expect(designName("two-means")).toBe("Two independent means");
  });
});
