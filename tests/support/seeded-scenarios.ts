/**
 * The set-up shared by the integration files that work on the demo scenarios' texts and outputs
 * (budget-outputs, justification): a fresh migrated and seeded database, the demo actors, the seeded
 * scenarios by name, session cookies for the people asked, and the small helpers both files used to
 * write out for themselves.
 */
import ExcelJS from "exceljs";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as scenarioWorkbookRoute from "@/app/api/v1/scenarios/[scenarioId]/workbook/route";
import { getScenario, updateScenario } from "@/db/queries/scenarios";
import type { HttpError } from "@/lib/auth/errors";
import type { Actor } from "@/lib/auth/permissions";
import type { ScenarioInputs } from "@/lib/planning/schema";
import { useFreshDatabase } from "./db";
import { params, request, signInAs } from "./http";

export type SeededScenarios = {
  dir: string;
  pi: Actor;
  grants: Actor;
  actor: (email: string) => Actor;
  /** The seeded scenarios' ids by name ("Six sites, 90% power", …). */
  ids: Record<string, number>;
  /** Session cookies by the e-mail's local part ("pi", "grants"), for the route handlers. */
  cookies: Record<string, string>;
};

/** A fresh seeded database with the demo people and scenarios; signs in (scrypt, through the session route) those named. */
export async function seededScenarios(signIn: string[] = ["pi"]): Promise<SeededScenarios> {
  const { dir } = await useFreshDatabase();
  const users = await getDb().selectFrom("users").select(["id", "email", "role"]).execute();
  const actor = (email: string) => {
    const u = users.find((x) => x.email === email);
    if (!u) throw new Error(`no demo account ${email}`);
    return { id: u.id, role: u.role } as Actor;
  };
  const ids = Object.fromEntries((await getDb().selectFrom("scenarios").select(["id", "name"]).execute()).map((s) => [s.name, s.id]));
  const cookies: Record<string, string> = {};
  for (const who of signIn) cookies[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  return { dir, pi: actor("pi@demo.test"), grants: actor("grants@demo.test"), actor, ids, cookies };
}

/** Saves a change to a scenario at its current version, as the form does. */
export async function editScenario(who: Actor, id: number, patch: Omit<Parameters<typeof updateScenario>[2], "version">) {
  return updateScenario(who, id, { version: (await getScenario(who, id)).version, ...patch });
}

export const withScreenFailure = (i: ScenarioInputs, screenFailure: number): ScenarioInputs => ({ ...i, recruitment: { ...i.recruitment, screenFailure } });

/** The scenario's workbook as the download route answers it for the cookie's person, read with exceljs. */
export async function scenarioWorkbook(id: number, cookie: string): Promise<ExcelJS.Workbook> {
  const res = await scenarioWorkbookRoute.GET(request("GET", `/api/v1/scenarios/${id}/workbook`, { cookie }), params({ scenarioId: String(id) }));
  if (res.status !== 200) throw new Error(`the workbook of scenario ${id} answered ${res.status}`);
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load((await res.arrayBuffer()) as ArrayBuffer);
  return wb;
}

/** The HttpError a call is refused with (fails when it is not refused). */
export async function refusal(p: Promise<unknown>): Promise<HttpError> {
  try {
    await p;
  } catch (err) {
    return err as HttpError;
  }
  throw new Error("expected a refusal");
}
