import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

/** The soffice binary, or a clear failure: .ci/run installs libreoffice-calc-nogui when it is missing. */
export function soffice(): string {
  for (const p of ["/usr/bin/soffice", "/usr/lib/libreoffice/program/soffice"]) if (fs.existsSync(p)) return p;
  throw new Error("LibreOffice (soffice) is needed to recalculate workbooks: apt-get install -y libreoffice-calc-nogui (.ci/run does this).");
}

/** Opens the workbook in headless LibreOffice, which calculates every formula, and saves it again as .xlsx. */
export function recalculate(xlsx: Buffer): Buffer {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "delta-ledger-lo-"));
  try {
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
