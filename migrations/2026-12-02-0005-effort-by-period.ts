import type { Kysely } from "kysely";

/**
 * Personnel effort becomes a list, one percent per budget period (the last repeating): stored
 * scenarios with one number get a one-item list, which costs exactly as before. Data only; the
 * scenario's version and results are left as they are.
 */
type Person = { effortPercent?: unknown };
type Inputs = { personnel?: Person[] };

async function rewrite(db: Kysely<any>, change: (effort: unknown) => unknown): Promise<void> {
  const rows = (await db.selectFrom("scenarios").select(["id", "inputs_json"]).execute()) as { id: number; inputs_json: string }[];
  for (const row of rows) {
    const inputs = JSON.parse(row.inputs_json) as Inputs;
    if (!Array.isArray(inputs.personnel)) continue;
    let changed = false;
    for (const p of inputs.personnel) {
      const next = change(p.effortPercent);
      if (next !== p.effortPercent) {
        p.effortPercent = next;
        changed = true;
      }
    }
    if (changed) await db.updateTable("scenarios").set({ inputs_json: JSON.stringify(inputs) }).where("id", "=", row.id).execute();
  }
}

export async function up(db: Kysely<any>): Promise<void> {
  await rewrite(db, (e) => (typeof e === "number" ? [e] : e));
}

export async function down(db: Kysely<any>): Promise<void> {
  // The earlier schema holds one value: keep the first period's.
  await rewrite(db, (e) => (Array.isArray(e) && typeof e[0] === "number" ? e[0] : e));
}
