import type { Migration } from "kysely";
import * as foundation from "./2026-12-01-0001-foundation";
import * as rateBook from "./2026-12-01-0002-rate-book";
import * as scenarios from "./2026-12-01-0003-scenarios";
import * as collaboration from "./2026-12-01-0004-collaboration";
import * as effortByPeriod from "./2026-12-02-0005-effort-by-period";
import * as installation from "./2026-12-02-0006-installation";
import * as justificationFigures from "./2026-12-02-0007-justification-figures";
import * as studyCodePerOwner from "./2026-12-02-0008-study-code-per-owner";
import * as outboxPendingSecret from "./2026-12-02-0009-outbox-pending-secret";
import * as procedureClass from "./2026-12-02-0010-procedure-class";
import * as sponsorRules from "./2026-12-02-0011-sponsor-rules";
import * as reviewEvents from "./2026-12-02-0012-review-events";
import * as passwordLinksAndMailSettings from "./2026-12-02-0013-password-links-and-mail-settings";
import * as budgetOutputs from "./2026-12-02-0014-budget-outputs";

/**
 * Every migration, keyed by its dated file name (Kysely runs them in key order).
 * A static list rather than a folder scan, so the same Migrator works under tsx, vitest and any bundler.
 */
export const migrations: Record<string, Migration> = {
  "2026-12-01-0001-foundation": foundation,
  "2026-12-01-0002-rate-book": rateBook,
  "2026-12-01-0003-scenarios": scenarios,
  "2026-12-01-0004-collaboration": collaboration,
  "2026-12-02-0005-effort-by-period": effortByPeriod,
  "2026-12-02-0006-installation": installation,
  "2026-12-02-0007-justification-figures": justificationFigures,
  "2026-12-02-0008-study-code-per-owner": studyCodePerOwner,
  "2026-12-02-0009-outbox-pending-secret": outboxPendingSecret,
  "2026-12-02-0010-procedure-class": procedureClass,
  "2026-12-02-0011-sponsor-rules": sponsorRules,
  "2026-12-02-0012-review-events": reviewEvents,
  "2026-12-02-0013-password-links-and-mail-settings": passwordLinksAndMailSettings,
  "2026-12-02-0014-budget-outputs": budgetOutputs,
};
