import { reachCurve } from "../lib/planning/curve";
import { DEMO_SCENARIOS, demoRateBook } from "./demo-data";
const rates = demoRateBook(1);
const study = { startDate: "2027-07-01", sponsorCap: "2400000.00" };
const sc = DEMO_SCENARIOS.find((s) => s.inputs.design.design === "two-means")!.inputs;
for (let i = 0; i < 5; i++) reachCurve(sc, rates, study, { points: 256 });
const t = performance.now();
for (let i = 0; i < 40; i++) reachCurve(sc, rates, study, { points: 256 });
console.log((performance.now() - t) / 40, "ms");
