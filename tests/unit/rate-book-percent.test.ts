import { describe, expect, it } from "vitest";
import { rateField, SETTING_BY_KEY, settingSchema } from "@/lib/rate-book/fields";
import { parseRateSheet } from "@/lib/rate-book/sheet";

// Rates are shown as percentages (lib/format/rates.ts), so they may be typed as them; stored as shares.
describe("rates typed as percentages in the rate book", () => {
  const fa = settingSchema(SETTING_BY_KEY.get("faRate")!);
  it("a percentage is stored as its share, exactly", () => {
    expect(fa.parse("56.5%")).toBe("0.565");
    expect(fa.parse(" 57.5 % ")).toBe("0.575");
    expect(fa.parse("100%")).toBe("1");
    expect(rateField("Fringe rate").parse("28.5%")).toBe("0.285");
    expect(rateField("Fringe rate").parse("8.125%")).toBe("0.08125");
  });
  it("a share is still accepted as before", () => {
    expect(fa.parse("0.565")).toBe("0.565");
    expect(fa.parse(0.2)).toBe("0.2");
  });
  it("a number above 1 without a % sign is refused with what to type", () => {
    const r = fa.safeParse("57.5");
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.message).toBe("F&A rate: from 0% to 100%; type a percentage like 57.5% or a share like 0.575.");
    expect(fa.safeParse("120%").success).toBe(false);
    expect(fa.safeParse("-5%").error!.issues[0]!.message).toMatch(/^F&A rate: enter a percentage like 56\.5%/);
    // "150%" typed with its sign: the allowed range, and one message; "ten": one message, not a range as well.
    expect(fa.safeParse("150%").error!.issues.map((x) => x.message)).toEqual(["F&A rate: from 0% to 100%; type a percentage like 57.5% or a share like 0.575."]);
    expect(fa.safeParse("ten").error!.issues).toHaveLength(1);
    expect(fa.safeParse("12.34567%").success).toBe(false); // more than 4 decimals as a percentage
  });
  it("rate sheets accept percentages too", async () => {
    const csv = ["section,key,name,value,category", "setting,faRate,,56.5%,", "fringe,faculty,,28.5 %,", "setting,escalationCosts,,0.03,"].join("\n");
    const sheet = await parseRateSheet(Buffer.from(csv));
    expect(sheet.errors).toEqual([]);
    expect(sheet.rows.map((r) => [r.key, r.value])).toEqual([
      ["faRate", "0.565"],
      ["faculty", "0.285"],
      ["escalationCosts", "0.03"],
    ]);
  });
});
