import fs from "node:fs";
import path from "node:path";
import { randomBytes } from "node:crypto";
import { SESSION_SECRET_MIN_LENGTH } from "@/lib/auth/session-options";

// Not marked server-only: the demo script reads the same file before it starts the server.
export function localSecretPath(): string {
  return path.join(process.cwd(), "data", ".session-secret");
}

/** A random session secret made once into an untracked file, for development and the demo only. */
export function localSecret(): string {
  const file = localSecretPath();
  try {
    const s = fs.readFileSync(file, "utf8").trim();
    if (s.length >= SESSION_SECRET_MIN_LENGTH) return s;
  } catch {
    // first run: create it below
  }
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const s = randomBytes(32).toString("base64url");
  fs.writeFileSync(file, s, { mode: 0o600 });
  return s;
}
