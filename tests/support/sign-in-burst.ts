/**
 * A child process for the sign-in burst test: COUNT parallel sign-ins with a wrong password for one
 * e-mail against DATABASE (a SQLite file or a PostgreSQL URL), as another server worker would. Prints "invalid=I throttled=T" and exits.
 * Run with `node --conditions=react-server --import tsx` so that "server-only" resolves as on the server.
 * Usage: sign-in-burst.ts DATABASE EMAIL COUNT
 */
const [target, email, count] = process.argv.slice(2) as [string, string, string];
if (/^postgres(ql)?:\/\//i.test(target)) process.env.DATABASE_URL = target;
else process.env.DATABASE_PATH = target;
const { signIn } = await import("@/db/queries/sign-in");
const { closeDb } = await import("@/db");
const results = await Promise.all(Array.from({ length: Number(count) }, (_, i) => signIn(email, `wrong-guess-${i}`)));
await closeDb();
const invalid = results.filter((r) => !r.ok && r.reason === "invalid").length;
const throttled = results.filter((r) => !r.ok && r.reason === "throttled").length;
process.stdout.write(`invalid=${invalid} throttled=${throttled}\n`);
export {};
