/** `npm run db:restore FILE`: replaces the database with a checked backup. Stop the app first. */
import { restoreDatabase } from "../db/backup";
import { defaultDatabasePath } from "../db/connection";

const file = process.argv[2];
if (!file) {
  console.error("usage: npm run db:restore -- FILE");
  process.exit(2);
}
try {
  restoreDatabase(file, defaultDatabasePath());
  console.log(`restored ${defaultDatabasePath()} from ${file}`);
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
}
