import { jsonError, withUser } from "@/lib/server/api";

// Unknown API paths answer JSON too: 401 without a session (so nothing is learnt signed out), else 404.
const notFound = withUser<{ path: string[] }>(async () => jsonError(404, "not-found", "No such API route."));
export { notFound as GET, notFound as POST, notFound as PATCH, notFound as PUT, notFound as DELETE };
