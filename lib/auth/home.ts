import type { AccountRole } from "./roles";

/** Where each role lands after signing in. */
export function homeFor(role: AccountRole): string {
  return role === "admin" ? "/admin/accounts" : "/studies";
}
