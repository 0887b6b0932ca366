import "server-only";
import { getDb } from "@/db";
import { enforce, forbidden, HttpError, notFound } from "@/lib/auth/errors";
import { decide, roleMay, type Actor, type Membership } from "@/lib/auth/permissions";
import type { ScenarioState } from "@/lib/auth/roles";
import { computeScenario, ScenarioError, withSettledAccrual, type ScenarioResults, type StudyContext } from "@/lib/planning/compute";
import { generateJustification } from "@/lib/planning/justification";
import { checkJustification, describeChange, justificationFigures, parseFigures, type JustificationCheck } from "@/lib/planning/justification-figures";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { adoptCapBuys, adoptCheapest } from "@/lib/planning/adopt";
import { cheapestDesign } from "@/lib/planning/optimiser";
import { budgetJustificationFigures, generateBudgetJustification } from "@/lib/planning/budget-justification";
import { storedEnrolmentPlanSchema, type EnrolmentPlan } from "@/lib/sponsor/enrolment";
import { TimelineError, CostingError } from "@/lib/costing";
import { PowerInputError, UnreachableError, type Design } from "@/lib/power";
import { writeAudit, type AuditEntry } from "./audit";
import { kickMailSender } from "./outbox";
import { enqueueReviewMail } from "./review-mail";
import { recordReviewEvent } from "./review";
import { editionForCosting, editionInForceLabel, editionToRateBook, getEdition } from "./rate-book";
import { costingDate, isoDay } from "@/lib/rate-book/in-force";
import { membershipOf } from "./studies";
import { settingsFingerprint, settingsOfRow } from "@/lib/studies/rules";

export type ScenarioSummary = {
  id: number;
  studyId: number;
  name: string;
  state: ScenarioState;
  version: number;
  updatedAt: string;
  editionId: number;
  headline: { design: Design; n1: number; n2: number | null; nTotal: number; clusters1?: number; total: string; mdes: number; effectName: string; power: number; monthsToEnrol: number; sites: number };
};

export type ScenarioDetail = ScenarioSummary & {
  inputs: ScenarioInputs;
  results: ScenarioResults;
  justification: string;
  justificationEdited: boolean;
  /** Whether an edited justification still quotes the scenario's figures (and which changed). */
  justificationCheck: JustificationCheck;
  /** The text the scenario generates now, for "regenerate" to show before it replaces an edited one. */
  generatedJustification: string;
  /** The budget justification (edited, or generated from the ledger), checked against its figures like the sample-size one. */
  budgetJustification: string;
  budgetJustificationEdited: boolean;
  budgetJustificationCheck: JustificationCheck;
  generatedBudgetJustification: string;
  /** The investigator's planned enrolment proportions; null when none were given (nothing is guessed). */
  enrolmentPlan: EnrolmentPlan | null;
  reviewNote: string | null;
  /** Why the figures last changed without an edit of the scenario's own (the study's rules changed). */
  recomputeNote: string | null;
  /** The study's settings changed since the figures were computed (an in-review or cleared scenario keeps its figures). */
  settingsChanged: boolean;
  clonedFrom: number | null;
  study: { id: number; code: string; title: string; sponsorCap: string | null; startDate: string };
  membership: Membership;
  newerEdition: { id: number; label: string } | null;
};

const EDITABLE: readonly ScenarioState[] = ["draft", "returned"];

type Row = Awaited<ReturnType<typeof loadRow>>;

async function loadRow(id: number) {
  return getDb()
    .selectFrom("scenarios as s")
    .innerJoin("studies as st", "st.id", "s.study_id")
    .selectAll("s")
    .select(["st.code as study_code", "st.title as study_title", "st.sponsor_cap", "st.start_date", "st.project_months", "st.site_arrangement", "st.fa_location", "st.sponsor_rules_json"])
    .where("s.id", "=", id)
    .executeTakeFirst();
}

function summaryOf(r: NonNullable<Row> | { id: number; study_id: number; name: string; state: ScenarioState; version: number; updated_at: string; rate_edition_id: number; results_json: string }): ScenarioSummary {
  const res = JSON.parse(r.results_json) as ScenarioResults;
  return {
    id: r.id,
    studyId: r.study_id,
    name: r.name,
    state: r.state,
    version: r.version,
    updatedAt: r.updated_at,
    editionId: r.rate_edition_id,
    headline: {
      design: res.power.design,
      n1: res.power.n1,
      n2: res.power.n2,
      nTotal: res.power.nTotal,
      ...(res.power.clusters1 !== undefined ? { clusters1: res.power.clusters1 } : {}),
      total: res.ledger.totals.total,
      mdes: res.mdes,
      effectName: res.effectName,
      power: res.powerAtTarget,
      monthsToEnrol: res.ledger.timeline.monthsToEnrol,
      sites: res.sites,
    },
  };
}

/** Loads a scenario the actor may see (404 otherwise, alike for missing and hidden). */
async function access(actor: Actor, id: number, action: Parameters<typeof decide>[1] = "scenario.view") {
  // A role that may never take the action is refused before anything is looked up (403, not 404).
  if (!roleMay(actor, action)) throw forbidden();
  const row = Number.isSafeInteger(id) ? await loadRow(id) : undefined;
  if (!row) {
    enforce(actor.role === "admin" ? "forbidden" : "not-found", "That scenario");
    throw notFound("That scenario was not found.");
  }
  const membership = await membershipOf(actor.id, row.study_id);
  // Seeing comes first: a scenario the actor may not see is not found, whatever the action.
  enforce(decide(actor, "scenario.view", { membership, scenarioState: row.state }), "That scenario");
  if (action !== "scenario.view") enforce(decide(actor, action, { membership, scenarioState: row.state }), "That scenario");
  return { row, membership };
}

function studyContext(row: NonNullable<Row>): StudyContext {
  return settingsOfRow(row);
}

const STUDY_SETTINGS = ["start_date", "sponsor_cap", "project_months", "site_arrangement", "fa_location", "sponsor_rules_json"] as const;

/** Computation errors are the user's to fix: say what, as a 422. */
function compute(inputs: ScenarioInputs, rates: Parameters<typeof computeScenario>[1], study: StudyContext): ScenarioResults {
  try {
    return computeScenario(inputs, rates, study);
  } catch (err) {
    if (err instanceof ScenarioError || err instanceof UnreachableError || err instanceof PowerInputError || err instanceof TimelineError || err instanceof CostingError) {
      const field = err instanceof CostingError ? err.field : undefined;
      throw new HttpError(422, "cannot-compute", err.message, field ? { [field]: [err.message] } : undefined);
    }
    throw err;
  }
}

export async function listScenarios(actor: Actor, studyId: number): Promise<ScenarioSummary[]> {
  const membership = await membershipOf(actor.id, studyId);
  const exists = await getDb().selectFrom("studies").select("id").where("id", "=", studyId).executeTakeFirst();
  enforce(exists ? decide(actor, "study.view", { membership }) : actor.role === "admin" ? "forbidden" : "not-found", "That study");
  const rows = await getDb()
    .selectFrom("scenarios")
    .select(["id", "study_id", "name", "state", "version", "updated_at", "rate_edition_id", "results_json"])
    .where("study_id", "=", studyId)
    .orderBy("created_at")
    .orderBy("id")
    .execute();
  return rows.filter((r) => decide(actor, "scenario.view", { membership, scenarioState: r.state }) === "allow").map(summaryOf);
}

export async function getScenario(actor: Actor, id: number, action: Parameters<typeof decide>[1] = "scenario.view"): Promise<ScenarioDetail> {
  const { row, membership } = await access(actor, id, action);
  return detailOf(actor, row, membership);
}

/** A scenario's detail from its row, once the actor's right to it is checked. */
async function detailOf(actor: Actor, row: NonNullable<Row>, membership: Membership): Promise<ScenarioDetail> {
  const inputs = JSON.parse(row.inputs_json) as ScenarioInputs;
  const results = JSON.parse(row.results_json) as ScenarioResults;
  // The recompute offer: the edition in force on the costing date, when it is not the one the scenario keeps.
  const latest = await editionInForceLabel(actor, costingDate(row.start_date, isoDay()));
  const study = studyContext(row);
  const generated = generateJustification(inputs, results, study);
  const generatedBudget = generateBudgetJustification(inputs, results);
  return {
    ...summaryOf(row),
    inputs,
    results,
    justification: row.justification ?? generated,
    justificationEdited: row.justification !== null,
    justificationCheck: checkJustification(row.justification !== null, parseFigures(row.justification_figures_json), justificationFigures(inputs, results, study)),
    generatedJustification: generated,
    budgetJustification: row.budget_justification ?? generatedBudget,
    budgetJustificationEdited: row.budget_justification !== null,
    budgetJustificationCheck: checkJustification(row.budget_justification !== null, parseFigures(row.budget_justification_figures_json), budgetJustificationFigures(inputs, results)),
    generatedBudgetJustification: generatedBudget,
    enrolmentPlan: parseEnrolmentPlan(row.enrolment_plan_json),
    reviewNote: row.review_note,
    recomputeNote: row.recompute_note,
    settingsChanged: results.studySettings !== undefined && results.studySettings !== settingsFingerprint(study),
    clonedFrom: row.cloned_from,
    study: { id: row.study_id, code: row.study_code, title: row.study_title, sponsorCap: row.sponsor_cap, startDate: row.start_date },
    membership,
    newerEdition: latest && latest.id !== row.rate_edition_id && latest.effectiveDate >= (results.edition.effectiveDate ?? "") ? { id: latest.id, label: latest.label } : null,
  };
}

/** Computes a scenario's results without saving: for the results panel while assumptions change. */
export async function previewScenario(actor: Actor, studyId: number, inputs: ScenarioInputs): Promise<ScenarioResults> {
  const membership = await membershipOf(actor.id, studyId);
  enforce(decide(actor, "study.view", { membership }), "That study");
  const study = await getDb().selectFrom("studies").select(STUDY_SETTINGS).where("id", "=", studyId).executeTakeFirst();
  if (!study) throw notFound("That study was not found.");
  const edition = await editionForCosting(actor, study.start_date);
  return compute(inputs, editionToRateBook(edition), settingsOfRow(study));
}

/**
 * Results for unsaved edits of a saved scenario: costed with the scenario's own edition and study
 * settings, as its save will be (a newer edition is the separate recompute's to take).
 */
export async function previewScenarioEdit(actor: Actor, id: number, inputs: ScenarioInputs): Promise<ScenarioResults> {
  const ctx = await scenarioContext(actor, id);
  return compute(inputs, ctx.rates, ctx.study);
}

export async function createScenario(actor: Actor, studyId: number, input: { name: string; inputs: ScenarioInputs }, clonedFrom: number | null = null): Promise<number> {
  const membership = await membershipOf(actor.id, studyId);
  const exists = await getDb().selectFrom("studies").select(["id", ...STUDY_SETTINGS]).where("id", "=", studyId).executeTakeFirst();
  enforce(exists ? decide(actor, "scenario.edit", { membership, scenarioState: "draft" }) : actor.role === "admin" ? "forbidden" : "not-found", "That study");
  if (!exists) throw notFound("That study was not found.");
  const edition = await editionForCosting(actor, exists.start_date);
  const results = compute(input.inputs, editionToRateBook(edition), settingsOfRow(exists));
  return getDb()
    .transaction()
    .execute(async (trx) => {
      const { id } = await trx
        .insertInto("scenarios")
        .values({
          study_id: studyId,
          name: input.name,
          inputs_json: JSON.stringify(withSettledAccrual(input.inputs)),
          results_json: JSON.stringify(results),
          rate_edition_id: edition.id,
          created_by: actor.id,
          cloned_from: clonedFrom,
        })
        .returning("id")
        .executeTakeFirstOrThrow();
      await writeAudit(trx, [{ userId: actor.id, action: clonedFrom ? "clone" : "create", entity: "scenario", entityId: id, field: "name", newValue: input.name }]);
      return id;
    });
}

export type ScenarioPatch = {
  version: number;
  name?: string;
  inputs?: ScenarioInputs;
  justification?: string | null;
  /** An edited budget justification, or null to go back to the generated one. */
  budgetJustification?: string | null;
  /** Planned enrolment proportions, or null to remove them. */
  enrolmentPlan?: EnrolmentPlan | null;
  recompute?: boolean;
};

/** Stored proportions, or null when none or unreadable (then no table is made, rather than a guessed one). */
function parseEnrolmentPlan(json: string | null): EnrolmentPlan | null {
  if (!json) return null;
  try {
    const parsed = storedEnrolmentPlanSchema.safeParse(JSON.parse(json));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}

export async function updateScenario(actor: Actor, id: number, patch: ScenarioPatch): Promise<ScenarioDetail> {
  const { row } = await access(actor, id, "scenario.edit");
  if (row.state === "cleared") throw new HttpError(409, "frozen", "This scenario is cleared and frozen. Clone it to make a new draft to change.");
  if (!EDITABLE.includes(row.state)) throw new HttpError(409, "in-review", "This scenario is with the grants office for review; it can be changed once it is returned.");
  if (patch.version !== row.version) {
    throw new HttpError(409, "conflict", `This scenario was changed since you opened it (now version ${row.version}). Nothing was saved; reload to see the current assumptions.`, undefined, {
      current: { version: row.version },
    });
  }
  const inputs = patch.inputs ?? (JSON.parse(row.inputs_json) as ScenarioInputs);
  let editionId = row.rate_edition_id;
  let results_json = row.results_json;
  let results: ScenarioResults | null = null;
  if (patch.inputs || patch.recompute) {
    // A recompute takes the edition in force on the costing date (the study's start, or today if later); an edit of assumptions keeps the pinned one.
    const edition = patch.recompute ? await editionForCosting(actor, row.start_date) : await getEdition(actor, row.rate_edition_id);
    editionId = edition.id;
    results = compute(inputs, editionToRateBook(edition), studyContext(row));
    results_json = JSON.stringify(results);
  }
  // An edited text is stored with the figures it was written against (those saved with it); a
  // regenerated one (null) follows the inputs and needs none.
  const figures =
    patch.justification === undefined
      ? undefined
      : patch.justification === null
        ? null
        : JSON.stringify(justificationFigures(inputs, results ?? (JSON.parse(row.results_json) as ScenarioResults), studyContext(row)));
  const budgetFigures =
    patch.budgetJustification === undefined || patch.budgetJustification === null
      ? null
      : JSON.stringify(budgetJustificationFigures(inputs, results ?? (JSON.parse(row.results_json) as ScenarioResults)));
  const audit: AuditEntry[] = [];
  if (patch.name !== undefined && patch.name !== row.name) audit.push({ userId: actor.id, action: "update", entity: "scenario", entityId: id, field: "name", oldValue: row.name, newValue: patch.name });
  if (patch.inputs) audit.push({ userId: actor.id, action: "update", entity: "scenario", entityId: id, field: "inputs", oldValue: null, newValue: null });
  if (editionId !== row.rate_edition_id) audit.push({ userId: actor.id, action: "recompute", entity: "scenario", entityId: id, field: "rate_edition_id", oldValue: String(row.rate_edition_id), newValue: String(editionId) });
  if (patch.budgetJustification !== undefined)
    audit.push({ userId: actor.id, action: patch.budgetJustification === null ? "regenerate" : "update", entity: "scenario", entityId: id, field: "budget_justification", oldValue: null, newValue: null });
  if (patch.enrolmentPlan !== undefined) audit.push({ userId: actor.id, action: "update", entity: "scenario", entityId: id, field: "enrolment_plan", oldValue: row.enrolment_plan_json, newValue: patch.enrolmentPlan === null ? null : JSON.stringify(patch.enrolmentPlan) });
  if (patch.justification !== undefined) audit.push({ userId: actor.id, action: patch.justification === null ? "regenerate" : "update", entity: "scenario", entityId: id, field: "justification", oldValue: null, newValue: null });
  await getDb()
    .transaction()
    .execute(async (trx) => {
      const saved = await trx
        .updateTable("scenarios")
        .set({
          ...(patch.name !== undefined ? { name: patch.name } : {}),
          ...(patch.justification !== undefined ? { justification: patch.justification, justification_figures_json: figures } : {}),
          ...(patch.budgetJustification !== undefined ? { budget_justification: patch.budgetJustification, budget_justification_figures_json: budgetFigures } : {}),
          ...(patch.enrolmentPlan !== undefined ? { enrolment_plan_json: patch.enrolmentPlan === null ? null : JSON.stringify(patch.enrolmentPlan) } : {}),
          // Time to event: the derived accrual is stored with the inputs (lib/planning/accrual.ts).
          inputs_json: JSON.stringify(patch.inputs || patch.recompute ? withSettledAccrual(inputs) : inputs),
          // The investigator's own recompute or edit supersedes a note of a recompute by a change of the study's rules.
          ...(results ? { recompute_note: null } : {}),
          results_json,
          rate_edition_id: editionId,
          version: row.version + 1,
          updated_at: new Date().toISOString(),
        })
        .where("id", "=", id)
        // The version read above is checked again by the write itself: of two edits made against one
        // version, on one server or two, exactly one matches; the other changes nothing and gets a 409.
        .where("version", "=", row.version)
        .where("state", "in", EDITABLE)
        .executeTakeFirst();
      if (Number(saved.numUpdatedRows) !== 1) {
        const current = await trx.selectFrom("scenarios").select(["version", "state"]).where("id", "=", id).executeTakeFirst();
        throw new HttpError(409, "conflict", `This scenario was changed since you opened it${current ? ` (now version ${current.version})` : ""}. Nothing was saved; reload to see the current assumptions.`, undefined, {
          current: { version: current?.version ?? row.version },
        });
      }
      await writeAudit(trx, audit);
      if (editionId !== row.rate_edition_id && results) {
        const was = (JSON.parse(row.results_json) as ScenarioResults).edition.label;
        await recordReviewEvent(trx, {
          scenarioId: id,
          userId: actor.id,
          action: "recompute",
          total: results.ledger.totals.total,
          inputsJson: JSON.stringify(withSettledAccrual(inputs)),
          detail: `Recomputed with “${results.edition.label ?? "the edition in force"}” (was “${was ?? "an earlier edition"}”).`,
        });
      }
    });
  return getScenario(actor, id);
}

export async function cloneScenario(actor: Actor, id: number): Promise<number> {
  const { row } = await access(actor, id, "scenario.edit");
  const copy = await createScenario(actor, row.study_id, { name: `${row.name} (copy)`.slice(0, 80), inputs: JSON.parse(row.inputs_json) as ScenarioInputs }, id);
  // The investigator's enrolment proportions are part of the plan: the copy keeps them.
  if (row.enrolment_plan_json) await getDb().updateTable("scenarios").set({ enrolment_plan_json: row.enrolment_plan_json }).where("id", "=", copy).execute();
  return copy;
}

export async function deleteScenario(actor: Actor, id: number): Promise<void> {
  const { row } = await access(actor, id, "scenario.edit");
  if (!EDITABLE.includes(row.state)) throw new HttpError(409, "not-draft", "Only draft or returned scenarios can be deleted.");
  await getDb()
    .transaction()
    .execute(async (trx) => {
      await trx.deleteFrom("scenarios").where("id", "=", id).execute();
      await writeAudit(trx, [{ userId: actor.id, action: "delete", entity: "scenario", entityId: id, field: "name", oldValue: row.name }]);
    });
}

export type ReviewAction = "submit" | "withdraw" | "return" | "clear";

const REVIEW_FROM: Record<ReviewAction, ScenarioState[]> = { submit: ["draft", "returned"], withdraw: ["in-review"], return: ["in-review"], clear: ["in-review"] };
const REVIEW_TO: Record<ReviewAction, ScenarioState> = { submit: "in-review", withdraw: "draft", return: "returned", clear: "cleared" };
const REVIEW_VERB: Record<ReviewAction, string> = { submit: "submitted", withdraw: "withdrawn", return: "returned", clear: "cleared" };

/**
 * The review workflow: draft or returned → in-review (investigator); in-review → draft again when the
 * investigator withdraws it before the grants office acts (with a reason); in-review → returned with a
 * reason, or cleared (grants office). Each step is kept in the review history with the total and inputs.
 */
export async function reviewScenario(actor: Actor, id: number, action: ReviewAction, reason?: string, opts: { acceptJustificationMismatch?: boolean } = {}): Promise<ScenarioDetail> {
  const { row } = await access(actor, id, action === "submit" || action === "withdraw" ? "scenario.submit" : "scenario.review");
  const from = row.state;
  if (!REVIEW_FROM[action].includes(from)) {
    const already = action === "withdraw" && (from === "returned" || from === "cleared") ? " The grants office has already acted on it." : "";
    throw new HttpError(409, "wrong-state", `A ${from} scenario cannot be ${REVIEW_VERB[action]}.${already}`);
  }
  if (action === "return" && !reason?.trim()) throw new HttpError(400, "invalid", "Say why the scenario is returned.", { reason: ["Say why the scenario is returned."] });
  if (action === "withdraw" && !reason?.trim()) throw new HttpError(400, "invalid", "Reason for withdrawing: say why you take it back, like \"the site count changes\".", { reason: ["Reason for withdrawing: say why you take it back."] });
  if (reason && reason.trim().length > 2000) throw new HttpError(400, "invalid", "Reason: at most 2,000 characters.", { reason: ["Reason: at most 2,000 characters."] });
  const to = REVIEW_TO[action];
  // Submitting or clearing a scenario whose edited justification no longer quotes its figures is a
  // choice to make knowingly: refused until confirmed, then kept in the audit record with what differed.
  const mismatch = action === "submit" || action === "clear" ? justificationMismatch(row) : null;
  if (mismatch && !opts.acceptJustificationMismatch) {
    throw new HttpError(409, "justification-mismatch", `${mismatch} Confirm to ${action === "submit" ? "submit" : "clear"} it anyway, or bring the justification up to date first.`);
  }
  const now = new Date().toISOString();
  const why = action === "return" || action === "withdraw" ? reason!.trim() : null;
  await getDb()
    .transaction()
    .execute(async (trx) => {
      const changed = await trx
        .updateTable("scenarios")
        .set({
          state: to,
          version: row.version + 1,
          updated_at: now,
          ...(action === "submit"
            ? { submitted_at: now, review_note: null }
            : action === "withdraw"
              ? { review_note: null }
              : { reviewed_by: actor.id, reviewed_at: now, review_note: action === "return" ? why : row.review_note }),
        })
        .where("id", "=", id)
        .where("state", "=", from)
        // The history records the total and inputs read above: an edit saved in between refuses the step too.
        .where("version", "=", row.version)
        .executeTakeFirst();
      // Someone else moved or changed it first (the grants office cleared it as the investigator withdrew it).
      if (Number(changed.numUpdatedRows) !== 1) throw new HttpError(409, "wrong-state", `This scenario changed state while you were looking at it; nothing was ${REVIEW_VERB[action]}. Reload to see where it stands.`);
      await writeAudit(trx, [
        { userId: actor.id, action, entity: "scenario", entityId: id, field: "state", oldValue: from, newValue: to },
        ...(mismatch ? [{ userId: actor.id, action: `${action}-with-mismatch`, entity: "scenario", entityId: id, field: "justification", newValue: mismatch }] : []),
      ]);
      const results = JSON.parse(row.results_json) as ScenarioResults;
      // The confirmation promised the review record would say so: which text, and which figures moved.
      const detail = mismatch ? `${action === "submit" ? "Submitted" : "Cleared"} with a justification that does not match the scenario's figures. ${mismatch}` : null;
      await recordReviewEvent(trx, { scenarioId: id, userId: actor.id, action, reason: why, total: results.ledger.totals.total, inputsJson: row.inputs_json, detail, at: now });
      // Notifications go into the outbox with the transition, so a rolled-back transition sends nothing.
      await enqueueReviewMail(trx, { event: action, actorId: actor.id, scenarioId: id, reason: why });
    });
  kickMailSender();
  return getScenario(actor, id);
}

/** What an edited justification no longer matches, in one sentence; null when it holds (or is generated). */
function justificationMismatch(row: NonNullable<Row>): string | null {
  if (row.justification === null && row.budget_justification === null) return null;
  const inputs = JSON.parse(row.inputs_json) as ScenarioInputs;
  const results = JSON.parse(row.results_json) as ScenarioResults;
  // Both edited texts are checked: the sample-size justification and the budget justification.
  const texts = [
    { name: "The sample-size justification", edited: row.justification !== null, stored: row.justification_figures_json, now: () => justificationFigures(inputs, results, studyContext(row)) },
    { name: "The budget justification", edited: row.budget_justification !== null, stored: row.budget_justification_figures_json, now: () => budgetJustificationFigures(inputs, results) },
  ];
  const parts: string[] = [];
  for (const t of texts) {
    if (!t.edited) continue;
    const check = checkJustification(true, parseFigures(t.stored), t.now());
    if (check.status === "changed") parts.push(`${t.name} no longer matches the scenario's figures (${check.changes.map(describeChange).join("; ")}).`);
    if (check.status === "unrecorded") parts.push(`${t.name} was edited before its figures were recorded, so it cannot be checked against the scenario's figures.`);
  }
  return parts.length ? parts.join(" ") : null;
}

export type ComparedScenario = ScenarioDetail & { rates: ReturnType<typeof editionToRateBook>; settings: StudyContext };

/**
 * Scenarios of one study for the comparison (2 to 4), each one the actor may see, each loaded once with
 * what its forecast needs (its rate-book edition and the study's settings); editions shared are read once.
 */
export async function scenariosForComparison(actor: Actor, studyId: number, ids: number[]): Promise<ComparedScenario[]> {
  if (ids.length < 2 || ids.length > 4) throw new HttpError(400, "invalid", "Choose two to four scenarios to compare.", { scenarios: ["Choose two to four scenarios."] });
  const editions = new Map<number, Promise<ReturnType<typeof editionToRateBook> | null>>();
  const rateBook = (editionId: number) => {
    if (!editions.has(editionId)) editions.set(editionId, getEdition(actor, editionId).then(editionToRateBook, () => null));
    return editions.get(editionId)!;
  };
  const compared = await Promise.all(
    ids.map(async (id) => {
      const { row, membership } = await access(actor, id);
      const rates = await rateBook(row.rate_edition_id);
      if (!rates) throw notFound("That scenario's rate-book edition is not available.");
      return { ...(await detailOf(actor, row, membership)), rates, settings: studyContext(row) };
    }),
  );
  if (compared.some((d) => d.studyId !== studyId)) throw notFound("Those scenarios are not all in this study.");
  return compared;
}

export async function scenarioContext(
  actor: Actor,
  id: number,
): Promise<{ studyId: number; inputs: ScenarioInputs; rates: ReturnType<typeof editionToRateBook>; study: StudyContext; results: ScenarioResults }> {
  const { row } = await access(actor, id);
  const edition = await getEdition(actor, row.rate_edition_id).catch(() => null);
  if (!edition) throw notFound("That scenario's rate-book edition is not available.");
  return { studyId: row.study_id, inputs: JSON.parse(row.inputs_json), rates: editionToRateBook(edition), study: studyContext(row), results: JSON.parse(row.results_json) };
}

/** Markers for the reach curve: every scenario of the study the actor may see. */
export async function scenarioMarkers(actor: Actor, studyId: number) {
  return (await listScenarios(actor, studyId)).map((s) => ({ id: s.id, name: s.name, budget: Number(s.headline.total), mdes: s.headline.mdes, effectName: s.headline.effectName, power: s.headline.power, state: s.state }));
}

export async function studyContextFor(actor: Actor, studyId: number): Promise<{ study: StudyContext; rates: ReturnType<typeof editionToRateBook> }> {
  const membership = await membershipOf(actor.id, studyId);
  const s = await getDb().selectFrom("studies").select(STUDY_SETTINGS).where("id", "=", studyId).executeTakeFirst();
  enforce(s ? decide(actor, "study.view", { membership }) : actor.role === "admin" ? "forbidden" : "not-found", "That study");
  const edition = await editionForCosting(actor, s!.start_date);
  return { study: settingsOfRow(s!), rates: editionToRateBook(edition) };
}

/** Everything a workbook needs for these scenarios of one study, each checked for workbook.download. */
export async function workbookData(actor: Actor, ids: number[], studyId?: number) {
  const list = [];
  for (const id of ids) {
    const { row, membership } = await access(actor, id, "workbook.download");
    const detail = await detailOf(actor, row, membership);
    if (studyId !== undefined && detail.studyId !== studyId) throw notFound("Those scenarios are not all in this study.");
    const edition = await getEdition(actor, detail.editionId).catch(() => null);
    if (!edition) throw notFound("That scenario's rate-book edition is not available.");
    list.push({ detail, rates: editionToRateBook(edition), settings: studyContext(row) });
  }
  const first = list[0]!.detail;
  const study = await getDb().selectFrom("studies").select(["code", "title", "sponsor", "sponsor_cap"]).where("id", "=", first.studyId).executeTakeFirstOrThrow();
  return {
    study: { code: study.code, title: study.title, sponsor: study.sponsor, sponsorCap: study.sponsor_cap },
    scenarios: list.map(({ detail, rates, settings }) => ({
      name: detail.name,
      state: detail.state,
      inputs: detail.inputs,
      results: detail.results,
      justification: detail.justification,
      justificationCheck: detail.justificationCheck,
      budgetJustification: detail.budgetJustification,
      budgetJustificationCheck: detail.budgetJustificationCheck,
      enrolmentPlan: detail.enrolmentPlan,
      rates,
      /** The study's settings the scenario is computed under: what its page's forecast is keyed by. */
      settings,
    })),
  };
}

/**
 * Adopts a planner answer of a scenario the actor may see as a new draft of its study (named after what
 * it adopts), priced like any new scenario. Only the study's owner may; the answer must exist.
 */
export async function adoptPlannerAnswer(actor: Actor, id: number, answer: "cheapest" | "cap"): Promise<number> {
  const { row } = await access(actor, id, "scenario.edit");
  const ctx = await scenarioContext(actor, id);
  let draft;
  if (answer === "cheapest") {
    const cheapest = cheapestDesign(ctx.inputs, ctx.rates, ctx.study);
    if (!cheapest) throw new HttpError(422, "no-answer", "No design within the limits reaches the target power, so there is nothing to adopt.");
    draft = adoptCheapest(ctx.inputs, cheapest);
  } else {
    if (!ctx.results.capBuys) throw new HttpError(422, "no-answer", ctx.study.sponsorCap ? "Even the smallest viable study costs more than the cap, so there is nothing to adopt." : "The study has no sponsor cap, so there is nothing to adopt.");
    draft = adoptCapBuys(ctx.inputs, ctx.results.capBuys, ctx.results.effectName);
  }
  return createScenario(actor, row.study_id, { name: draft.name.slice(0, 80), inputs: draft.inputs }, id);
}

export type HistoryEntry = { at: string; who: string | null; action: string; field: string | null; note: string | null };

/** A scenario's history from the audit record: who changed what, and why its figures were recomputed. */
export async function scenarioHistory(actor: Actor, id: number): Promise<HistoryEntry[]> {
  await access(actor, id);
  const rows = await getDb()
    .selectFrom("audit_log as a")
    .leftJoin("users as u", "u.id", "a.user_id")
    .select(["a.at", "u.name", "a.action", "a.field", "a.new_value"])
    .where("a.entity", "=", "scenario")
    .where("a.entity_id", "=", String(id))
    .orderBy("a.id", "desc")
    .limit(50)
    .execute();
  return rows.map((r) => ({ at: r.at, who: r.name, action: r.action, field: r.field, note: (r.action === "recompute" && r.field === "study-settings") || r.action.endsWith("-with-mismatch") ? r.new_value : null }));
}
