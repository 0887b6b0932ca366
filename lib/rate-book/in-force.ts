/**
 * Which rate-book edition is in force (DESIGN.md): the published edition whose effective date is the
 * latest on or before a given date; published editions with a later date are scheduled. When two
 * published editions share an effective date, the one published last is in force: publishing on the
 * same date is how a published edition is corrected.
 *
 * Every place that picks an edition uses these functions: the costing of a new scenario or a recompute,
 * the recompute offer, the rate-book page and the check before publishing. Pure: the caller passes today.
 */

export type DatedEdition = {
  id: number;
  label: string;
  effectiveDate: string; // YYYY-MM-DD
  status: "draft" | "published";
  publishedAt: string | null; // ISO timestamp
};

/** Today's date (UTC) as YYYY-MM-DD, the form effective dates are kept in. */
export function isoDay(now: Date = new Date()): string {
  return now.toISOString().slice(0, 10);
}

/**
 * The date a scenario is costed at: the study's planned start, or today if the study starts earlier.
 * Costs are incurred from the start, so an edition scheduled by then applies; a plan made today never
 * uses rates that are no longer in force today.
 */
export function costingDate(studyStart: string, today: string): string {
  return studyStart > today ? studyStart : today;
}

/** Published editions, the one that wins a date first: latest effective date, then published last. */
function ranked<T extends DatedEdition>(editions: readonly T[]): T[] {
  return editions
    .filter((e) => e.status === "published")
    .sort((a, b) => (a.effectiveDate !== b.effectiveDate ? (a.effectiveDate < b.effectiveDate ? 1 : -1) : (b.publishedAt ?? "").localeCompare(a.publishedAt ?? "") || b.id - a.id));
}

/** The edition in force on `date`, or null when every published edition takes effect later. */
export function editionInForce<T extends DatedEdition>(editions: readonly T[], date: string): T | null {
  return ranked(editions).find((e) => e.effectiveDate <= date) ?? null;
}

/** The day before an ISO date, for "in force until". */
function dayBefore(date: string): string {
  const d = new Date(`${date}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() - 1);
  return isoDay(d);
}

export type Standing =
  | { kind: "draft" }
  | { kind: "in-force"; since: string }
  | { kind: "scheduled"; from: string }
  | { kind: "past"; from: string; until: string; supersededBy: { id: number; label: string } }
  | { kind: "replaced"; by: { id: number; label: string } };

/** Where one edition stands today: draft, in force, scheduled, past (in force for earlier dates) or replaced. */
export function standingOf<T extends DatedEdition>(editions: readonly T[], id: number, today: string): Standing {
  const e = editions.find((x) => x.id === id);
  if (!e || e.status !== "published") return { kind: "draft" };
  const list = ranked(editions);
  const sameDateWinner = list.find((x) => x.effectiveDate === e.effectiveDate)!;
  if (sameDateWinner.id !== e.id) return { kind: "replaced", by: { id: sameDateWinner.id, label: sameDateWinner.label } };
  if (e.effectiveDate > today) return { kind: "scheduled", from: e.effectiveDate };
  const current = editionInForce(list, today)!;
  if (current.id === e.id) return { kind: "in-force", since: e.effectiveDate };
  // The next later effective date ends this edition's time in force.
  const next = [...list].reverse().find((x) => x.effectiveDate > e.effectiveDate)!;
  return { kind: "past", from: e.effectiveDate, until: dayBefore(next.effectiveDate), supersededBy: { id: current.id, label: current.label } };
}

export type PublishOutcome =
  | { kind: "in-force"; follows: { id: number; label: string } | null }
  | { kind: "scheduled"; from: string; replaces: { id: number; label: string } | null }
  | { kind: "never"; blockedBy: { id: number; label: string; effectiveDate: string }; reason: string };

/**
 * What publishing a draft would do today. An edition dated before the one in force today would never be
 * in force for today or any later date, so no scenario could ever use it: that is refused, with the reason.
 * In force: `follows` is the edition in force until now. Scheduled: `replaces` is a scheduled edition with
 * the same effective date, which would then never be in force.
 */
export function publishOutcome<T extends DatedEdition>(editions: readonly T[], draft: Pick<T, "id" | "label" | "effectiveDate">, today: string): PublishOutcome {
  const others = editions.filter((x) => x.id !== draft.id);
  const current = editionInForce(others, today);
  if (current && draft.effectiveDate < current.effectiveDate) {
    return {
      kind: "never",
      blockedBy: { id: current.id, label: current.label, effectiveDate: current.effectiveDate },
      reason: `“${draft.label}” takes effect on ${draft.effectiveDate}, before “${current.label}”, which is in force since ${current.effectiveDate}: it would never be in force, today or later, so no scenario could use it. Change its effective date to ${current.effectiveDate} or later (the same date replaces “${current.label}”).`,
    };
  }
  if (draft.effectiveDate <= today) return { kind: "in-force", follows: current ? { id: current.id, label: current.label } : null };
  const sameDate = ranked(others).find((x) => x.effectiveDate === draft.effectiveDate);
  return { kind: "scheduled", from: draft.effectiveDate, replaces: sameDate ? { id: sameDate.id, label: sameDate.label } : null };
}
