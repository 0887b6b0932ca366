/**
 * `npm run db:backup [DIR]`: a consistent, checked, dated copy of the live database (default
 * ./backups): a SQLite file, or a pg_dump custom-format file when DATABASE_URL names PostgreSQL.
 */
import path from "node:path";
import { backupLiveDatabase } from "../db/backup";

backupLiveDatabase(process.argv[2] ?? path.join(process.cwd(), "backups"))
  .then((file) => console.log(`backup written and checked: ${file}`))
  .catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
