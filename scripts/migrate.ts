import { createKysely, defaultDatabaseTarget } from "../db/connection";
import { migrateToLatest } from "../db/migrate";

export async function migrate(target = defaultDatabaseTarget()): Promise<void> {
  const db = createKysely(target);
  try {
    const { results } = await migrateToLatest(db);
    for (const r of results ?? []) console.log(`migration ${r.migrationName}: ${r.status}`);
    if (!results?.length) console.log("database is up to date");
  } finally {
    await db.destroy();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  migrate().catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
}
