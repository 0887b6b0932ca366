import { describe, expect, it } from "vitest";
import { buildRequest } from "@/components/power-calculator";

describe("the calculator's request", () => {
  it("takes shares typed as the percentages pages show (90% power, 5% alpha, 10% attrition)", () => {
    const body = buildRequest("two-means", "n", "d", { alpha: "5%", sides: "2", power: "90%", attrition: "10%", screenFailure: "0.3", effectSize: "0.5" });
    expect(body).toMatchObject({ design: "two-means", alpha: 0.05, power: 0.9, attrition: 0.1, screenFailure: 0.3, effectSize: 0.5 });
  });
  it("leaves text that is not a number for the server to name beside its field", () => {
    expect(buildRequest("two-means", "n", "d", { alpha: "abc", power: "0.8", effectSize: "0.5" }).alpha).toBe("abc");
  });
});
