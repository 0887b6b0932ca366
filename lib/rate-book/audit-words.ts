/**
 * The rate book's change history in a grants officer's words: "Changed", "F&A rate", "28.5%" rather
 * than the audit record's "update", "faRate", "0.285". The record keeps the codes (they are stable
 * across renamings); only what is shown is translated, here, so every row is read the same way.
 */
import { PROCEDURE_CLASS_LABELS } from "@/lib/costing/procedure-class";
import type { ProcedureClass } from "@/lib/costing/types";
import { formatMoney } from "@/lib/format/money";
import { formatRate, formatSetting } from "@/lib/format/rates";
import { categoryWords, staffCategoryWords } from "@/lib/sponsor/categories";
import { SETTING_BY_KEY, type SettingKey } from "./fields";

export type AuditEntry = { action: string; field: string | null; oldValue: string | null; newValue: string | null };
export type AuditWords = { what: string; field: string; oldValue: string; newValue: string };

const ACTIONS: Record<string, string> = {
  create: "Started the draft",
  update: "Changed",
  import: "Imported from a rate sheet",
  add: "Added",
  remove: "Removed",
  publish: "Published",
};

const STATUS: Record<string, string> = { draft: "Draft", published: "Published" };

/** `editionLabel` names an edition by its id (for "started from"); unknown ids stay as "edition 2". */
export function auditWords(row: AuditEntry, editionLabel: (id: string) => string | undefined): AuditWords {
  const what = ACTIONS[row.action] ?? row.action.replace(/[-_]+/g, " ").replace(/^./, (c) => c.toUpperCase());
  const shown = (format: (v: string) => string) => ({ oldValue: row.oldValue == null ? "—" : format(row.oldValue), newValue: row.newValue == null ? "—" : format(row.newValue) });
  const f = row.field ?? "";
  const setting = SETTING_BY_KEY.get(f as SettingKey);
  if (setting) {
    const v = (x: string | null) => (x == null ? "—" : formatSetting(setting.kind, x));
    return { what, field: setting.label, oldValue: v(row.oldValue), newValue: v(row.newValue) };
  }
  if (f === "label") return { what, field: "Label", ...shown((v) => v) };
  if (f === "effectiveDate") return { what, field: "Effective from", ...shown((v) => v) };
  if (f === "status") return { what, field: "Status", ...shown((v) => STATUS[v] ?? v) };
  if (f === "based_on") return { what, field: "Started from", ...shown((v) => editionLabel(v) ?? `edition ${v}`) };
  const fringe = /^fringe:(.+)$/.exec(f);
  if (fringe) return { what, field: `Fringe rate, ${staffCategoryWords(fringe[1]!).toLowerCase()}`, ...shown(formatRate) };
  const proc = /^procedure:([^:]+)(?::(.+))?$/.exec(f);
  if (proc) {
    const [, code, part] = proc;
    if (!part || part === "unitCost") return { what, field: `Procedure ${code}, unit cost`, ...shown((v) => formatMoney(v)) };
    if (part === "name") return { what, field: `Procedure ${code}, name`, ...shown((v) => v) };
    if (part === "category") return { what, field: `Procedure ${code}, category`, ...shown(categoryWords) };
    if (part === "class") return { what, field: `Procedure ${code}, class`, ...shown((v) => PROCEDURE_CLASS_LABELS[v as ProcedureClass] ?? v) };
    return { what, field: `Procedure ${code}, ${part}`, ...shown((v) => v) };
  }
  return { what, field: f ? f.replace(/[-_:]+/g, " ") : "—", ...shown((v) => v) };
}
