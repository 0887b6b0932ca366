import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/** The soffice binary, or a clear failure: .ci/run installs libreoffice-calc-nogui when it is missing. */
export function soffice(): string {
  for (const p of ["/usr/bin/soffice", "/usr/lib/libreoffice/program/soffice"]) if (fs.existsSync(p)) return p;
  throw new Error("LibreOffice (soffice) is needed to recalculate workbooks: apt-get install -y libreoffice-calc-nogui (.ci/run does this).");
}

/**
 * LibreOffice keeps the values stored in an .xlsx unless told to recalculate on load; workbooks store
 * each formula's value, so the profile says "always recalculate" (OOXMLRecalcMode 0) and the values
 * read back are LibreOffice's own, not the stored ones echoed.
 */
const ALWAYS_RECALCULATE = `<?xml version="1.0" encoding="UTF-8"?>
<oor:items xmlns:oor="http://openoffice.org/2001/registry" xmlns:xs="http://www.w3.org/2001/XMLSchema" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="OOXMLRecalcMode" oor:op="fuse"><value>0</value></prop></item>
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="ODFRecalcMode" oor:op="fuse"><value>0</value></prop></item>
</oor:items>
`;

/** Opens the workbook in headless LibreOffice, which calculates every formula, and saves it again as .xlsx. */
export function recalculate(xlsx: Buffer): Buffer {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-lo-"));
  try {
    fs.mkdirSync(path.join(dir, "profile", "user"), { recursive: true });
    fs.writeFileSync(path.join(dir, "profile", "user", "registrymodifications.xcu"), ALWAYS_RECALCULATE);
    const input = path.join(dir, "in.xlsx");
    fs.writeFileSync(input, xlsx);
    execFileSync(soffice(), [`-env:UserInstallation=file://${dir}/profile`, "--headless", "--norestore", "--convert-to", "xlsx", "--outdir", path.join(dir, "out"), input], {
      stdio: "pipe",
      timeout: 120_000,
    });
    return fs.readFileSync(path.join(dir, "out", "in.xlsx"));
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
