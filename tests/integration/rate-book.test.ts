import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as editionsRoute from "@/app/api/v1/rate-book/editions/route";
import * as editionRoute from "@/app/api/v1/rate-book/editions/[editionId]/route";
import * as importsRoute from "@/app/api/v1/rate-book/editions/[editionId]/imports/route";
import * as templateRoute from "@/app/api/v1/rate-book/template/route";
import { commitImport, editionToRateBook, getEdition, getImport, latestPublishedEdition } from "@/db/queries/rate-book";
import { computeLedger } from "@/lib/costing";
import { demoRateBook } from "@/scripts/demo-data";
import { SMALL_STUDY } from "../fixtures/rate-books";
import { dropDatabase, useFreshDatabase } from "../support/db";
import { ORIGIN, params, request, signInAs } from "../support/http";
import { zipOf } from "../support/zip";

let dir = "";
const cookies: Record<string, string> = {};
let grantsId = 0;
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
  for (const who of ["grants", "finance", "pi", "coi", "admin"]) cookies[who] = await signInAs(sessionRoute, `${who}@demo.test`);
  grantsId = (await getDb().selectFrom("users").select("id").where("email", "=", "grants@demo.test").executeTakeFirstOrThrow()).id;
});
afterAll(() => dropDatabase(dir));

const grants = () => ({ id: grantsId, role: "grants-officer" as const });
const patch = (who: string, id: number, body: unknown) =>
  editionRoute.PATCH(request("PATCH", `/api/v1/rate-book/editions/${id}`, { cookie: cookies[who], body }), params({ editionId: String(id) }));
const getOne = (who: string, id: number) => editionRoute.GET(request("GET", `/api/v1/rate-book/editions/${id}`, { cookie: cookies[who] }), params({ editionId: String(id) }));
async function newDraft(label = "2028 rates"): Promise<number> {
  const res = await editionsRoute.POST(request("POST", "/api/v1/rate-book/editions", { cookie: cookies.grants, body: { label, effectiveDate: "2028-01-01" } }));
  expect(res.status).toBe(201);
  return (await res.json()).id;
}
async function upload(who: string, id: number, name: string, bytes: Uint8Array | Buffer, type = "text/csv") {
  const form = new FormData();
  form.set("file", new File([new Uint8Array(bytes)], name, { type }));
  const req = new Request(`${ORIGIN}/api/v1/rate-book/editions/${id}/imports`, { method: "POST", body: form, headers: { cookie: cookies[who]!, host: "localhost:3000" } });
  return importsRoute.POST(req, params({ editionId: String(id) }));
}
const snapshot = async () =>
  JSON.stringify(
    await Promise.all([
      getDb().selectFrom("rate_book_editions").selectAll().orderBy("id").execute(),
      getDb().selectFrom("rate_book_fringe").selectAll().orderBy("id").execute(),
      getDb().selectFrom("rate_book_procedures").selectAll().orderBy("id").execute(),
      getDb().selectFrom("rate_book_imports").selectAll().orderBy("id").execute(),
    ]),
  );

describe("reading the rate book", () => {
  it("everyone signed in reads published editions", async () => {
    for (const who of ["grants", "finance", "pi", "coi", "admin"]) {
      const res = await editionsRoute.GET(request("GET", "/api/v1/rate-book/editions", { cookie: cookies[who] }));
      const { editions } = await res.json();
      expect(editions.map((e: { label: string }) => e.label)).toContain("2027 rates");
    }
  });
  it("the seeded edition prices a ledger", async () => {
    const e = (await latestPublishedEdition(grants()))!;
    // SMALL_STUDY's timeline (worked by hand in tests/unit/costing.test.ts: 84 screened in period 1, 116 in
    // period 2; 42 enrolled in period 1, 58 in period 2) priced at the seeded rates, 3% escalation from period 2:
    // screening 84 × $85 = 7,140.00 and 116 × $87.55 = 10,155.80; the metabolic panel at the baseline visit
    // 42 × $38 = 1,596.00 and 58 × $39.14 = 2,270.12.
    const ledger = computeLedger({ ...SMALL_STUDY, visits: [{ name: "Baseline", month: 0, procedures: [{ code: "LAB-PANEL" }] }] }, editionToRateBook(e));
    expect(ledger.lines.find((l) => l.key === "screening")!.amounts).toEqual(["7140.00", "10155.80"]);
    // The demo rate book classes the metabolic panel as routine care: priced the same, listed apart from the budget.
    expect([...ledger.lines, ...ledger.routineCare.lines].find((l) => l.key.includes("LAB-PANEL@"))!.amounts).toEqual(["1596.00", "2270.12"]);
    expect(ledger.faRate).toBe("0.565");
    // And the stored edition prices exactly as the seed's own rate book does.
    expect(ledger.totals).toEqual(computeLedger({ ...SMALL_STUDY, visits: [{ name: "Baseline", month: 0, procedures: [{ code: "LAB-PANEL" }] }] }, demoRateBook(e.id)).totals);
  });
});

describe("editing a draft and publishing it", () => {
  it("the grants officer edits a draft and publishes it; every change is audited", async () => {
    const id = await newDraft();
    let e = (await (await getOne("grants", id)).json()).edition;
    expect(e.status).toBe("draft");
    const fringeId = e.fringe.find((f: { category: string }) => f.category === "faculty").id;
    const res = await patch("grants", id, {
      version: e.version,
      settings: { faRate: "0.57", salaryCap: "228000" },
      fringe: [{ id: fringeId, version: 1, rate: "0.29" }, { category: "visiting", rate: "0.1" }],
      procedures: [{ code: "MRI-KNEE", name: "Knee MRI", unitCost: "450", category: "imaging" }],
    });
    expect(res.status).toBe(200);
    e = (await res.json()).edition;
    expect(e.settings.faRate).toBe("0.57");
    expect(e.fringe.find((f: { category: string }) => f.category === "faculty").rate).toBe("0.29");
    const audit = await getDb().selectFrom("audit_log").selectAll().where("entity", "=", "rate-book-edition").where("entity_id", "=", String(id)).execute();
    expect(audit.map((a) => [a.field, a.old_value, a.new_value])).toEqual(
      expect.arrayContaining([
        ["faRate", "0.565", "0.57"],
        ["salaryCap", "225700.00", "228000"],
        ["fringe:faculty", "0.285", "0.29"],
        ["fringe:visiting", null, "0.1"],
        ["procedure:MRI-KNEE", null, "450"],
      ]),
    );
    expect(audit.every((a) => a.user_id === grantsId && a.at)).toBe(true);
    const pub = await patch("grants", id, { version: e.version, publish: true });
    expect(pub.status).toBe(200);
    expect((await pub.json()).edition.status).toBe("published");
    // Published editions are read-only.
    const after = await patch("grants", id, { version: e.version + 1, settings: { faRate: "0.6" } });
    expect(after.status).toBe(409);
    expect((await after.json()).error.message).toMatch(/read-only/);
    // Effective 2028-01-01, it is scheduled; the seeded edition stays in force today.
    const listed = (await (await editionsRoute.GET(request("GET", "/api/v1/rate-book/editions", { cookie: cookies.grants }))).json()).editions;
    expect(listed.find((x: { id: number }) => x.id === id).standing).toEqual({ kind: "scheduled", from: "2028-01-01" });
    expect((await latestPublishedEdition(grants()))!.label).toBe("2027 rates");
  });

  it("finance, investigator, co-investigator and admin get 403 on PATCH, and nothing changes", async () => {
    const id = await newDraft("2029 rates");
    const before = await snapshot();
    for (const who of ["finance", "pi", "coi", "admin"]) {
      const res = await patch(who, id, { version: 1, settings: { faRate: "0.99" } });
      expect(res.status, who).toBe(403);
      const create = await editionsRoute.POST(request("POST", "/api/v1/rate-book/editions", { cookie: cookies[who], body: { label: "x rates", effectiveDate: "2030-01-01" } }));
      expect(create.status, who).toBe(403);
      expect((await upload(who, id, "r.csv", Buffer.from("section,key,name,value,category\n"))).status, who).toBe(403);
    }
    expect(await snapshot()).toBe(before);
    // Drafts are not shown to other roles at all.
    expect((await getOne("finance", id)).status).toBe(404);
    expect((await getOne("grants", id)).status).toBe(200);
  });

  it("a stale edit gets a conflict with the current value, and nothing is overwritten", async () => {
    const id = await newDraft("2030 rates");
    const e = (await (await getOne("grants", id)).json()).edition;
    expect((await patch("grants", id, { version: e.version, settings: { faRate: "0.58" } })).status).toBe(200);
    const stale = await patch("grants", id, { version: e.version, settings: { faRate: "0.50" } });
    expect(stale.status).toBe(409);
    const body = await stale.json();
    expect(body.error.code).toBe("conflict");
    expect(body.error.fields["settings.faRate"][0]).toMatch(/0\.58/);
    expect(body.error.current.settings.faRate).toBe("0.58");
    // Row versions: two edits of the same fringe row from one read.
    const row = e.fringe[0];
    expect((await patch("grants", id, { fringe: [{ id: row.id, version: row.version, rate: "0.2" }] })).status).toBe(200);
    const staleRow = await patch("grants", id, { fringe: [{ id: row.id, version: row.version, rate: "0.3" }] });
    expect(staleRow.status).toBe(409);
    expect((await staleRow.json()).error.message).toMatch(/now 0\.2/);
    const now = await getEdition(grants(), id);
    expect(now.settings.faRate).toBe("0.58");
    expect(now.fringe.find((f) => f.id === row.id)!.rate).toBe("0.2");
  });

  it("bad values name the field and change nothing", async () => {
    const id = await newDraft("2031 rates");
    const before = await snapshot();
    const res = await patch("grants", id, { version: 1, settings: { faRate: "1.5", faBase: "weird", monitoringVisitsPerYear: "-1" } });
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(Object.keys(error.fields).sort()).toEqual(["settings.faBase", "settings.faRate", "settings.monitoringVisitsPerYear"]);
    expect((await patch("grants", id, { settings: { faRate: "0.5" } })).status).toBe(400); // no version
    expect(await snapshot()).toBe(before);
  });
});

describe("importing a rate sheet", () => {
  const good = [
    "section,key,name,value,category",
    "setting,faRate,,0.575,",
    "setting,salaryCap,,$230,000,",
    "fringe,faculty,,0.30,",
    "fringe,nurse,,0.33,",
    "procedure,LAB-PANEL,Metabolic panel,41.00,laboratory",
    'procedure,ECG,"Electrocardiogram, 12-lead",55.50,cardiology',
  ].join("\n");

  it("a good CSV previews, then commits, and each change is audited", async () => {
    const id = await newDraft("2032 rates");
    const res = await upload("grants", id, "../../etc/rates 2032.csv", Buffer.from(good.replace("$230,000", '"$230,000"')));
    expect(res.status).toBe(201);
    const { import: view } = await res.json();
    expect(view.fileName).toBe("rates 2032.csv");
    expect(view.errors).toEqual([]);
    expect(view.rows.map((r: { key: string; status: string }) => [r.key, r.status])).toEqual([
      ["faRate", "change"],
      ["salaryCap", "change"],
      ["faculty", "change"],
      ["nurse", "add"],
      ["LAB-PANEL", "change"],
      ["ECG", "add"],
    ]);
    // Nothing applied yet: the draft still has the rate it was copied with.
    expect((await getEdition(grants(), id)).settings.faRate).toBe(view.rows[0].old);
    expect(view.rows[0].old).not.toBe("0.575");
    await commitImport(grants(), view.id);
    const e = await getEdition(grants(), id);
    expect(e.settings.faRate).toBe("0.575");
    expect(e.settings.salaryCap).toBe("230000");
    expect(e.procedures.find((p) => p.code === "ECG")).toMatchObject({ name: "Electrocardiogram, 12-lead", unitCost: "55.50" });
    const audit = await getDb().selectFrom("audit_log").select(["action", "field"]).where("entity_id", "=", String(id)).where("action", "=", "import").execute();
    expect(audit.length).toBeGreaterThanOrEqual(6);
    await expect(getImport(grants(), view.id)).rejects.toThrow(/not found/);
  });

  it("a good XLSX is read the same way", async () => {
    const id = await newDraft("2033 rates");
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet("Rates");
    for (const line of [["section", "key", "name", "value", "category"], ["setting", "faRate", "", 0.59, ""], ["fringe", "student", "", 0.1, ""]]) ws.addRow(line);
    const res = await upload("grants", id, "rates.xlsx", Buffer.from(await wb.xlsx.writeBuffer()), "application/octet-stream");
    expect(res.status).toBe(201);
    const { import: view } = await res.json();
    expect(view.kind).toBe("xlsx");
    expect(view.rows.map((r: { key: string; value: string }) => [r.key, r.value])).toEqual([
      ["faRate", "0.59"],
      ["student", "0.1"],
    ]);
  });

  it("a malformed sheet shows per-row errors and cannot be committed", async () => {
    const id = await newDraft("2034 rates");
    const before = (await getEdition(grants(), id)).settings;
    const bad = ["section,key,name,value,category", "setting,faRate,,1.7,", "setting,noSuchThing,,1,", "fringe,Faculty Staff,,0.3,", "procedure,X1,,abc,", "mystery,a,,1,", "fringe,student,,0.1,"].join("\n");
    const res = await upload("grants", id, "bad.csv", Buffer.from(bad));
    expect(res.status).toBe(201);
    const { import: view } = await res.json();
    expect([...new Set(view.errors.map((e: { row: number }) => e.row))]).toEqual([2, 3, 4, 5, 6]);
    expect(view.errors[0].message).toMatch(/F&A rate: from 0% to 100%/);
    const commit = commitImport(grants(), view.id);
    await expect(commit).rejects.toMatchObject({ status: 422 });
    expect((await getEdition(grants(), id)).settings).toEqual(before);
    // A sheet without the header row is refused outright.
    const noHeader = await upload("grants", id, "x.csv", Buffer.from("setting,faRate,,0.5,\n"));
    expect(noHeader.status).toBe(422);
    expect((await noHeader.json()).error.message).toMatch(/first row must name the columns/);
  });

  it("formula cells are refused, in XLSX and in CSV, and nothing is stored", async () => {
    const id = await newDraft("2035 rates");
    const before = await snapshot();
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet("Rates");
    ws.addRow(["section", "key", "name", "value", "category"]);
    ws.addRow(["setting", "faRate", "", null, ""]);
    ws.getCell("D2").value = { formula: "0.5+0.1", result: 0.6 } as ExcelJS.CellFormulaValue;
    const x = await upload("grants", id, "formula.xlsx", Buffer.from(await wb.xlsx.writeBuffer()));
    expect(x.status).toBe(422);
    expect((await x.json()).error.message).toMatch(/formula/);
    expect(await snapshot()).toBe(before);
    const c = await upload("grants", id, "formula.csv", Buffer.from('section,key,name,value,category\nprocedure,HACK,"=HYPERLINK(""http://x"")",1,other\n'));
    const { import: view } = await c.json();
    expect(view.errors[0].message).toMatch(/formula/);
  });

  it("oversized files, bomb-like archives and files of the wrong type are refused, nothing stored", async () => {
    const id = await newDraft("2036 rates");
    const before = await snapshot();
    const big = await upload("grants", id, "big.csv", Buffer.alloc(2 * 1024 * 1024 + 10, 0x61));
    expect(big.status).toBe(413);
    const bomb = await upload("grants", id, "bomb.xlsx", zipOf("xl/worksheets/sheet1.xml", Buffer.alloc(40 * 1024 * 1024, 0x20)));
    expect(bomb.status).toBe(422);
    expect((await bomb.json()).error.message).toMatch(/unpack to|zip bomb/);
    const ratio = await upload("grants", id, "ratio.xlsx", zipOf("a.xml", Buffer.alloc(5 * 1024 * 1024, 0x20)));
    expect(ratio.status).toBe(422);
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0x00, 0x0d, 0xff, 0xfe]);
    const wrong = await upload("grants", id, "rates.csv", png);
    expect(wrong.status).toBe(422);
    expect((await wrong.json()).error.message).toMatch(/neither an XLSX workbook nor/);
    const damaged = await upload("grants", id, "rates.xlsx", Buffer.concat([Buffer.from("PK\u0003\u0004"), Buffer.alloc(100)]));
    expect(damaged.status).toBe(422);
    expect(await snapshot()).toBe(before);
  });

  it("the template downloads as CSV and XLSX, and imports cleanly", async () => {
    const csv = await templateRoute.GET(request("GET", "/api/v1/rate-book/template?format=csv", { cookie: cookies.grants }));
    expect(csv.headers.get("content-disposition")).toMatch(/attachment; filename=".*\.csv"/);
    const text = await csv.text();
    const xlsx = await templateRoute.GET(request("GET", "/api/v1/rate-book/template?format=xlsx", { cookie: cookies.grants }));
    expect(xlsx.headers.get("content-type")).toMatch(/spreadsheetml/);
    const id = await newDraft("2037 rates");
    for (const [name, bytes] of [["t.csv", Buffer.from(text)], ["t.xlsx", Buffer.from(await xlsx.arrayBuffer())]] as const) {
      const res = await upload("grants", id, name, bytes);
      expect(res.status).toBe(201);
      expect((await res.json()).import.errors).toEqual([]);
    }
  });
});
