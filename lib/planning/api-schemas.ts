import { z } from "zod";
import "@/lib/validation/plain-messages";
import { scenarioInputsSchema } from "./schema";

export const createScenarioSchema = z.object({ name: z.string({ error: "Name the scenario." }).trim().min(2, "Name the scenario.").max(80, "Scenario name: at most 80 characters."), inputs: scenarioInputsSchema });
export const patchScenarioSchema = z
  .object({
    version: z.number({ error: "version is required: send the version you read." }).int().positive(),
    name: z.string({ error: "Name the scenario." }).trim().min(2, "Name the scenario.").max(80, "Scenario name: at most 80 characters.").optional(),
    inputs: scenarioInputsSchema.optional(),
    justification: z.string({ error: "Justification: send the text, or null to regenerate it." }).trim().max(8000, "Justification: at most 8,000 characters.").nullable().optional(),
    recompute: z.boolean().optional(),
  })
  .strict();
export const reviewSchema = z.object({
  action: z.enum(["submit", "withdraw", "return", "clear"], { error: "action must be submit, withdraw, return or clear." }),
  // Required for return and withdraw (checked with the record, so the message names the step).
  reason: z.string({ error: "Reason: write it as text." }).trim().max(2000, "Reason: at most 2,000 characters.").optional(),
  // Submitting or clearing a scenario whose edited justification no longer matches its figures needs this (409 otherwise).
  confirmJustificationMismatch: z.boolean({ error: "confirmJustificationMismatch: true or false." }).optional(),
});
export const curveQuerySchema = z.object({
  points: z.coerce.number().int().min(8, "points: 8 to 512.").max(512, "points: 8 to 512.").default(64),
  x: z.enum(["total", "direct"]).default("total"),
  /** "1": also the budget each point needs if enrolment is as slow as the forecast's 80th percentile. */
  slow: z.enum(["0", "1"], { error: "slow: 0 or 1." }).default("0"),
});
export const previewSchema = z.object({ inputs: scenarioInputsSchema, points: z.number().int().min(8).max(512).optional(), slow: z.boolean().optional() });

/** Adopting a planner answer as a new draft: the cheapest design for the target power, or what the sponsor's cap buys. */
export const adoptSchema = z.object({
  answer: z.enum(["cheapest", "cap"], { error: "answer must be cheapest (the cheapest design for the target power) or cap (what the cap buys)." }),
});
