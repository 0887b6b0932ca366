import "server-only";
import type { Kysely, Transaction } from "kysely";
import { getDb, serializeOn } from "@/db";
import type { Database } from "@/db/types";
import { enforce, HttpError, notFound } from "@/lib/auth/errors";
import { decide, type Actor } from "@/lib/auth/permissions";
import { PROCEDURE_CLASSES, type ProcedureClass, type RateBook } from "@/lib/costing";
import { SETTING_BY_KEY, SETTING_FIELDS, type SettingKey } from "@/lib/rate-book/fields";
import { costingDate, editionInForce, isoDay, publishOutcome, standingOf, type PublishOutcome, type Standing } from "@/lib/rate-book/in-force";
import type { EditionPatch } from "@/lib/rate-book/patch";
import { parseRateSheet, safeFileName, type SheetRow } from "@/lib/rate-book/sheet";
import { writeAudit, type AuditEntry } from "./audit";

export type EditionSummary = {
  id: number;
  label: string;
  effectiveDate: string;
  status: "draft" | "published";
  version: number;
  publishedAt: string | null;
  publishedByName: string | null;
  basedOn: number | null;
};
export type EditionListItem = EditionSummary & { standing: Standing };
export type FringeRow = { id: number; category: string; rate: string; version: number };
export type ProcedureRow = { id: number; code: string; name: string; unitCost: string; category: string; class: string; version: number };
export type EditionDetail = EditionSummary & { settings: Record<SettingKey, string | null>; fringe: FringeRow[]; procedures: ProcedureRow[] };

const conflict = (message: string, fields?: Record<string, string[]>, current?: unknown) =>
  new HttpError(409, "conflict", message, fields, current === undefined ? undefined : { current });

// Inside a transaction pass the transaction: SQLite has one connection, so a query on getDb() there would wait forever.
async function institutionOf(actor: Actor, db: Kysely<Database> | Transaction<Database> = getDb()): Promise<number> {
  const row = await db.selectFrom("users").select("institution_id").where("id", "=", actor.id).executeTakeFirstOrThrow();
  return row.institution_id;
}

function editionQuery(db: Kysely<Database> | Transaction<Database>) {
  return db
    .selectFrom("rate_book_editions as e")
    .leftJoin("users as p", "p.id", "e.published_by")
    .selectAll("e")
    .select("p.name as published_by_name");
}

type EditionRow = Awaited<ReturnType<ReturnType<typeof editionQuery>["executeTakeFirstOrThrow"]>>;

function toSummary(r: EditionRow): EditionSummary {
  return {
    id: r.id,
    label: r.label,
    effectiveDate: r.effective_date,
    status: r.status,
    version: r.version,
    publishedAt: r.published_at,
    publishedByName: r.published_by_name,
    basedOn: r.based_on,
  };
}

function settingsOf(r: EditionRow): Record<SettingKey, string | null> {
  return Object.fromEntries(SETTING_FIELDS.map((f) => [f.key, (r as unknown as Record<string, string | null>)[f.column] ?? null])) as Record<SettingKey, string | null>;
}

/** Drafts are the grants office's working copies; everyone signed in reads published editions. */
function mayRead(actor: Actor, status: "draft" | "published"): boolean {
  return status === "published" ? decide(actor, "ratebook.read") === "allow" : decide(actor, "ratebook.edit") === "allow";
}

/** Every edition the actor may read, newest effective date first, each with where it stands today. */
export async function listEditions(actor: Actor, today: string = isoDay()): Promise<EditionListItem[]> {
  enforce(decide(actor, "ratebook.read"));
  const inst = await institutionOf(actor);
  const rows = await editionQuery(getDb()).where("e.institution_id", "=", inst).orderBy("e.effective_date", "desc").orderBy("e.id", "desc").execute();
  const all = rows.map(toSummary);
  return all.filter((e) => mayRead(actor, e.status)).map((e) => ({ ...e, standing: standingOf(all, e.id, today) }));
}

async function loadEdition(db: Kysely<Database> | Transaction<Database>, id: number, inst: number): Promise<EditionDetail | null> {
  const r = await editionQuery(db).where("e.id", "=", id).where("e.institution_id", "=", inst).executeTakeFirst();
  if (!r) return null;
  const [fringe, procedures] = await Promise.all([
    db.selectFrom("rate_book_fringe").select(["id", "category", "rate", "version"]).where("edition_id", "=", id).orderBy("category").execute(),
    db.selectFrom("rate_book_procedures").select(["id", "code", "name", "unit_cost as unitCost", "category", "class", "version"]).where("edition_id", "=", id).orderBy("code").execute(),
  ]);
  return { ...toSummary(r), settings: settingsOf(r), fringe, procedures };
}

export async function getEdition(actor: Actor, id: number): Promise<EditionDetail> {
  enforce(decide(actor, "ratebook.read"));
  const e = Number.isSafeInteger(id) ? await loadEdition(getDb(), id, await institutionOf(actor)) : null;
  if (!e || !mayRead(actor, e.status)) throw notFound("That rate-book edition was not found.");
  return e;
}

export function editionToRateBook(e: EditionDetail): RateBook {
  const s = e.settings;
  return {
    editionId: e.id,
    label: e.label,
    effectiveDate: e.effectiveDate,
    faRate: s.faRate!,
    ...(s.faRateOffCampus ? { faRateOffCampus: s.faRateOffCampus } : {}),
    faBase: s.faBase as "mtdc" | "tdc",
    mtdcSubawardThreshold: s.mtdcSubawardThreshold!,
    equipmentThreshold: s.equipmentThreshold!,
    escalation: { salaries: s.escalationSalaries!, costs: s.escalationCosts! },
    salaryCap: s.salaryCap,
    fringe: e.fringe.map((f) => ({ category: f.category, rate: f.rate })),
    site: {
      startupFee: s.siteStartupFee!,
      annualFee: s.siteAnnualFee!,
      monitoringVisitsPerYear: Number(s.monitoringVisitsPerYear),
      monitoringVisitCost: s.monitoringVisitCost!,
      closeoutFee: s.siteCloseoutFee!,
    },
    participant: { incentivePerVisit: s.incentivePerVisit!, screeningCost: s.screeningCost!, screenFailurePayment: s.screenFailurePayment! },
    procedures: e.procedures.map((p) => ({ code: p.code, name: p.name, unitCost: p.unitCost, category: p.category, class: asProcedureClass(p.class) })),
  };
}

async function datedEditions(db: Kysely<Database> | Transaction<Database>, inst: number) {
  const rows = await db.selectFrom("rate_book_editions").select(["id", "label", "effective_date", "status", "published_at"]).where("institution_id", "=", inst).execute();
  return rows.map((r) => ({ id: r.id, label: r.label, effectiveDate: r.effective_date, status: r.status, publishedAt: r.published_at }));
}

/** The published edition in force on a date (DESIGN.md), with its rates; null when none is yet. */
export async function editionInForceOn(actor: Actor, date: string): Promise<EditionDetail | null> {
  const inst = await institutionOf(actor);
  const e = editionInForce(await datedEditions(getDb(), inst), date);
  return e ? loadEdition(getDb(), e.id, inst) : null;
}

/** Which edition is in force on a date, without its rates: all a scenario page needs to offer a recompute. */
export async function editionInForceLabel(actor: Actor, date: string): Promise<{ id: number; label: string; effectiveDate: string } | null> {
  const e = editionInForce(await datedEditions(getDb(), await institutionOf(actor)), date);
  return e ? { id: e.id, label: e.label, effectiveDate: e.effectiveDate } : null;
}

/**
 * The edition a study's scenario is costed with: the one in force on the study's planned start, or today
 * when the study starts earlier (`costingDate`). Refused with the reason when no edition is in force then.
 */
export async function editionForCosting(actor: Actor, studyStart: string, today: string = isoDay()): Promise<EditionDetail> {
  const date = costingDate(studyStart, today);
  const e = await editionInForceOn(actor, date);
  if (e) return e;
  const first = (await datedEditions(getDb(), await institutionOf(actor))).filter((x) => x.status === "published").sort((a, b) => a.effectiveDate.localeCompare(b.effectiveDate))[0];
  throw new HttpError(
    409,
    "no-rate-book",
    first
      ? `No rate-book edition is in force on ${date} (the study's planned start, or today if that is later): the first published edition, “${first.label}”, takes effect on ${first.effectiveDate}. The grants office can publish an edition in force by ${date}.`
      : "No rate-book edition is published yet; the grants office must publish one before scenarios can be costed.",
  );
}

/** The edition in force today, with its rates (the rate-book page's "in force today"). */
export async function latestPublishedEdition(actor: Actor): Promise<EditionDetail | null> {
  return editionInForceOn(actor, isoDay());
}

/** A new draft, copied from the edition the grants officer picks (by default the one in force today, or else the latest published). */
export async function createDraft(actor: Actor, input: { label: string; effectiveDate: string; basedOn?: number }): Promise<number> {
  enforce(decide(actor, "ratebook.edit"));
  const inst = await institutionOf(actor);
  let source: EditionDetail | null;
  if (input.basedOn !== undefined) {
    source = await loadEdition(getDb(), input.basedOn, inst);
    if (!source) throw new HttpError(404, "not-found", "The edition to start from was not found.", { basedOn: ["Choose an edition from the list."] });
  } else {
    const dated = await datedEditions(getDb(), inst);
    const pick = editionInForce(dated, isoDay()) ?? editionInForce(dated, "9999-12-31");
    source = pick ? await loadEdition(getDb(), pick.id, inst) : null;
  }
  if (!source) throw new HttpError(409, "conflict", "There is no edition to start the draft from.");
  return getDb().transaction().execute(async (trx) => {
    const settings = Object.fromEntries(SETTING_FIELDS.map((f) => [f.column, source.settings[f.key]]));
    const { id } = await trx
      .insertInto("rate_book_editions")
      .values({
        institution_id: inst,
        label: input.label,
        effective_date: input.effectiveDate,
        based_on: source.id,
        created_by: actor.id,
        ...(settings as Record<string, string>),
      } as never)
      .returning("id")
      .executeTakeFirstOrThrow();
    if (source.fringe.length) await trx.insertInto("rate_book_fringe").values(source.fringe.map((f) => ({ edition_id: id, category: f.category, rate: f.rate }))).execute();
    if (source.procedures.length) {
      await trx
        .insertInto("rate_book_procedures")
        .values(source.procedures.map((p) => ({ edition_id: id, code: p.code, name: p.name, unit_cost: p.unitCost, category: p.category, class: p.class })))
        .execute();
    }
    await writeAudit(trx, [{ userId: actor.id, action: "create", entity: "rate-book-edition", entityId: id, field: "based_on", newValue: String(source.id) }]);
    return id;
  });
}

async function draftForEdit(trx: Transaction<Database>, actor: Actor, id: number): Promise<EditionDetail> {
  enforce(decide(actor, "ratebook.edit"));
  const inst = await institutionOf(actor, trx);
  // Edits of one institution's rate book take turns (SQLite's write lock does this already): an edit's
  // version checks and a publication's look at the other editions stay true until it commits.
  await serializeOn(trx, `rate-book:${inst}`);
  const e = Number.isSafeInteger(id) ? await loadEdition(trx, id, inst) : null;
  if (!e) throw notFound("That rate-book edition was not found.");
  if (e.status !== "draft") throw conflict("This edition is published and read-only; start a new draft to change rates.");
  return e;
}

/**
 * Applies a patch to a draft in one transaction: every record carries a version, and an edit made
 * against an old version is refused with the current value; nothing is overwritten, nothing is half-applied.
 */
export async function applyEditionPatch(actor: Actor, id: number, patch: EditionPatch, action = "update"): Promise<EditionDetail> {
  return getDb()
    .transaction()
    .execute(async (trx) => {
      const e = await draftForEdit(trx, actor, id);
      const audit: AuditEntry[] = [];
      const entity = "rate-book-edition";
      const now = new Date().toISOString();
      const editionChanges: Record<string, string | null> = {};
      const header: [string, "label" | "effective_date", string | undefined, string][] = [
        ["label", "label", patch.label, e.label],
        ["effectiveDate", "effective_date", patch.effectiveDate, e.effectiveDate],
      ];
      const touchesEdition = patch.settings !== undefined || patch.label !== undefined || patch.effectiveDate !== undefined || patch.publish === true;
      if (touchesEdition && patch.version !== e.version) {
        const keys = Object.keys(patch.settings ?? {});
        throw conflict(
          `Someone changed this edition since you opened it (now version ${e.version}). Nothing was saved; review the current values and try again.`,
          Object.fromEntries(keys.map((k) => [`settings.${k}`, [`Current value: ${e.settings[k as SettingKey] ?? "none"}.`]])),
          { version: e.version, settings: e.settings, label: e.label, effectiveDate: e.effectiveDate },
        );
      }
      for (const [field, column, next, old] of header) {
        if (next !== undefined && next !== old) {
          editionChanges[column] = next;
          audit.push({ userId: actor.id, action, entity, entityId: id, field, oldValue: old, newValue: next });
        }
      }
      for (const [key, value] of Object.entries(patch.settings ?? {}) as [SettingKey, string | null][]) {
        const field = SETTING_BY_KEY.get(key)!;
        const old = e.settings[key];
        if (value === old) continue;
        editionChanges[field.column] = value;
        audit.push({ userId: actor.id, action, entity, entityId: id, field: key, oldValue: old, newValue: value });
      }

      for (const f of patch.fringe ?? []) {
        if ("id" in f) {
          const row = e.fringe.find((x) => x.id === f.id);
          if (!row) throw notFound("That fringe rate is not in this edition.");
          if (row.version !== f.version) {
            throw conflict(`The ${row.category} fringe rate was changed by someone else: it is now ${row.rate}. Nothing was saved.`, { [`fringe.${row.id}`]: [`Current value: ${row.rate}.`] }, row);
          }
          if ("remove" in f) {
            await trx.deleteFrom("rate_book_fringe").where("id", "=", row.id).execute();
            audit.push({ userId: actor.id, action: "remove", entity, entityId: id, field: `fringe:${row.category}`, oldValue: row.rate, newValue: null });
          } else if (f.rate !== row.rate) {
            await trx.updateTable("rate_book_fringe").set({ rate: f.rate, version: row.version + 1 }).where("id", "=", row.id).execute();
            audit.push({ userId: actor.id, action, entity, entityId: id, field: `fringe:${row.category}`, oldValue: row.rate, newValue: f.rate });
          }
        } else {
          const existing = e.fringe.find((x) => x.category === f.category);
          if (existing) {
            if (action !== "import") throw conflict(`A fringe rate for ${f.category} exists already (${existing.rate}).`, { category: [`${f.category} exists already.`] }, existing);
            if (existing.rate !== f.rate) {
              await trx.updateTable("rate_book_fringe").set({ rate: f.rate, version: existing.version + 1 }).where("id", "=", existing.id).execute();
              audit.push({ userId: actor.id, action, entity, entityId: id, field: `fringe:${f.category}`, oldValue: existing.rate, newValue: f.rate });
            }
            continue;
          }
          await trx.insertInto("rate_book_fringe").values({ edition_id: id, category: f.category, rate: f.rate }).execute();
          audit.push({ userId: actor.id, action: action === "import" ? "import" : "add", entity, entityId: id, field: `fringe:${f.category}`, oldValue: null, newValue: f.rate });
        }
      }

      for (const p of patch.procedures ?? []) {
        if ("id" in p) {
          const row = e.procedures.find((x) => x.id === p.id);
          if (!row) throw notFound("That procedure is not in this edition.");
          if (row.version !== p.version) {
            throw conflict(
              `Procedure ${row.code} was changed by someone else: its cost is now ${row.unitCost}. Nothing was saved.`,
              { [`procedures.${row.id}`]: [`Current value: ${row.unitCost} (${row.name}).`] },
              row,
            );
          }
          if ("remove" in p) {
            await trx.deleteFrom("rate_book_procedures").where("id", "=", row.id).execute();
            audit.push({ userId: actor.id, action: "remove", entity, entityId: id, field: `procedure:${row.code}`, oldValue: row.unitCost, newValue: null });
            continue;
          }
          const next = { name: p.name ?? row.name, unit_cost: p.unitCost ?? row.unitCost, category: p.category ?? row.category, class: p.class ?? row.class };
          const changed = (["name", "unit_cost", "category", "class"] as const).filter((k) => next[k] !== (k === "unit_cost" ? row.unitCost : row[k]));
          if (changed.length) {
            await trx.updateTable("rate_book_procedures").set({ ...next, version: row.version + 1 }).where("id", "=", row.id).execute();
            for (const k of changed) {
              audit.push({ userId: actor.id, action, entity, entityId: id, field: `procedure:${row.code}:${k === "unit_cost" ? "unitCost" : k}`, oldValue: k === "unit_cost" ? row.unitCost : row[k], newValue: next[k] });
            }
          }
        } else {
          const existing = e.procedures.find((x) => x.code === p.code);
          if (existing && action !== "import") throw conflict(`Procedure ${p.code} exists already.`, { code: [`${p.code} exists already.`] }, existing);
          if (existing) {
            const next = { name: p.name, unit_cost: p.unitCost, category: p.category };
            if (next.name !== existing.name || next.unit_cost !== existing.unitCost || next.category !== existing.category) {
              await trx.updateTable("rate_book_procedures").set({ ...next, version: existing.version + 1 }).where("id", "=", existing.id).execute();
              audit.push({ userId: actor.id, action, entity, entityId: id, field: `procedure:${p.code}:unitCost`, oldValue: existing.unitCost, newValue: p.unitCost });
            }
            continue;
          }
          await trx.insertInto("rate_book_procedures").values({ edition_id: id, code: p.code, name: p.name, unit_cost: p.unitCost, category: p.category, class: p.class ?? "research" }).execute();
          audit.push({ userId: actor.id, action: action === "import" ? "import" : "add", entity, entityId: id, field: `procedure:${p.code}`, oldValue: null, newValue: p.unitCost });
        }
      }

      const publishFields = patch.publish ? { status: "published" as const, published_by: actor.id, published_at: now } : {};
      if (patch.publish) {
        if (e.fringe.length === 0 && !(patch.fringe ?? []).some((f) => !("id" in f))) throw conflict("An edition needs at least one fringe rate before it is published.");
        // Checked inside the transaction, against what is published now: never publish an edition no one can use.
        const outcome = publishOutcome(await datedEditions(trx, await institutionOf(actor, trx)), { id, label: patch.label ?? e.label, effectiveDate: patch.effectiveDate ?? e.effectiveDate }, isoDay());
        if (outcome.kind === "never") throw new HttpError(409, "never-in-force", `Not published: ${outcome.reason}`, { effectiveDate: [outcome.reason] });
        audit.push({ userId: actor.id, action: "publish", entity, entityId: id, field: "status", oldValue: "draft", newValue: "published" });
      }
      if (Object.keys(editionChanges).length || audit.length) {
        await trx
          .updateTable("rate_book_editions")
          .set({ ...(editionChanges as Record<string, never>), ...publishFields, version: e.version + 1, updated_at: now })
          .where("id", "=", id)
          .execute();
      }
      await writeAudit(trx, audit);
      return (await loadEdition(trx, id, await institutionOf(actor, trx)))!;
    });
}

/** What publishing this draft would do today, for the confirmation (the publish itself checks again). */
export async function previewPublish(actor: Actor, id: number): Promise<PublishOutcome> {
  enforce(decide(actor, "ratebook.edit"));
  const inst = await institutionOf(actor);
  const e = await loadEdition(getDb(), id, inst);
  if (!e) throw notFound("That rate-book edition was not found.");
  return publishOutcome(await datedEditions(getDb(), inst), e, isoDay());
}

/** Where one edition stands today (in force, scheduled, past, replaced or draft). */
export async function standingOfEdition(actor: Actor, id: number, today: string = isoDay()): Promise<Standing> {
  enforce(decide(actor, "ratebook.read"));
  return standingOf(await datedEditions(getDb(), await institutionOf(actor)), id, today);
}

// ——— Import ———

export type ImportRowView = { row: number; section: string; key: string; name?: string; category?: string; old: string | null; value: string | null; status: "change" | "add" | "same" };
export type ImportView = { id: number; editionId: number; fileName: string; kind: string; rows: ImportRowView[]; errors: { row: number; message: string }[] };

function previewRows(e: EditionDetail, rows: SheetRow[]): ImportRowView[] {
  return rows.map((r) => {
    let old: string | null = null;
    let exists = true;
    if (r.section === "setting") old = e.settings[r.key];
    else if (r.section === "fringe") {
      const f = e.fringe.find((x) => x.category === r.key);
      exists = !!f;
      old = f?.rate ?? null;
    } else {
      const p = e.procedures.find((x) => x.code === r.key);
      exists = !!p;
      old = p ? p.unitCost : null;
      if (p && (p.name !== r.name || p.category !== r.category)) return { ...r, old, status: "change" as const };
    }
    return { row: r.row, section: r.section, key: r.key, ...("name" in r ? { name: r.name, category: r.category } : {}), old, value: r.value, status: !exists ? "add" : old === r.value ? "same" : "change" };
  });
}

/** Parses an uploaded sheet and keeps it for preview; nothing in the edition changes until it is committed. */
export async function startImport(actor: Actor, editionId: number, fileName: string, bytes: Uint8Array): Promise<ImportView> {
  const e = await getDb().transaction().execute((trx) => draftForEdit(trx, actor, editionId));
  const parsed = await parseRateSheet(bytes);
  const { id } = await getDb()
    .insertInto("rate_book_imports")
    .values({ edition_id: editionId, user_id: actor.id, file_name: safeFileName(fileName), rows_json: JSON.stringify({ kind: parsed.kind, rows: parsed.rows, errors: parsed.errors }), error_count: parsed.errors.length })
    .returning("id")
    .executeTakeFirstOrThrow();
  return { id, editionId, fileName: safeFileName(fileName), kind: parsed.kind, rows: previewRows(e, parsed.rows), errors: parsed.errors };
}

async function loadImport(actor: Actor, importId: number) {
  enforce(decide(actor, "ratebook.edit"));
  const imp = Number.isSafeInteger(importId) ? await getDb().selectFrom("rate_book_imports").selectAll().where("id", "=", importId).executeTakeFirst() : undefined;
  if (!imp || imp.user_id !== actor.id) throw notFound("That import was not found; it may have been committed or cancelled.");
  return { imp, data: JSON.parse(imp.rows_json) as { kind: string; rows: SheetRow[]; errors: { row: number; message: string }[] } };
}

export async function getImport(actor: Actor, importId: number): Promise<ImportView> {
  const { imp, data } = await loadImport(actor, importId);
  const e = await getEdition(actor, imp.edition_id);
  return { id: imp.id, editionId: imp.edition_id, fileName: imp.file_name, kind: data.kind, rows: previewRows(e, data.rows), errors: data.errors };
}

export async function commitImport(actor: Actor, importId: number): Promise<number> {
  const { imp, data } = await loadImport(actor, importId);
  if (data.errors.length) throw new HttpError(422, "invalid-sheet", `The sheet has ${data.errors.length} row error(s); fix them and upload it again. Nothing was changed.`);
  const e = await getEdition(actor, imp.edition_id);
  const settings: Partial<Record<SettingKey, string | null>> = {};
  const fringe: EditionPatch["fringe"] = [];
  const procedures: EditionPatch["procedures"] = [];
  for (const r of data.rows) {
    if (r.section === "setting") settings[r.key] = r.value;
    else if (r.section === "fringe") fringe.push({ category: r.key, rate: r.value });
    else procedures.push({ code: r.key, name: r.name, unitCost: r.value, category: r.category });
  }
  await applyEditionPatch(actor, imp.edition_id, { version: e.version, settings, fringe, procedures }, "import");
  await getDb().deleteFrom("rate_book_imports").where("id", "=", importId).execute();
  return imp.edition_id;
}

export async function cancelImport(actor: Actor, importId: number): Promise<number> {
  const { imp } = await loadImport(actor, importId);
  await getDb().deleteFrom("rate_book_imports").where("id", "=", importId).execute();
  return imp.edition_id;
}

// ——— Audit ———

export type AuditRow = { id: number; at: string; userName: string | null; action: string; entity: string; entityId: string | null; field: string | null; oldValue: string | null; newValue: string | null };

export async function listRateBookAudit(actor: Actor, limit = 500): Promise<AuditRow[]> {
  enforce(decide(actor, "ratebook.edit"));
  return getDb()
    .selectFrom("audit_log as a")
    .leftJoin("users as u", "u.id", "a.user_id")
    .select(["a.id", "a.at", "u.name as userName", "a.action", "a.entity", "a.entity_id as entityId", "a.field", "a.old_value as oldValue", "a.new_value as newValue"])
    .where("a.entity", "=", "rate-book-edition")
    .orderBy("a.id", "desc")
    .limit(limit)
    .execute();
}

/** A stored class as the engine's type (anything unknown prices as a research cost, as before classes existed). */
function asProcedureClass(v: string): ProcedureClass {
  return (PROCEDURE_CLASSES as readonly string[]).includes(v) ? (v as ProcedureClass) : "research";
}
