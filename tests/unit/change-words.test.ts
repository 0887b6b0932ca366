/**
 * The logs a grants office reads say what happened in words: the scenario's "Every change" list and
 * the rate book's change history. Each audit record's codes ("submit", "state", "faRate", "0.285")
 * come out as a person would write them; rates as percentages, money as money.
 */
import { describe, expect, it } from "vitest";
import { auditWords } from "@/lib/rate-book/audit-words";
import { scenarioChangeWords } from "@/lib/studies/change-words";
import { categoryWords, staffCategoryWords } from "@/lib/sponsor/categories";
import { COST_CATEGORIES } from "@/lib/costing/types";

describe("a scenario's Every change list", () => {
  const say = (action: string, field: string | null, note: string | null = null) => scenarioChangeWords({ action, field, note });
  it("names each review step and edit in words, never the record's codes", () => {
    expect(say("submit", "state")).toBe("submitted it for review");
    expect(say("return", "state")).toBe("returned it to the investigator");
    expect(say("clear", "state")).toBe("cleared it");
    expect(say("withdraw", "state")).toBe("withdrew it from review");
    expect(say("update", "enrolment_plan")).toBe("changed the planned enrolment");
    expect(say("update", "budget_justification")).toBe("edited the budget justification");
    expect(say("regenerate", "budget_justification")).toBe("put the budget justification back to the text made from the figures");
    expect(say("update", "inputs")).toBe("changed the assumptions");
    expect(say("recompute", "rate_edition_id")).toBe("recalculated it with another rate-book edition");
    expect(say("recompute", "study-settings", "Recomputed on 2027-01-02 because Dr A changed the study's settings: modular budget off → on.")).toBe("recalculated it after the study settings changed: Recomputed on 2027-01-02 because Dr A changed the study's settings: modular budget off → on.");
    expect(say("submit-with-mismatch", "justification", "The justification no longer matches the scenario's figures (n 100 → 120).")).toBe(
      "submitted it although an edited justification no longer matched the figures: The justification no longer matches the scenario's figures (n 100 → 120).",
    );
  });
  it("an unknown code still comes out as plain words", () => {
    expect(say("archive", "some_field")).toBe("archive some field");
    for (const [a, f] of [["update", "enrolment_plan"], ["submit", "state"], ["clear-with-mismatch", "justification"], ["recompute", "study-settings"]] as const) {
      expect(say(a, f)).not.toMatch(/[_:]|in-review|-with-/);
    }
  });
});

describe("the rate book's change history", () => {
  const labels = (id: string) => ({ "1": "FY2026 rates", "2": "FY2027 rates" })[id];
  const words = (action: string, field: string | null, oldValue: string | null, newValue: string | null) => auditWords({ action, field, oldValue, newValue }, labels);
  it("settings by their labels, rates as percentages, money as money, the base in words", () => {
    expect(words("update", "faRate", "0.565", "0.585")).toEqual({ what: "Changed", field: "F&A rate", oldValue: "56.5%", newValue: "58.5%" });
    expect(words("import", "mtdcSubawardThreshold", "25000", "50000")).toEqual({ what: "Imported from a rate sheet", field: "MTDC subaward threshold", oldValue: "$25,000.00", newValue: "$50,000.00" });
    expect(words("update", "faBase", "tdc", "mtdc")).toMatchObject({ field: "F&A base", oldValue: "Total direct costs", newValue: "MTDC" });
    expect(words("update", "effectiveDate", "2027-07-01", "2027-01-01")).toMatchObject({ field: "Effective from" });
  });
  it("fringe and procedure rows, the publish step and the edition a draft was started from", () => {
    expect(words("update", "fringe:research-staff", "0.285", "0.3")).toEqual({ what: "Changed", field: "Fringe rate, research staff", oldValue: "28.5%", newValue: "30%" });
    expect(words("update", "procedure:COACH:unitCost", "80", "95")).toEqual({ what: "Changed", field: "Procedure COACH, unit cost", oldValue: "$80.00", newValue: "$95.00" });
    expect(words("update", "procedure:MRI:class", "research", "patient-care")).toMatchObject({ oldValue: "research cost", newValue: "patient care" });
    expect(words("update", "procedure:MRI:category", "procedures", "services")).toMatchObject({ oldValue: "Research procedures", newValue: "Services" });
    expect(words("publish", "status", "draft", "published")).toEqual({ what: "Published", field: "Status", oldValue: "Draft", newValue: "Published" });
    expect(words("create", "based_on", null, "1")).toEqual({ what: "Started the draft", field: "Started from", oldValue: "—", newValue: "FY2026 rates" });
  });
});

describe("categories in words", () => {
  it("every ledger category has words of its own, none a code", () => {
    for (const c of COST_CATEGORIES) expect(categoryWords(c), c).not.toMatch(/-|^[a-z]/);
    expect(staffCategoryWords("research-staff")).toBe("Research staff");
  });
});
