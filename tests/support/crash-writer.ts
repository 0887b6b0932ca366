/**
 * A child process for the crash test: creates scenarios through createScenario, the function the API's
 * POST /studies/:id/scenarios and the scenario form's action call (validation, computation, the row and
 * its audit line in one transaction), in a loop until it is killed. Says "ready" after its first
 * scenario. Usage: node --conditions=react-server --import tsx crash-writer.ts DB_PATH
 * (react-server: the query modules are marked server-only, as under Next).
 */
process.env.DATABASE_PATH = process.argv[2]!;
const { getDb } = await import("@/db");
const { createScenario } = await import("@/db/queries/scenarios");
const { DEMO_SCENARIOS } = await import("@/scripts/demo-data");

const db = getDb();
const study = await db.selectFrom("studies").select(["id", "owner_id"]).executeTakeFirstOrThrow();
const owner = await db.selectFrom("users").select(["id", "role"]).where("id", "=", study.owner_id).executeTakeFirstOrThrow();
const actor = { id: owner.id, role: owner.role as "investigator" };
for (let k = 0; ; k++) {
  await createScenario(actor, study.id, { name: `crash-${process.pid}-${k}`, inputs: DEMO_SCENARIOS[k % DEMO_SCENARIOS.length]!.inputs });
  if (k === 0) process.stdout.write("ready\n");
}

export {};
