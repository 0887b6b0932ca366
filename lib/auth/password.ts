import { randomBytes, scrypt as scryptCb, timingSafeEqual, type ScryptOptions } from "node:crypto";

/** OWASP's scrypt parameters (Password Storage Cheat Sheet): N = 2^17, r = 8, p = 1. */
export const SCRYPT_PARAMS = { N: 2 ** 17, r: 8, p: 1 } as const;
const KEY_LENGTH = 32;
const SALT_BYTES = 16;
export const PASSWORD_MIN = 8;
/** Long passphrases are welcome; the ceiling only stops a megabyte "password" from costing CPU. */
export const PASSWORD_MAX = 1024;

function scrypt(password: string, salt: Buffer, keylen: number, opts: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) =>
    scryptCb(password, salt, keylen, opts, (err, key) =>
      err ? reject(err) : resolve(key),
    ),
  );
}

// 128·N·r bytes are needed; Node's default maxmem (32 MiB) is too small for N = 2^17.
function maxmemFor(N: number, r: number): number {
  return 128 * N * r * 2;
}

/** Returns `scrypt$N$r$p$salt$hash` (base64), so the parameters travel with the hash. */
export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(SALT_BYTES);
  const { N, r, p } = SCRYPT_PARAMS;
  const key = await scrypt(password, salt, KEY_LENGTH, { N, r, p, maxmem: maxmemFor(N, r) });
  return ["scrypt", N, r, p, salt.toString("base64"), key.toString("base64")].join("$");
}

export type ParsedHash = { N: number; r: number; p: number; salt: Buffer; key: Buffer };

export function parsePasswordHash(stored: string): ParsedHash | null {
  const parts = stored.split("$");
  if (parts.length !== 6 || parts[0] !== "scrypt") return null;
  const [N, r, p] = [Number(parts[1]), Number(parts[2]), Number(parts[3])];
  if (![N, r, p].every((x) => Number.isInteger(x) && x > 0)) return null;
  return { N, r, p, salt: Buffer.from(parts[4]!, "base64"), key: Buffer.from(parts[5]!, "base64") };
}

export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parsed = parsePasswordHash(stored);
  if (!parsed) return false;
  const { N, r, p, salt, key } = parsed;
  const candidate = await scrypt(password, salt, key.length, { N, r, p, maxmem: maxmemFor(N, r) });
  return candidate.length === key.length && timingSafeEqual(candidate, key);
}

/** A hash of a random password: verifying against it costs the same time as a real account. */
let dummyHash: Promise<string> | undefined;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword(randomBytes(18).toString("base64"));
  return dummyHash;
}
