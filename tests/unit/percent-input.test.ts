import { describe, expect, it } from "vitest";
import { percentToShare } from "@/lib/format/percent-input";

describe("a share typed as a percentage", () => {
  it("shifts the decimal point two places without float rounding", () => {
    expect(percentToShare("56.5%")).toBe("0.565");
    expect(percentToShare(" 56.5 % ")).toBe("0.565");
    expect(percentToShare("7.25%")).toBe("0.0725");
    expect(percentToShare("10%")).toBe("0.1");
    expect(percentToShare(".5%")).toBe("0.005");
    expect(percentToShare("100%")).toBe("1");
    expect(percentToShare("0%")).toBe("0");
  });
  it("leaves a fraction, a number and text that is not a percentage alone", () => {
    expect(percentToShare("0.565")).toBe("0.565");
    expect(percentToShare(0.2)).toBe(0.2);
    expect(percentToShare("abc%")).toBe("abc%");
  });
});
