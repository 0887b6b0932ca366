import zlib from "node:zlib";

/** A minimal ZIP (one deflated entry), for archives a test needs to craft, such as a zip bomb. */
export function zipOf(name: string, content: Buffer): Buffer {
  const data = zlib.deflateRawSync(content, { level: 9 });
  const crc = zlib.crc32(content);
  const nameBytes = Buffer.from(name);
  const local = Buffer.alloc(30);
  local.writeUInt32LE(0x04034b50, 0);
  local.writeUInt16LE(20, 4);
  local.writeUInt16LE(8, 8); // deflate
  local.writeUInt32LE(crc, 14);
  local.writeUInt32LE(data.length, 18);
  local.writeUInt32LE(content.length, 22);
  local.writeUInt16LE(nameBytes.length, 26);
  const central = Buffer.alloc(46);
  central.writeUInt32LE(0x02014b50, 0);
  central.writeUInt16LE(20, 4);
  central.writeUInt16LE(20, 6);
  central.writeUInt16LE(8, 10);
  central.writeUInt32LE(crc, 16);
  central.writeUInt32LE(data.length, 20);
  central.writeUInt32LE(content.length, 24);
  central.writeUInt16LE(nameBytes.length, 28);
  central.writeUInt32LE(0, 42);
  const cdOffset = local.length + nameBytes.length + data.length;
  const cdSize = central.length + nameBytes.length;
  const eocd = Buffer.alloc(22);
  eocd.writeUInt32LE(0x06054b50, 0);
  eocd.writeUInt16LE(1, 8);
  eocd.writeUInt16LE(1, 10);
  eocd.writeUInt32LE(cdSize, 12);
  eocd.writeUInt32LE(cdOffset, 16);
  return Buffer.concat([local, nameBytes, data, central, nameBytes, eocd]);
}

/** One part of a hand-made archive: its raw (deflated or stored) bytes and what the archive declares about them. */
export type RawPart = { name: string; raw: Buffer; method: 0 | 8; crc: number; declaredSize: number };

export function deflatedPart(name: string, content: Buffer, declaredSize = content.length): RawPart {
  return { name, raw: zlib.deflateRawSync(content, { level: 9 }), method: 8, crc: zlib.crc32(content), declaredSize };
}

/** A ZIP of several parts whose declared sizes may lie (local header and central directory agree on the lie). */
export function zipOfParts(parts: RawPart[]): Buffer {
  const out: Buffer[] = [];
  const central: Buffer[] = [];
  let offset = 0;
  for (const p of parts) {
    const nameBytes = Buffer.from(p.name);
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(p.method, 8);
    local.writeUInt32LE(p.crc, 14);
    local.writeUInt32LE(p.raw.length, 18);
    local.writeUInt32LE(p.declaredSize, 22);
    local.writeUInt16LE(nameBytes.length, 26);
    const dir = Buffer.alloc(46);
    dir.writeUInt32LE(0x02014b50, 0);
    dir.writeUInt16LE(20, 4);
    dir.writeUInt16LE(20, 6);
    dir.writeUInt16LE(p.method, 10);
    dir.writeUInt32LE(p.crc, 16);
    dir.writeUInt32LE(p.raw.length, 20);
    dir.writeUInt32LE(p.declaredSize, 24);
    dir.writeUInt16LE(nameBytes.length, 28);
    dir.writeUInt32LE(offset, 42);
    out.push(local, nameBytes, p.raw);
    central.push(dir, nameBytes);
    offset += local.length + nameBytes.length + p.raw.length;
  }
  const cd = Buffer.concat(central);
  const eocd = Buffer.alloc(22);
  eocd.writeUInt32LE(0x06054b50, 0);
  eocd.writeUInt16LE(parts.length, 8);
  eocd.writeUInt16LE(parts.length, 10);
  eocd.writeUInt32LE(cd.length, 12);
  eocd.writeUInt32LE(offset, 16);
  return Buffer.concat([...out, cd, eocd]);
}

/**
 * A raw deflate stream that inflates to `mib` MiB of spaces in about a kilobyte per MiB: one MiB
 * compressed with a full flush (byte-aligned, no shared history, so the blocks repeat), repeated,
 * then an empty final block.
 */
export async function deflatedSpaces(mib: number): Promise<Buffer> {
  const d = zlib.createDeflateRaw({ level: 9 });
  const chunks: Buffer[] = [];
  d.on("data", (c: Buffer) => chunks.push(c));
  d.write(Buffer.alloc(1 << 20, 0x20));
  await new Promise<void>((resolve) => d.flush(zlib.constants.Z_FULL_FLUSH, () => resolve()));
  d.destroy();
  const unit = Buffer.concat(chunks);
  return Buffer.concat([...Array<Buffer>(mib).fill(unit), Buffer.from([0x03, 0x00])]);
}
