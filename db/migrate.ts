import { type Kysely, Migrator, type MigrationResultSet } from "kysely";
import { migrations } from "../migrations";

export async function migrateToLatest(db: Kysely<any>): Promise<MigrationResultSet> {
  const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } });
  const result = await migrator.migrateToLatest();
  if (result.error) throw result.error;
  return result;
}
