/**
 * A child process for the sign-in burst test: COUNT parallel sign-ins with a wrong password for one
 * e-mail against DB_PATH, as another server worker would. Prints "invalid=I throttled=T" and exits.
 * Run with `node --conditions=react-server --import tsx` so that "server-only" resolves as on the server.
 * Usage: sign-in-burst.ts DB_PATH EMAIL COUNT
 */
const [file, email, count] = process.argv.slice(2) as [string, string, string];
process.env.DATABASE_PATH = file;
const { signIn } = await import("@/db/queries/sign-in");
const { closeDb } = await import("@/db");
const results = await Promise.all(Array.from({ length: Number(count) }, (_, i) => signIn(email, `wrong-guess-${i}`)));
await closeDb();
const invalid = results.filter((r) => !r.ok && r.reason === "invalid").length;
const throttled = results.filter((r) => !r.ok && r.reason === "throttled").length;
process.stdout.write(`invalid=${invalid} throttled=${throttled}\n`);
export {};
