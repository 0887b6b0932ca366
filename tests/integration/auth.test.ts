import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { createAccount, setAccountActive, changeRole } from "@/db/queries/accounts";
import * as sessionRoute from "@/app/api/v1/session/route";
import * as studiesRoute from "@/app/api/v1/studies/route";
import * as studyRoute from "@/app/api/v1/studies/[studyId]/route";
import { LOGIN_MAX_FAILURES } from "@/lib/auth/session-options";
import { NextRequest } from "next/server";
import { proxy } from "@/proxy";
import { cookieFrom, ORIGIN, params, request, signInAs } from "../support/http";
import { dropDatabase, useFreshDatabase } from "../support/db";

let dir = "";
beforeAll(async () => {
  ({ dir } = await useFreshDatabase());
});
afterAll(() => dropDatabase(dir));

async function userId(email: string): Promise<number> {
  return (await getDb().selectFrom("users").select("id").where("email", "=", email).executeTakeFirstOrThrow()).id;
}

describe("sign-in over the API", () => {
  it("signs in, sets an httpOnly SameSite=Lax cookie and reports who", async () => {
    const res = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "PI@demo.test ", password: "demo-pass-2026" } }));
    expect(res.status).toBe(200);
    const set = res.headers.get("set-cookie")!;
    expect(set).toMatch(/HttpOnly/);
    expect(set).toMatch(/SameSite=Lax/);
    expect(set).toMatch(/Max-Age=\d+/);
    expect(set).not.toMatch(/Secure/);
    const body = await res.json();
    expect(body.user).toMatchObject({ email: "pi@demo.test", role: "investigator" });
    const who = await sessionRoute.GET(request("GET", "/api/v1/session", { cookie: cookieFrom(res) }));
    expect(await who.json()).toEqual({ user: { id: body.user.id, email: "pi@demo.test", name: "Dr Ada Okonkwo-Reyes", role: "investigator" } });
  });

  it("marks the cookie Secure behind https", async () => {
    const res = await sessionRoute.POST(
      request("POST", "/api/v1/session", { body: { email: "coi@demo.test", password: "demo-pass-2026" }, headers: { "x-forwarded-proto": "https" } }),
    );
    expect(res.headers.get("set-cookie")).toMatch(/Secure/);
  });

  it("answers an unknown e-mail and a wrong password alike", async () => {
    const unknown = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "nobody@demo.test", password: "demo-pass-2026" } }));
    const wrong = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "finance@demo.test", password: "wrong-password" } }));
    expect(unknown.status).toBe(401);
    expect(wrong.status).toBe(401);
    expect(await unknown.json()).toEqual(await wrong.json());
  });

  it("gives a new session id at every sign-in", async () => {
    const a = await signInAs(sessionRoute, "grants@demo.test");
    const b = await signInAs(sessionRoute, "grants@demo.test");
    expect(a).not.toBe(b);
    const count = await getDb().selectFrom("sessions").select((e) => e.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(count.n)).toBeGreaterThanOrEqual(2);
  });

  it("names the field on bad input and refuses bad JSON", async () => {
    const res = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "not-an-email", password: "" } }));
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(Object.keys(body.error.fields)).toEqual(expect.arrayContaining(["email", "password"]));
    const bad = await sessionRoute.POST(request("POST", "/api/v1/session", { body: "{not json" }));
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.code).toBe("invalid-json");
  });

  it("throttles an account after repeated failures, even with the right password", async () => {
    for (let i = 0; i < LOGIN_MAX_FAILURES; i++) {
      const r = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "admin@demo.test", password: `guess-${i}-xx` } }));
      expect(r.status).toBe(401);
    }
    const res = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "admin@demo.test", password: "demo-pass-2026" } }));
    expect(res.status).toBe(429);
    expect(Number(res.headers.get("retry-after"))).toBeGreaterThan(0);
    // Unknown e-mails are throttled the same way, so throttling does not reveal which accounts exist.
    for (let i = 0; i < LOGIN_MAX_FAILURES; i++) {
      await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "ghost@demo.test", password: `guess-${i}-xx` } }));
    }
    expect((await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "ghost@demo.test", password: "x" } }))).status).toBe(429);
    // Twenty scrypt checks in a row: slow on a busy two-core machine.
  }, 120_000);

  it("sign-out makes the old cookie worthless", async () => {
    const cookie = await signInAs(sessionRoute, "coi@demo.test");
    expect((await sessionRoute.GET(request("GET", "/api/v1/session", { cookie }))).status).toBe(200);
    expect((await sessionRoute.DELETE(request("DELETE", "/api/v1/session", { cookie }))).status).toBe(200);
    expect((await sessionRoute.GET(request("GET", "/api/v1/session", { cookie }))).status).toBe(401);
    expect((await studiesRoute.GET(request("GET", "/api/v1/studies", { cookie }))).status).toBe(401);
  });

  it("a deactivated account is refused at once and cannot sign in again", async () => {
    const cookie = await signInAs(sessionRoute, "finance@demo.test");
    const admin = { id: await userId("admin@demo.test"), role: "admin" as const };
    await setAccountActive(admin, await userId("finance@demo.test"), false);
    expect((await sessionRoute.GET(request("GET", "/api/v1/session", { cookie }))).status).toBe(401);
    const again = await sessionRoute.POST(request("POST", "/api/v1/session", { body: { email: "finance@demo.test", password: "demo-pass-2026" } }));
    expect(again.status).toBe(401);
    await setAccountActive(admin, await userId("finance@demo.test"), true);
  });

  it("a role change ends the open sessions: a cookie from before is refused, a new sign-in has the new role", async () => {
    const cookie = await signInAs(sessionRoute, "finance@demo.test");
    const admin = { id: await userId("admin@demo.test"), role: "admin" as const };
    await changeRole(admin, await userId("finance@demo.test"), "grants-officer");
    expect((await sessionRoute.GET(request("GET", "/api/v1/session", { cookie }))).status).toBe(401);
    const fresh = await signInAs(sessionRoute, "finance@demo.test");
    const who = await (await sessionRoute.GET(request("GET", "/api/v1/session", { cookie: fresh }))).json();
    expect(who.user.role).toBe("grants-officer");
    await changeRole(admin, await userId("finance@demo.test"), "finance");
    const audit = await getDb().selectFrom("audit_log").selectAll().where("field", "=", "role").execute();
    expect(audit.map((a) => [a.old_value, a.new_value])).toEqual([
      ["finance", "grants-officer"],
      ["grants-officer", "finance"],
    ]);
  });

  it("a tampered cookie reads as signed out", async () => {
    const cookie = await signInAs(sessionRoute, "pi@demo.test");
    const tampered = cookie.slice(0, -4) + (cookie.endsWith("AAAA") ? "BBBB" : "AAAA");
    expect((await sessionRoute.GET(request("GET", "/api/v1/session", { cookie: tampered }))).status).toBe(401);
  });

  it("refuses cross-site state changes", async () => {
    const cookie = await signInAs(sessionRoute, "pi@demo.test");
    const evil = await studiesRoute.POST(
      request("POST", "/api/v1/studies", { cookie, body: {}, headers: { origin: "https://evil.example" } }),
    );
    expect(evil.status).toBe(403);
    const fetchSite = await sessionRoute.DELETE(request("DELETE", "/api/v1/session", { cookie, headers: { "sec-fetch-site": "cross-site" } }));
    expect(fetchSite.status).toBe(403);
    expect((await sessionRoute.GET(request("GET", "/api/v1/session", { cookie }))).status).toBe(200);
  });

  it("believes X-Forwarded-Host only when TRUST_PROXY=1 says a proxy sets it", async () => {
    const cookie = await signInAs(sessionRoute, "pi@demo.test");
    const post = (headers: Record<string, string>) => studiesRoute.POST(request("POST", "/api/v1/studies", { cookie, body: {}, headers }));
    const before = await getDb().selectFrom("studies").select("id").execute();
    // A foreign site naming itself in X-Forwarded-Host: refused unless the app is told a proxy sets the header.
    expect((await post({ origin: "https://evil.example", "x-forwarded-host": "evil.example" })).status).toBe(403);
    const saved = process.env.TRUST_PROXY;
    process.env.TRUST_PROXY = "1";
    try {
      // Behind a proxy the public host is the forwarded one: a request from it passes the origin check (then fails validation).
      expect((await post({ origin: "https://ledger.example.org", "x-forwarded-host": "ledger.example.org" })).status).toBe(400);
      expect((await post({ origin: "https://evil.example", "x-forwarded-host": "ledger.example.org" })).status).toBe(403);
    } finally {
      if (saved === undefined) delete process.env.TRUST_PROXY;
      else process.env.TRUST_PROXY = saved;
    }
    expect((await post({ origin: "https://ledger.example.org", "x-forwarded-host": "ledger.example.org" })).status).toBe(403);
    expect(await getDb().selectFrom("studies").select("id").execute()).toEqual(before);
  });

  it("refuses server actions from a foreign Origin or with neither Origin nor Sec-Fetch-Site, with a clean 403", async () => {
    const action = (headers: Record<string, string>) =>
      proxy(new NextRequest(`${ORIGIN}/studies`, { method: "POST", headers: { host: "localhost:3000", "next-action": "0123abcd", cookie: "dl_session=x", ...headers }, body: "[]" }));
    for (const headers of <Record<string, string>[]>[{ origin: "https://evil.example" }, {}, { "sec-fetch-site": "cross-site" }, { "sec-fetch-site": "same-site" }, { origin: "null" }, { origin: "https://evil.example", "x-forwarded-host": "evil.example" }]) {
      const res = action(headers);
      expect(res.status, JSON.stringify(headers)).toBe(403);
      expect(await res.json()).toEqual({ error: { code: "cross-site", message: "Cross-site requests are refused." } });
    }
    for (const headers of <Record<string, string>[]>[{ origin: ORIGIN }, { "sec-fetch-site": "same-origin" }, { origin: ORIGIN, "sec-fetch-site": "same-origin" }]) {
      const res = action(headers);
      expect(res.status, JSON.stringify(headers)).toBe(200);
      expect(res.headers.get("x-middleware-next")).toBe("1");
    }
  });
});

describe("studies and membership", () => {
  it("a member of one study asking for another study gets 404, as for a study that does not exist", async () => {
    const pi = await signInAs(sessionRoute, "pi@demo.test");
    const created = await studiesRoute.POST(
      request("POST", "/api/v1/studies", {
        cookie: pi,
        body: { code: "PILOT-2", title: "A second invented study", sponsor: "Invented Fund", startDate: "2028-01-01", sponsorCap: "$500,000" },
      }),
    );
    expect(created.status).toBe(201);
    const { id } = await created.json();
    const coi = await signInAs(sessionRoute, "coi@demo.test");
    const other = await studyRoute.GET(request("GET", `/api/v1/studies/${id}`, { cookie: coi }), params({ studyId: String(id) }));
    const missing = await studyRoute.GET(request("GET", "/api/v1/studies/99999", { cookie: coi }), params({ studyId: "99999" }));
    expect(other.status).toBe(404);
    expect(missing.status).toBe(404);
    expect((await other.json()).error.message).toBe((await missing.json()).error.message);
    const list = await (await studiesRoute.GET(request("GET", "/api/v1/studies", { cookie: coi }))).json();
    expect(list.studies.map((s: { code: string }) => s.code)).toEqual(["WALK-KNEE"]);
    const mine = await (await studyRoute.GET(request("GET", `/api/v1/studies/${id}`, { cookie: pi }), params({ studyId: String(id) }))).json();
    expect(mine.study).toMatchObject({ code: "PILOT-2", sponsorCap: "500000", membership: "owner" });
  });

  it("the grants office sees every study; a co-investigator may not create one", async () => {
    const grants = await signInAs(sessionRoute, "grants@demo.test");
    const list = await (await studiesRoute.GET(request("GET", "/api/v1/studies", { cookie: grants }))).json();
    expect(list.studies.length).toBe(2);
    const coi = await signInAs(sessionRoute, "coi@demo.test");
    const res = await studiesRoute.POST(
      request("POST", "/api/v1/studies", { cookie: coi, body: { code: "NOPE-1", title: "Not allowed", sponsor: "X Fund", startDate: "2028-01-01" } }),
    );
    expect(res.status).toBe(403);
  });

  it("a code used by another investigator's hidden study is free for a new study: the answer reveals nothing; one's own codes conflict", async () => {
    const admin = { id: await userId("admin@demo.test"), role: "admin" as const };
    await createAccount(admin, { email: "second.pi@demo.test", name: "Dr Invented Second", role: "investigator", password: "demo-pass-2026" });
    const second = await signInAs(sessionRoute, "second.pi@demo.test");
    const create = (cookie: string, code: string) =>
      studiesRoute.POST(request("POST", "/api/v1/studies", { cookie, body: { code, title: "An invented study", sponsor: "Invented Fund", startDate: "2028-01-01" } }));
    // WALK-KNEE belongs to pi@demo.test and is hidden from this investigator: taking its code is answered as any new code.
    const taken = await create(second, "WALK-KNEE");
    expect(taken.status).toBe(201);
    const fresh = await create(second, "NEVER-USED-1");
    expect(fresh.status).toBe(201);
    const list = await (await studiesRoute.GET(request("GET", "/api/v1/studies", { cookie: second }))).json();
    expect(list.studies.map((s: { code: string }) => s.code).sort()).toEqual(["NEVER-USED-1", "WALK-KNEE"]);
    // One's own code conflicts, with a message about one's own studies only.
    const again = await create(second, "WALK-KNEE");
    expect(again.status).toBe(409);
    expect((await again.json()).error.fields.code).toEqual(["You already have a study with that code; choose another."]);
    const pi = await signInAs(sessionRoute, "pi@demo.test");
    expect((await create(pi, "WALK-KNEE")).status).toBe(409);
    // Two parallel creations of one code by one investigator: one study, one clean 409.
    const both = await Promise.all([create(second, "RACE-1"), create(second, "RACE-1")]);
    expect(both.map((r) => r.status).sort()).toEqual([201, 409]);
  });

  it("validation names the field and saves nothing", async () => {
    const pi = await signInAs(sessionRoute, "pi@demo.test");
    const before = await getDb().selectFrom("studies").select("id").execute();
    const res = await studiesRoute.POST(request("POST", "/api/v1/studies", { cookie: pi, body: { code: "x", title: "", sponsor: "S", startDate: "soon", sponsorCap: "lots" } }));
    expect(res.status).toBe(400);
    const { error } = await res.json();
    expect(Object.keys(error.fields).sort()).toEqual(["code", "sponsor", "sponsorCap", "startDate", "title"]);
    expect((await getDb().selectFrom("studies").select("id").execute()).length).toBe(before.length);
  });
});
