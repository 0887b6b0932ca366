/**
 * Every message a person can meet from a form's or the API's validation is in plain words: walked
 * with empty and garbage input through the same schemas (and, for the pages' forms, through conform,
 * which drops empty fields so that their keys arrive undefined). None may be zod's own English or
 * name an internal field key instead of the page's label.
 */
import { parseWithZod } from "@conform-to/zod/v4";
import { describe, expect, it } from "vitest";
import type { z } from "zod";
import { acceptInvitationSchema, accountIdSchema, changePasswordSchema, changeRoleSchema, createAccountSchema, mailSettingsSchema, setActiveSchema, setPasswordSchema, signInSchema } from "@/lib/auth/schemas";
import { createScenarioSchema, patchScenarioSchema, reviewSchema } from "@/lib/planning/api-schemas";
import { commentPatchSchema, inviteSchema, newCommentSchema } from "@/lib/planning/comment-schemas";
import { designSchema, otherCostSchema, personnelSchema, recruitmentSchema, scenarioFormSchema, visitSchema } from "@/lib/planning/schema";
import { DESIGNS, powerInputSchema } from "@/lib/power/schema";
import { fringeCategoryField, moneyField, procedureCategoryField, procedureCodeField, procedureNameField, rateField, SETTING_FIELDS, settingSchema } from "@/lib/rate-book/fields";
import { editionPatchSchema, newDraftSchema } from "@/lib/rate-book/patch";
import { studyCreateSchema } from "@/lib/studies/schema";

const GARBAGE: unknown[] = ["", "   ", "abc", "12abc", -1, 0, 1e15, Number.NaN, true, [], {}, null, "x".repeat(9000), [1, "a"], { a: 1 }];

/** Keys a person never sees: camelCase, or with digits (n1, p2), or lower-case abbreviations that the pages write in capitals. */
const internalKeys = (shapes: Record<string, unknown>[]) => {
  const keys = new Set<string>(["sd", "icc", "cv", "pilotSd", "quantityNames"]);
  for (const shape of shapes) for (const k of Object.keys(shape)) if (/[a-z][A-Z]|\d/.test(k)) keys.add(k);
  return [...keys];
};
const KEYS = internalKeys([
  designSchema.shape,
  recruitmentSchema.shape,
  visitSchema.shape,
  personnelSchema.shape,
  otherCostSchema.shape,
  createAccountSchema.shape,
  studyCreateSchema.shape,
  newCommentSchema.shape,
  ...powerInputSchemaShapes(),
]);

function powerInputSchemaShapes(): Record<string, unknown>[] {
  // The discriminated union's options, reached through the refinement's inner schema.
  const inner = (powerInputSchema as unknown as { _zod: { def: { schema?: { options?: { shape: Record<string, unknown> }[] }; in?: unknown } } })._zod.def;
  const options = inner.schema?.options ?? (inner as { options?: { shape: Record<string, unknown> }[] }).options ?? [];
  return options.map((o) => o.shape);
}

const KEY_PATTERN = new RegExp(`(^|[^A-Za-z])(${KEYS.join("|")})([^A-Za-z0-9]|$)`);
const seen = new Set<string>();
function expectPlain(messages: string[], where: string) {
  for (const m of messages) {
    if (seen.has(m)) continue;
    seen.add(m);
    expect(m, where).not.toMatch(/invalid input/i);
    expect(m, where).not.toMatch(/\bexpected\b/i);
    expect(m, where).not.toMatch(/\breceived\b/i);
    expect(m, where).not.toMatch(/^Invalid\b/);
    // The scenario form labels its allocation ratio "(n2 / n1)" and its proportions "(p1)", "(p2)": page labels, not keys.
    const words = m.replace("Allocation ratio (n2 / n1)", "Allocation ratio").replace(/ \((p1|p2)\)/g, "");
    expect(words, `${where}: names an internal key`).not.toMatch(KEY_PATTERN);
    expect(m.trim().length, where).toBeGreaterThan(3);
  }
}
const messagesOf = (schema: z.ZodType, input: unknown): string[] => {
  const r = schema.safeParse(input);
  return r.success ? [] : r.error.issues.map((i) => i.message);
};
/** What a page's form sends: every named field as text, empty ones dropped by conform. */
const viaForm = (schema: z.ZodType, fields: Record<string, unknown>): string[] => {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, String(v));
  const s = parseWithZod(fd, { schema });
  return s.status === "success" ? [] : Object.values(s.error ?? {}).flat().filter((m): m is string => typeof m === "string");
};
const everyKey = (shape: Record<string, unknown>, value: unknown, prefix = "") => Object.fromEntries(Object.keys(shape).map((k) => [prefix + k, value]));

const FORM_SCHEMAS: [string, z.ZodObject][] = [
  ["sign in", signInSchema],
  ["create an account", createAccountSchema],
  ["change a role", changeRoleSchema],
  ["deactivate", setActiveSchema],
  ["accept an invitation", acceptInvitationSchema],
  ["send a reset link", accountIdSchema],
  ["change one's password", changePasswordSchema],
  ["set a password through a link", setPasswordSchema],
  ["e-mail settings", mailSettingsSchema],
  ["new study", studyCreateSchema],
  ["new rate-book draft", newDraftSchema],
];

describe("messages in plain words", () => {
  it("the pages' forms, empty and with garbage in every field", () => {
    for (const [name, schema] of FORM_SCHEMAS) {
      expectPlain(viaForm(schema, everyKey(schema.shape, "")), `${name}, empty`);
      expectPlain(messagesOf(schema, {}), `${name}, nothing sent`);
      for (const g of GARBAGE) {
        expectPlain(messagesOf(schema, everyKey(schema.shape, g)), `${name}, ${JSON.stringify(g)}`);
        if (typeof g === "string") expectPlain(viaForm(schema, everyKey(schema.shape, g)), `${name} form, ${JSON.stringify(g)}`);
      }
    }
  });

  it("the scenario form: an empty name says \"Scenario name: type a name of 2 to 80 characters.\", and every empty or garbled field answers in the page's words", () => {
    expect(viaForm(scenarioFormSchema, { name: "" })).toContain("Scenario name: type a name of 2 to 80 characters.");
    expect(messagesOf(scenarioFormSchema, { inputs: {} })).toContain("Scenario name: type a name of 2 to 80 characters.");
    const sections = { design: designSchema.shape, recruitment: recruitmentSchema.shape };
    const rows = { visits: visitSchema.shape, personnel: personnelSchema.shape, other: otherCostSchema.shape };
    const formFields = (value: string) => ({
      name: value,
      ...Object.assign({}, ...Object.entries(sections).map(([s, shape]) => everyKey(shape, value, `inputs.${s}.`))),
      ...Object.assign({}, ...Object.entries(rows).map(([s, shape]) => everyKey(shape, value, `inputs.${s}[0].`))),
    });
    expectPlain(viaForm(scenarioFormSchema, formFields("")), "scenario form, empty");
    expectPlain(viaForm(scenarioFormSchema, {}), "scenario form, nothing sent");
    for (const g of GARBAGE) {
      if (typeof g === "string") expectPlain(viaForm(scenarioFormSchema, formFields(g)), `scenario form, ${JSON.stringify(g)}`);
      const inputs = {
        ...Object.fromEntries(Object.entries(sections).map(([s, shape]) => [s, everyKey(shape, g)])),
        ...Object.fromEntries(Object.entries(rows).map(([s, shape]) => [s, [everyKey(shape, g)]])),
      };
      expectPlain(messagesOf(scenarioFormSchema, { name: g, inputs }), `scenario, ${JSON.stringify(g)}`);
      expectPlain(messagesOf(createScenarioSchema, { name: g, inputs }), `scenario API, ${JSON.stringify(g)}`);
      expectPlain(messagesOf(scenarioFormSchema, { name: g, inputs: g }), `scenario inputs ${JSON.stringify(g)}`);
    }
  });

  it("an empty invitation e-mail and an empty comment ask for them", () => {
    expect(messagesOf(inviteSchema, { email: "" })).toEqual(["Enter the e-mail address of the person to invite."]);
    expect(messagesOf(inviteSchema, {})).toEqual(["Enter the e-mail address of the person to invite."]);
    expect(messagesOf(inviteSchema, { email: "someone" })).toEqual(["Enter a valid e-mail address, like name@example.org."]);
    for (const schema of [inviteSchema, newCommentSchema, commentPatchSchema, reviewSchema, patchScenarioSchema, editionPatchSchema] as z.ZodType[]) {
      expectPlain(messagesOf(schema, {}), "API body {}");
      expectPlain(messagesOf(schema, undefined), "API body missing");
      for (const g of GARBAGE) {
        const shape = (schema as unknown as { shape?: Record<string, unknown> }).shape;
        expectPlain(messagesOf(schema, shape ? everyKey(shape, g) : g), `API body ${JSON.stringify(g)}`);
        expectPlain(messagesOf(schema, g), `API body ${JSON.stringify(g)}`);
      }
    }
  });

  it("the rate book's fields, as typed or imported", () => {
    const fields: z.ZodType[] = [...SETTING_FIELDS.map(settingSchema), fringeCategoryField, procedureCodeField, procedureNameField, procedureCategoryField, rateField("Fringe rate"), moneyField("Unit cost")];
    for (const f of fields) for (const g of [undefined, ...GARBAGE]) expectPlain(messagesOf(f, g), `rate-book field ${JSON.stringify(g)}`);
  });

  it("the calculator and POST /api/v1/power, for every design", { timeout: 60_000 }, () => {
    const valid: Record<string, Record<string, unknown>> = {
      "two-means": { effectSize: 0.5, power: 0.8 },
      "one-mean": { effectSize: 0.5, power: 0.8 },
      "two-proportions": { p1: 0.3, p2: 0.45, power: 0.8 },
      "cluster-two-means": { effectSize: 0.5, power: 0.8, clusterSize: 20, icc: 0.05 },
      "cluster-two-proportions": { p1: 0.3, p2: 0.45, power: 0.8, clusterSize: 20, icc: 0.05 },
      "time-to-event": { hazardRatio: 0.75, power: 0.8, controlMedian: 12, accrualMonths: 24, followUpMonths: 12 },
    };
    const keys = ["alpha", "sides", "power", "allocationRatio", "attrition", "screenFailure", "effectSize", "meanDifference", "sd", "pilotSd", "n1", "n2", "p1", "p2", "method", "direction", "clusterSize", "icc", "cv", "clustersPerArm", "hazardRatio", "controlMedian", "accrualMonths", "followUpMonths"];
    for (const design of DESIGNS) {
      const base = { design, ...valid[design] };
      expectPlain(messagesOf(powerInputSchema, { design }), `${design}, nothing else`);
      expectPlain(messagesOf(powerInputSchema, { ...base, n1: 20, clustersPerArm: 10 }), `${design}, all three`);
      for (const k of keys) for (const g of GARBAGE) expectPlain(messagesOf(powerInputSchema, { ...base, [k]: g }), `${design}.${k} = ${JSON.stringify(g)}`);
    }
    for (const g of GARBAGE) expectPlain(messagesOf(powerInputSchema, { design: g }), `design ${JSON.stringify(g)}`);
    expectPlain(messagesOf(powerInputSchema, undefined), "no body");
    // The question in the calculator's words: what is empty, and what to enter to find what.
    expect(messagesOf(powerInputSchema, { design: "two-means", power: 0.8 })).toEqual([
      "Evaluable participants per arm is empty, and so is Effect size (d): enter Effect size (d) to find the participants needed, or enter Evaluable participants per arm to find the smallest effect detectable.",
      "Effect size (d) is empty, and so is Evaluable participants per arm: enter Effect size (d) to find the participants needed, or enter Evaluable participants per arm to find the smallest effect detectable.",
    ]);
  });

  it("walked a good number of distinct messages", () => {
    expect(seen.size).toBeGreaterThan(60);
  });
});
