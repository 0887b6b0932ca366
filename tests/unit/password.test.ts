import { describe, expect, it } from "vitest";
import { hashPassword, parsePasswordHash, SCRYPT_PARAMS, verifyPassword } from "@/lib/auth/password";

describe("password hashing (scrypt, OWASP parameters)", () => {
  it("stores the parameters and a 16-byte salt with the hash", async () => {
    const stored = await hashPassword("correct horse battery");
    const parsed = parsePasswordHash(stored)!;
    expect(parsed).not.toBeNull();
    expect({ N: parsed.N, r: parsed.r, p: parsed.p }).toEqual({ N: 2 ** 17, r: 8, p: 1 });
    expect(SCRYPT_PARAMS.N).toBe(131072);
    expect(parsed.salt.length).toBe(16);
    expect(stored.startsWith("scrypt$131072$8$1$")).toBe(true);
  });

  it("accepts the right password and refuses a wrong one", async () => {
    const stored = await hashPassword("demo-pass-2026");
    expect(await verifyPassword("demo-pass-2026", stored)).toBe(true);
    expect(await verifyPassword("demo-pass-2027", stored)).toBe(false);
    expect(await verifyPassword("", stored)).toBe(false);
  });

  it("salts: the same password hashes differently each time", async () => {
    expect(await hashPassword("same password")).not.toBe(await hashPassword("same password"));
  });

  it("takes long and non-ASCII passwords whole, with no truncation", async () => {
    const long = "ü".repeat(200) + "tail";
    const stored = await hashPassword(long);
    expect(await verifyPassword(long, stored)).toBe(true);
    expect(await verifyPassword("ü".repeat(200) + "tale", stored)).toBe(false);
    const unicode = "пароль-密码-🔑-contraseña";
    expect(await verifyPassword(unicode, await hashPassword(unicode))).toBe(true);
  });

  it("refuses a malformed stored hash instead of throwing", async () => {
    expect(await verifyPassword("x", "not-a-hash")).toBe(false);
    expect(await verifyPassword("x", "scrypt$a$b$c$d$e")).toBe(false);
  });
});
