/**
 * A second study whose scenarios cover the designs the seeded demo study lacks (it has two-means and
 * cluster-two-means only), so that the pages can be audited and checked with effects in every unit.
 * Set-up only: it goes through the API as the investigator; the tests that use it then click and read.
 * Created once per browser-test run (found again by its code by whichever file asks second).
 */
import type { Page } from "playwright-core";
import { DEMO_SCENARIOS } from "@/scripts/demo-data";
import type { ScenarioInputs } from "@/lib/planning/schema";

export const DESIGN_STUDY = { code: "DESIGNS-1", title: "Every design, invented for the checks", sponsor: "Invented Health Fund", sponsorCap: "3000000", startDate: "2027-03-01" };

const base = DEMO_SCENARIOS[0]!.inputs;
const { meanDifference: _md, sd: _sd, ...noMeans } = base.design;
void _md;
void _sd;

export const DESIGN_SCENARIOS: { name: string; design: string; inputs: ScenarioInputs }[] = [
  { name: "Means, two arms", design: "two-means", inputs: base },
  { name: "Paired change", design: "one-mean", inputs: { ...base, design: { ...base.design, design: "one-mean" } } },
  {
    name: "Walking goal reached",
    design: "two-proportions",
    inputs: { ...base, design: { ...noMeans, design: "two-proportions", outcome: "share walking 30 minutes a day at 6 months", p1: 0.4, p2: 0.55 } },
  },
  {
    name: "Clinics, goal reached",
    design: "cluster-two-proportions",
    inputs: {
      ...base,
      design: { ...noMeans, design: "cluster-two-proportions", outcome: "share walking 30 minutes a day at 6 months", p1: 0.4, p2: 0.55, clusterSize: 12, icc: 0.03, cv: 0.4 },
      recruitment: { ...base.recruitment, ratePerSiteMonth: 2, staggerMonths: 0 },
    },
  },
  {
    name: "Time to first fall",
    design: "time-to-event",
    inputs: {
      ...base,
      design: { ...noMeans, design: "time-to-event", outcome: "time to the first fall", hazardRatio: 0.7, controlMedian: 30, accrualMonths: 24, followUpMonths: 12 },
      recruitment: { ...base.recruitment, sites: 12, ratePerSiteMonth: 3 },
    },
  },
];

/** The study's id and its scenarios (id, name), creating what is missing. `page` is signed in as the investigator. */
export async function ensureDesignStudy(page: Page, baseUrl: string): Promise<{ studyId: number; scenarios: { id: number; name: string }[] }> {
  if (!page.url().startsWith(baseUrl)) await page.goto(`${baseUrl}/studies`);
  return page.evaluate(
    async ({ study, wanted }) => {
      const call = async (url: string, init?: RequestInit) => {
        const res = await fetch(url, init ? { ...init, headers: { "content-type": "application/json" } } : undefined);
        const body = await res.json();
        if (!res.ok) throw new Error(`${url}: ${res.status} ${JSON.stringify(body)}`);
        return body;
      };
      const list = (await call("/api/v1/studies")).studies as { id: number; code: string }[];
      let studyId = list.find((s) => s.code === study.code)?.id;
      if (!studyId) studyId = (await call("/api/v1/studies", { method: "POST", body: JSON.stringify(study) })).id as number;
      const have = (await call(`/api/v1/studies/${studyId}/scenarios`)).scenarios as { id: number; name: string }[];
      for (const s of wanted) {
        if (have.some((h) => h.name === s.name)) continue;
        const created = (await call(`/api/v1/studies/${studyId}/scenarios`, { method: "POST", body: JSON.stringify({ name: s.name, inputs: s.inputs }) })).scenario as { id: number; name: string };
        have.push({ id: created.id, name: created.name });
      }
      return { studyId, scenarios: have.map((h) => ({ id: h.id, name: h.name })) };
    },
    { study: DESIGN_STUDY, wanted: DESIGN_SCENARIOS.map((s) => ({ name: s.name, inputs: s.inputs })) },
  );
}
