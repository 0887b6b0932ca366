import { describe, expect, it } from "vitest";
import { costingDate, editionInForce, isoDay, publishOutcome, standingOf, type DatedEdition } from "@/lib/rate-book/in-force";

// The rule is DESIGN.md's definition of "Edition in force"; the dates below are invented cases.
const ed = (id: number, effectiveDate: string, publishedAt: string | null = `2026-0${Math.min(id, 9)}-01T00:00:00.000Z`, label = `E${id}`): DatedEdition => ({
  id,
  label,
  effectiveDate,
  status: publishedAt ? "published" : "draft",
  publishedAt,
});

const book = [ed(1, "2026-01-01"), ed(2, "2026-07-01"), ed(3, "2027-01-01"), ed(4, "2026-09-01", null)];

describe("the edition in force on a date", () => {
  it("is the published edition with the latest effective date on or before the date", () => {
    expect(editionInForce(book, "2026-01-01")?.id).toBe(1); // the effective date itself counts
    expect(editionInForce(book, "2026-06-30")?.id).toBe(1);
    expect(editionInForce(book, "2026-07-01")?.id).toBe(2);
    expect(editionInForce(book, "2026-12-31")?.id).toBe(2); // edition 3 is still scheduled
    expect(editionInForce(book, "2027-01-01")?.id).toBe(3);
    expect(editionInForce(book, "2040-05-05")?.id).toBe(3);
  });
  it("ignores drafts, and is none before the first published edition", () => {
    expect(editionInForce(book, "2026-10-01")?.id).toBe(2); // the draft dated 2026-09-01 does not count
    expect(editionInForce(book, "2025-12-31")).toBeNull();
    expect(editionInForce([], "2026-01-01")).toBeNull();
  });
  it("on a shared effective date, the edition published last is in force", () => {
    const fixed = [...book, ed(5, "2026-07-01", "2026-08-15T10:00:00.000Z")];
    expect(editionInForce(fixed, "2026-08-01")?.id).toBe(5);
  });
});

describe("the date a scenario is costed at", () => {
  it("is the study's planned start, or today when the study starts earlier", () => {
    expect(costingDate("2027-07-01", "2026-12-02")).toBe("2027-07-01");
    expect(costingDate("2026-03-01", "2026-12-02")).toBe("2026-12-02");
    expect(costingDate("2026-12-02", "2026-12-02")).toBe("2026-12-02");
  });
  it("today is the UTC calendar day", () => {
    expect(isoDay(new Date("2026-12-02T23:59:59.000Z"))).toBe("2026-12-02");
  });
});

describe("where an edition stands today", () => {
  const today = "2026-12-02";
  it("names the edition in force, the scheduled one, the past one and drafts", () => {
    expect(standingOf(book, 2, today)).toEqual({ kind: "in-force", since: "2026-07-01" });
    expect(standingOf(book, 3, today)).toEqual({ kind: "scheduled", from: "2027-01-01" });
    expect(standingOf(book, 1, today)).toEqual({ kind: "past", from: "2026-01-01", until: "2026-06-30", supersededBy: { id: 2, label: "E2" } });
    expect(standingOf(book, 4, today)).toEqual({ kind: "draft" });
  });
  it("an edition overtaken on its own date by a later publication is replaced", () => {
    const fixed = [...book, ed(5, "2027-01-01", "2026-11-20T00:00:00.000Z")];
    expect(standingOf(fixed, 3, today)).toEqual({ kind: "replaced", by: { id: 5, label: "E5" } });
    expect(standingOf(fixed, 5, today)).toEqual({ kind: "scheduled", from: "2027-01-01" });
  });
  it("a past edition ends the day before the next effective date, across a month end", () => {
    const b = [ed(1, "2026-01-01"), ed(2, "2026-03-01")];
    expect(standingOf(b, 1, "2026-12-02")).toMatchObject({ kind: "past", until: "2026-02-28" });
  });
});

describe("what publishing a draft would do", () => {
  const today = "2026-12-02";
  it("a draft dated before the edition in force would never be in force: refused with the reason", () => {
    const out = publishOutcome(book, { id: 4, label: "Back-dated", effectiveDate: "2026-06-01" }, today);
    expect(out.kind).toBe("never");
    if (out.kind !== "never") return;
    expect(out.blockedBy).toEqual({ id: 2, label: "E2", effectiveDate: "2026-07-01" });
    expect(out.reason).toContain("2026-07-01 or later");
  });
  it("a draft back-dated but after the edition in force is in force at once", () => {
    expect(publishOutcome(book, { id: 4, label: "D", effectiveDate: "2026-09-01" }, today)).toEqual({ kind: "in-force", follows: { id: 2, label: "E2" } });
  });
  it("a draft on the in-force edition's own date replaces it", () => {
    expect(publishOutcome(book, { id: 4, label: "D", effectiveDate: "2026-07-01" }, today)).toEqual({ kind: "in-force", follows: { id: 2, label: "E2" } });
  });
  it("a future draft is scheduled, and names a scheduled edition of the same date it would replace", () => {
    expect(publishOutcome(book, { id: 4, label: "D", effectiveDate: "2027-03-01" }, today)).toEqual({ kind: "scheduled", from: "2027-03-01", replaces: null });
    expect(publishOutcome(book, { id: 4, label: "D", effectiveDate: "2027-01-01" }, today)).toEqual({ kind: "scheduled", from: "2027-01-01", replaces: { id: 3, label: "E3" } });
  });
  it("a draft dated before a scheduled edition (but after the one in force) is not refused: it is in force until then", () => {
    expect(publishOutcome(book, { id: 4, label: "D", effectiveDate: "2026-12-15" }, today).kind).toBe("scheduled");
  });
  it("with nothing in force yet, any date is allowed", () => {
    const only = [ed(3, "2027-01-01"), ed(4, "2025-01-01", null)];
    expect(publishOutcome(only, { id: 4, label: "D", effectiveDate: "2025-01-01" }, today)).toEqual({ kind: "in-force", follows: null });
  });
});
