/**
 * An XLSX archive unpacked under limits enforced on the real bytes. An archive's central directory
 * may lie about its sizes (a sheet that declares 1,837 bytes and inflates to gigabytes), so each part
 * is inflated by node:zlib with its declared size as the budget: inflation stops as soon as a part
 * passes it, and a part that unpacks to anything but its declared size and checksum is refused.
 * The spreadsheet library then reads a copy rebuilt from these checked bytes, never the upload.
 * ZIP layout: PKWARE APPNOTE.TXT 4.3.7 (local header), 4.3.12 (central directory), 4.3.16 (end record).
 */
import { promisify } from "node:util";
import zlib from "node:zlib";

const inflateRaw = promisify(zlib.inflateRaw) as (b: Uint8Array, o: zlib.ZlibOptions) => Promise<Buffer>;

export class ZipError extends Error {}

export type ZipLimits = { maxEntries: number; maxUncompressed: number; maxRatio: number };
export type ZipPart = { name: string; data: Buffer; crc: number };

type DirEntry = { name: string; flags: number; method: number; crc: number; compressed: number; uncompressed: number; localOffset: number };

function readDirectory(b: Uint8Array): DirEntry[] {
  const view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const minEocd = Math.max(0, b.length - 22 - 65535);
  let eocd = -1;
  for (let i = b.length - 22; i >= minEocd; i--) {
    if (view.getUint32(i, true) === 0x06054b50) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) throw new ZipError("The file looks like an XLSX workbook but its archive is damaged.");
  const count = view.getUint16(eocd + 10, true);
  const cdSize = view.getUint32(eocd + 12, true);
  const cdOffset = view.getUint32(eocd + 16, true);
  if (count === 0xffff || cdOffset === 0xffffffff || cdOffset + cdSize > b.length) {
    throw new ZipError("The workbook's archive uses a layout we do not accept (ZIP64 or damaged).");
  }
  const names = new TextDecoder("utf-8");
  const entries: DirEntry[] = [];
  let p = cdOffset;
  for (let i = 0; i < count; i++) {
    if (p + 46 > b.length || view.getUint32(p, true) !== 0x02014b50) throw new ZipError("The workbook's archive directory is damaged.");
    const compressed = view.getUint32(p + 20, true);
    const uncompressed = view.getUint32(p + 24, true);
    if (compressed === 0xffffffff || uncompressed === 0xffffffff) throw new ZipError("The workbook's archive uses ZIP64, which we do not accept.");
    const nameLength = view.getUint16(p + 28, true);
    entries.push({
      name: names.decode(b.subarray(p + 46, p + 46 + nameLength)),
      flags: view.getUint16(p + 8, true),
      method: view.getUint16(p + 10, true),
      crc: view.getUint32(p + 16, true),
      compressed,
      uncompressed,
      localOffset: view.getUint32(p + 42, true),
    });
    p += 46 + nameLength + view.getUint16(p + 30, true) + view.getUint16(p + 32, true);
  }
  return entries;
}

/** What the central directory declares, read without inflating anything. */
export function zipDeclaredSizes(b: Uint8Array): { entries: number; compressed: number; uncompressed: number } {
  const entries = readDirectory(b);
  return {
    entries: entries.length,
    compressed: entries.reduce((s, e) => s + e.compressed, 0),
    uncompressed: entries.reduce((s, e) => s + e.uncompressed, 0),
  };
}

const mb = (n: number) => (n / 1048576).toFixed(1);

/** Every part of the archive, each inflated within its declared size; the declared totals checked first. */
export async function unpackZip(b: Uint8Array, limits: ZipLimits): Promise<ZipPart[]> {
  const entries = readDirectory(b);
  if (entries.length > limits.maxEntries) throw new ZipError(`The workbook holds ${entries.length} parts; at most ${limits.maxEntries} are accepted.`);
  const declared = entries.reduce((s, e) => s + e.uncompressed, 0);
  const compressed = entries.reduce((s, e) => s + e.compressed, 0);
  if (declared > limits.maxUncompressed) throw new ZipError(`The workbook would unpack to ${mb(declared)} MB; at most ${limits.maxUncompressed / 1048576} MB are accepted.`);
  if (compressed > 0 && declared / compressed > limits.maxRatio) throw new ZipError("The workbook compresses suspiciously well (a possible zip bomb) and was refused.");

  const view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const seen = new Set<string>();
  const parts: ZipPart[] = [];
  for (const e of entries) {
    if (seen.has(e.name)) throw new ZipError("The workbook's archive names one part twice and was refused.");
    seen.add(e.name);
    if (e.flags & 0x1) throw new ZipError("The workbook is encrypted; save it without a password and upload it again.");
    const at = e.localOffset;
    if (at + 30 > b.length || view.getUint32(at, true) !== 0x04034b50) throw new ZipError("The workbook's archive is damaged.");
    const start = at + 30 + view.getUint16(at + 26, true) + view.getUint16(at + 28, true);
    if (start + e.compressed > b.length) throw new ZipError("The workbook's archive is damaged.");
    const raw = b.subarray(start, start + e.compressed);
    let data: Buffer;
    if (e.method === 0) {
      data = Buffer.from(raw);
    } else if (e.method === 8) {
      try {
        // The declared size is the budget: zlib stops and fails as soon as the output passes it.
        data = await inflateRaw(raw, { maxOutputLength: Math.max(1, e.uncompressed) });
      } catch (err) {
        if ((err as { code?: string }).code === "ERR_BUFFER_TOO_LARGE") {
          throw new ZipError(`The workbook's part ${e.name.slice(0, 60)} unpacks to more than the ${e.uncompressed} bytes its archive declares (a possible zip bomb); it was refused before unpacking further.`);
        }
        throw new ZipError("The workbook's archive is damaged.");
      }
    } else {
      throw new ZipError("The workbook's archive uses a compression method we do not accept.");
    }
    if (data.length !== e.uncompressed || zlib.crc32(data) !== e.crc) throw new ZipError("The workbook's archive is damaged: a part does not match its declared size or checksum.");
    parts.push({ name: e.name, data, crc: e.crc });
  }
  return parts;
}

/** A stored (uncompressed) ZIP of checked parts: what the spreadsheet library is given to read. */
export function storedZip(parts: ZipPart[]): Buffer {
  const chunks: Buffer[] = [];
  const central: Buffer[] = [];
  let offset = 0;
  for (const { name, data, crc } of parts) {
    const nameBytes = Buffer.from(name, "utf8");
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(0x0800, 6); // names are UTF-8
    local.writeUInt32LE(crc, 14);
    local.writeUInt32LE(data.length, 18);
    local.writeUInt32LE(data.length, 22);
    local.writeUInt16LE(nameBytes.length, 26);
    const dir = Buffer.alloc(46);
    dir.writeUInt32LE(0x02014b50, 0);
    dir.writeUInt16LE(20, 4);
    dir.writeUInt16LE(20, 6);
    dir.writeUInt16LE(0x0800, 8);
    dir.writeUInt32LE(crc, 16);
    dir.writeUInt32LE(data.length, 20);
    dir.writeUInt32LE(data.length, 24);
    dir.writeUInt16LE(nameBytes.length, 28);
    dir.writeUInt32LE(offset, 42);
    chunks.push(local, nameBytes, data);
    central.push(dir, nameBytes);
    offset += local.length + nameBytes.length + data.length;
  }
  const cd = Buffer.concat(central);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(parts.length, 8);
  end.writeUInt16LE(parts.length, 10);
  end.writeUInt32LE(cd.length, 12);
  end.writeUInt32LE(offset, 16);
  return Buffer.concat([...chunks, cd, end]);
}
