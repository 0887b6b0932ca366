/**
 * The rate book's words for where an edition stands and what publishing does, in one place so that the
 * list, the edition page and the publish confirmation say the same thing.
 */
import type { PublishOutcome, Standing } from "./in-force";

/** A short note for a list or a picker: "in force today", "scheduled from 2028-01-01". */
export function standingNote(s: Standing): string {
  switch (s.kind) {
    case "draft":
      return "draft";
    case "in-force":
      return "in force today";
    case "scheduled":
      return `scheduled from ${s.from}`;
    case "past":
      return `in force ${s.from} to ${s.until}`;
    case "replaced":
      return `replaced by “${s.by.label}”`;
  }
}

/** The note as a table cell's label: "In force today", "Scheduled from 2028-01-01". */
export function standingLabel(s: Standing): string {
  const note = standingNote(s);
  return note.charAt(0).toUpperCase() + note.slice(1);
}

/** A sentence for the edition's own page. */
export function standingSentence(s: Standing): string {
  switch (s.kind) {
    case "draft":
      return "Draft: not used by any scenario until it is published.";
    case "in-force":
      return `In force today (since ${s.since}): new scenarios and recomputes are costed with it.`;
    case "scheduled":
      return `Scheduled: in force from ${s.from}. Studies that start on or after that date are costed with it.`;
    case "past":
      return `No longer in force: it applied from ${s.from} to ${s.until}; “${s.supersededBy.label}” is in force today. Scenarios costed with it keep it until they are recomputed.`;
    case "replaced":
      return `Never in force: “${s.by.label}”, published later with the same effective date, took its place.`;
  }
}

/** What publishing will do, for the confirmation; null when publishing is refused. */
export function publishEffect(o: PublishOutcome, currentLabel: string | null): string | null {
  switch (o.kind) {
    case "never":
      return null;
    case "in-force":
      return `It will be in force at once: new scenarios and recomputes will be costed with it${o.follows ? `, and “${o.follows.label}” will no longer be in force` : ""}. Scenarios already costed keep their edition and are offered a recompute.`;
    case "scheduled":
      return `It will be scheduled: in force from ${o.from}, and studies that start on or after that date will be costed with it${currentLabel ? `; until then “${currentLabel}” stays in force` : ""}.${o.replaces ? ` It takes the place of “${o.replaces.label}”, scheduled for the same date, which will then never be in force.` : ""}`;
  }
}

/** What happened, said after a publish. */
export function publishedMessage(label: string, s: Standing, currentLabel: string | null): string {
  if (s.kind === "in-force") return `Published. “${label}” is in force today: new scenarios and recomputes are costed with it, and scenarios costed with an earlier edition are offered a recompute.`;
  if (s.kind === "scheduled") return `Published. “${label}” is scheduled: it takes effect on ${s.from}, and studies that start on or after that date are costed with it${currentLabel ? `; “${currentLabel}” stays in force until then` : ""}.`;
  return `Published. ${standingSentence(s)}`;
}
