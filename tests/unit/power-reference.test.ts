/**
 * Every row of tests/fixtures/power-reference.csv, computed with R 4.2.2's stats package
 * (pt/qt noncentral and central t for the t-test designs; power.prop.test for two proportions).
 * Agreement asked: n exactly (off by one only where the power sits within 1e-6 of the target),
 * power within 1e-6, the effect within 1e-5 relative.
 */
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { solve } from "@/lib/power";

type Row = {
  solve: "n" | "power" | "effectSize";
  design: "two-means" | "one-mean" | "two-proportions";
  alpha: number;
  sides: 1 | 2;
  allocationRatio: number | null;
  effectSize: number | null;
  p1: number | null;
  p2: number | null;
  targetPower: number | null;
  n1: number;
  n2: number | null;
  power: number;
};

const text = fs.readFileSync(path.join(__dirname, "../fixtures/power-reference.csv"), "utf8").trim().split("\n");
const header = text[0]!.split(",").map((h) => h.replace(/"/g, ""));
const rows: Row[] = text.slice(1).map((line) => {
  const cells = line.split(",").map((c) => c.replace(/"/g, ""));
  const o: Record<string, string | number | null> = {};
  header.forEach((h, i) => {
    const c = cells[i] ?? "";
    o[h] = c === "" ? null : h === "solve" || h === "design" ? c : Number(c);
  });
  return o as unknown as Row;
});

function inputOf(r: Row): Record<string, unknown> {
  const base: Record<string, unknown> = { design: r.design, alpha: r.alpha, sides: r.sides };
  if (r.design !== "one-mean") base.allocationRatio = r.allocationRatio ?? 1;
  if (r.design === "two-proportions") base.p1 = r.p1;
  const effect = r.design === "two-proportions" ? { p2: r.p2 } : { effectSize: r.effectSize };
  if (r.solve === "n") return { ...base, ...effect, power: r.targetPower };
  if (r.solve === "power") return { ...base, ...effect, n1: r.n1, ...(r.n2 !== null && r.design !== "one-mean" ? { n2: r.n2 } : {}) };
  return { ...base, n1: r.n1, ...(r.n2 !== null && r.design !== "one-mean" ? { n2: r.n2 } : {}), power: r.targetPower };
}

describe("power engine against R 4.2.2 stats package (tests/fixtures/power-reference.csv)", () => {
  it("has all 1,112 rows", () => expect(rows.length).toBe(1112));

  for (const kind of ["n", "power", "effectSize"] as const) {
    it(`solves every '${kind}' row`, () => {
      let checked = 0;
      for (const r of rows.filter((x) => x.solve === kind)) {
        const res = solve(inputOf(r));
        const label = JSON.stringify(r);
        if (kind === "n") {
          if (res.n1 !== r.n1) {
            // Allowed only where the reference power sits within 1e-6 of the target.
            expect(Math.abs(res.n1 - r.n1), label).toBe(1);
            expect(Math.abs(r.power - r.targetPower!), label).toBeLessThan(1e-6);
          } else {
            expect(res.n2, label).toBe(r.n2);
            expect(Math.abs(res.power - r.power), label).toBeLessThan(1e-6);
          }
        } else if (kind === "power") {
          expect(Math.abs(res.power - r.power), label).toBeLessThan(1e-6);
        } else {
          const got = res.effectSize!;
          expect(Math.abs(got - r.effectSize!) / r.effectSize!, label).toBeLessThan(1e-5);
        }
        checked++;
      }
      expect(checked).toBeGreaterThan(100);
    });
  }
});
