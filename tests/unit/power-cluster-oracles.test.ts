/**
 * Both cluster-randomised designs against values computed outside the engine (sources in
 * tests/fixtures/published-checks.ts): clusters per arm, power at a given number of clusters, and the
 * detectable effect. A design effect left out of either design's variance changes every row.
 */
import { describe, expect, it } from "vitest";
import { solve } from "@/lib/power";
import { CLUSTER_MEANS_ORACLE, CLUSTER_PROPORTIONS_ORACLE } from "../fixtures/published-checks";

describe(CLUSTER_MEANS_ORACLE.source, () => {
  for (const r of CLUSTER_MEANS_ORACLE.rows) {
    const base = { design: "cluster-two-means" as const, clusterSize: r.m, icc: r.icc, cv: r.cv };
    it(`d = ${r.d.toFixed(4)}, m̄ = ${r.m}, ICC ${r.icc}, CV ${r.cv}, power ${r.power}: ${r.k} clusters per arm`, () => {
      const res = solve({ ...base, effectSize: r.d, power: r.power });
      expect(res.clusters1).toBe(r.k);
      expect(res.clusters2).toBe(r.k);
      // Participants are clusters × mean size.
      expect(res.n1).toBe(r.k * r.m);
      // Donner & Klar's closed form, a looser check: the exact count is its ceiling.
      expect(Math.ceil(r.closedForm)).toBe(r.k);
    });
    it(`power at ${r.k} clusters is ${r.powerAtK}, at ${r.k - 1} it is ${r.powerBelow}`, () => {
      expect(solve({ ...base, effectSize: r.d, clustersPerArm: r.k }).power).toBeCloseTo(r.powerAtK, 5);
      expect(solve({ ...base, effectSize: r.d, clustersPerArm: r.k - 1 }).power).toBeCloseTo(r.powerBelow, 5);
    });
    if (r.mdesAtK !== null) {
      it(`detectable d at ${r.k} clusters and power ${r.power} is ${r.mdesAtK}`, () => {
        expect(solve({ ...base, clustersPerArm: r.k, power: r.power }).effectSize).toBeCloseTo(r.mdesAtK!, 4);
      });
    }
  }
});

describe(CLUSTER_PROPORTIONS_ORACLE.source, () => {
  for (const r of CLUSTER_PROPORTIONS_ORACLE.rows) {
    const base = { design: "cluster-two-proportions" as const, p1: r.p1, p2: r.p2, clusterSize: r.m, icc: r.icc, cv: r.cv };
    it(`p ${r.p1} vs ${r.p2}, m̄ = ${r.m}, ICC ${r.icc}, CV ${r.cv}, power ${r.power}: ${r.k} clusters per arm (not the ${r.kWithoutDE} that ignore clustering)`, () => {
      const res = solve({ ...base, power: r.power });
      expect(res.clusters1).toBe(r.k);
      expect(res.clusters2).toBe(r.k);
      expect(res.n1).toBe(r.k * r.m);
      expect(res.clusters1).not.toBe(r.kWithoutDE);
    });
    it(`power at ${r.k} clusters is ${r.powerAtK}, at ${r.k - 1} it is ${r.powerBelow}`, () => {
      expect(solve({ ...base, clustersPerArm: r.k }).power).toBeCloseTo(r.powerAtK, 5);
      expect(solve({ ...base, clustersPerArm: r.k - 1 }).power).toBeCloseTo(r.powerBelow, 5);
    });
  }
  it("the detectable intervention proportion at 20 clusters of 12 per arm (p1 .4, power .8) is 0.54993", () => {
    const t = CLUSTER_PROPORTIONS_ORACLE.detectable;
    const { p2: _p2, ...noP2 } = { design: "cluster-two-proportions" as const, p1: t.p1, p2: 0, clusterSize: t.m, icc: t.icc, cv: t.cv };
    void _p2;
    expect(solve({ ...noP2, clustersPerArm: t.k, power: t.power }).p2).toBeCloseTo(t.p2, 4);
  });
});
