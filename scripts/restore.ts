/** `npm run db:restore FILE`: replaces the live database (SQLite or PostgreSQL) with a checked backup. Stop the app first. */
import { restoreLiveDatabase } from "../db/backup";

const file = process.argv[2];
if (!file) {
  console.error("usage: npm run db:restore -- FILE");
  process.exit(2);
}
restoreLiveDatabase(file)
  .then((target) => console.log(`restored ${target} from ${file}`))
  .catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
