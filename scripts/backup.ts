/** `npm run db:backup [DIR]`: a consistent, checked, dated copy of the live database (default ./backups). */
import path from "node:path";
import { backupDatabase } from "../db/backup";
import { defaultDatabasePath } from "../db/connection";

backupDatabase(defaultDatabasePath(), process.argv[2] ?? path.join(process.cwd(), "backups"))
  .then((file) => console.log(`backup written and checked: ${file}`))
  .catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
