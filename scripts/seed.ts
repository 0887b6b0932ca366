import type { Kysely } from "kysely";
import { createKysely, defaultDatabaseTarget } from "../db/connection";
import type { Database } from "../db/types";
import { hashPassword } from "../lib/auth/password";
import type { AccountRole } from "../lib/auth/roles";
import { computeScenario } from "../lib/planning/compute";
import { scenarioInputsSchema, type ScenarioInputs } from "../lib/planning/schema";
import { DEMO_RATES, DEMO_SCENARIOS, demoRateBook } from "./demo-data";

/**
 * Demo data: an invented institution, study and people. Nothing here describes a real
 * institution, trial or person.
 */
export const DEMO_PASSWORD = "demo-pass-2026";

export const DEMO_ACCOUNTS: { email: string; name: string; role: AccountRole }[] = [
  { email: "admin@demo.test", name: "Sam Adeyemi-Ford", role: "admin" },
  { email: "pi@demo.test", name: "Dr Ada Okonkwo-Reyes", role: "investigator" },
  { email: "coi@demo.test", name: "Dr Tomas Lindqvist-Hale", role: "co-investigator" },
  { email: "grants@demo.test", name: "Priya Vantongeren", role: "grants-officer" },
  { email: "finance@demo.test", name: "Morgan Ellsworth-Tate", role: "finance" },
];

export const DEMO_STUDY = {
  code: "WALK-KNEE",
  title: "Walking Better: a supervised home walking programme for knee osteoarthritis pain",
  sponsor: "Meridian Health Research Fund",
  sponsorCap: "2400000.00",
  startDate: "2027-07-01",
};

export async function seedDemo(db: Kysely<Database>): Promise<{ seeded: boolean }> {
  const existing = await db.selectFrom("users").select("id").limit(1).executeTakeFirst();
  if (existing) return { seeded: false };
  const hash = await hashPassword(DEMO_PASSWORD);
  await db.transaction().execute(async (trx) => {
    const now = new Date().toISOString();
    const { id: institutionId } = await trx
      .insertInto("institutions")
      .values({ name: "Larkspur Valley Institute of Health Research" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const ids: Record<string, number> = {};
    for (const a of DEMO_ACCOUNTS) {
      // One hash for all demo accounts: scrypt at OWASP strength costs ~0.3 s each, and they share a password anyway.
      const { id } = await trx
        .insertInto("users")
        .values({ institution_id: institutionId, email: a.email, name: a.name, role: a.role, password_hash: hash, updated_at: now })
        .returning("id")
        .executeTakeFirstOrThrow();
      ids[a.email] = id;
    }
    const { id: studyId } = await trx
      .insertInto("studies")
      .values({
        institution_id: institutionId,
        code: DEMO_STUDY.code,
        title: DEMO_STUDY.title,
        sponsor: DEMO_STUDY.sponsor,
        sponsor_cap: DEMO_STUDY.sponsorCap,
        start_date: DEMO_STUDY.startDate,
        owner_id: ids["pi@demo.test"]!,
        updated_at: now,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const { fringe, procedures, ...edition } = DEMO_RATES;
    const grants = ids["grants@demo.test"]!;
    const { id: editionId } = await trx
      .insertInto("rate_book_editions")
      .values({ ...edition, institution_id: institutionId, status: "published", created_by: grants, published_by: grants, published_at: now })
      .returning("id")
      .executeTakeFirstOrThrow();
    await trx.insertInto("rate_book_fringe").values(fringe.map(([category, rate]) => ({ edition_id: editionId, category: category!, rate: rate! }))).execute();
    await trx
      .insertInto("rate_book_procedures")
      .values(procedures.map(([code, name, unit_cost, category, cls]) => ({ edition_id: editionId, code, name, unit_cost, category, class: cls })))
      .execute();
    // The demo scenarios, costed with the published edition; the lean one is already with the grants office.
    for (const s of DEMO_SCENARIOS) {
      const inputs = validDemoInputs(s.name, s.inputs);
      const results = computeScenario(inputs, demoRateBook(editionId), { startDate: DEMO_STUDY.startDate, sponsorCap: DEMO_STUDY.sponsorCap });
      const { id: scenarioId } = await trx
        .insertInto("scenarios")
        .values({
          study_id: studyId,
          name: s.name,
          state: s.state,
          inputs_json: JSON.stringify(inputs),
          results_json: JSON.stringify(results),
          rate_edition_id: editionId,
          created_by: ids["pi@demo.test"]!,
          ...(s.state === "in-review" ? { submitted_at: now } : {}),
        })
        .returning("id")
        .executeTakeFirstOrThrow();
      // Its submission is in its review history, as the review workflow would have recorded it.
      if (s.state === "in-review") {
        await trx
          .insertInto("review_events")
          .values({ scenario_id: scenarioId, user_id: ids["pi@demo.test"]!, at: now, action: "submit", total: results.ledger.totals.total, inputs_json: JSON.stringify(inputs) })
          .execute();
      }
    }
    await trx
      .insertInto("study_members")
      .values([
        { study_id: studyId, user_id: ids["pi@demo.test"]!, study_role: "investigator" },
        { study_id: studyId, user_id: ids["coi@demo.test"]!, study_role: "co-investigator" },
      ])
      .execute();
  });
  return { seeded: true };
}

/**
 * A demo scenario's inputs through the same schema as the form and the API, so the seed stores only a
 * state a user could have saved; a demo scenario the schema refuses stops the seed with the reason.
 */
export function validDemoInputs(name: string, inputs: ScenarioInputs): ScenarioInputs {
  const parsed = scenarioInputsSchema.safeParse(inputs);
  if (!parsed.success) {
    throw new Error(`Demo scenario "${name}" is not valid scenario input: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  }
  return parsed.data;
}

export function assertSeedAllowed(env: NodeJS.ProcessEnv = process.env): void {
  if (env.NODE_ENV === "production" && env.DEMO !== "1") {
    throw new Error("Refusing to seed demo accounts with NODE_ENV=production. Set DEMO=1 if this really is a demo.");
  }
}

export async function seed(target = defaultDatabaseTarget()): Promise<void> {
  assertSeedAllowed();
  const db = createKysely(target);
  try {
    const { seeded } = await seedDemo(db);
    console.log(seeded ? "demo data seeded (invented institution, study and people)" : "database already has accounts; nothing seeded");
  } finally {
    await db.destroy();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  seed().catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
}
