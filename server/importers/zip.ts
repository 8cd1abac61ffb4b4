/**
 * Guards an XLSX (a zip archive) before anything unpacks it: reads the central directory and
 * refuses archives whose declared contents are too large, too many or too compressed (the
 * "zip bomb"). The archive itself is never inflated here.
 */
export interface ZipCheck {
  ok: boolean;
  message?: string;
  entries?: number;
  uncompressed?: number;
}

export const ZIP_LIMITS = { maxEntries: 2000, maxTotalBytes: 300 * 1024 * 1024, maxRatio: 200, ratioFloorBytes: 1024 * 1024 };

export function inspectZip(buf: Buffer, limits = ZIP_LIMITS): ZipCheck {
  if (buf.length < 22 || buf.readUInt32LE(0) !== 0x04034b50) return { ok: false, message: 'The file is not a valid XLSX workbook (it is not a zip archive).' };
  let eocd = -1;
  for (let i = buf.length - 22; i >= Math.max(0, buf.length - 65_557); i--) {
    if (buf.readUInt32LE(i) === 0x06054b50) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) return { ok: false, message: 'The XLSX workbook is damaged or truncated (no zip directory at its end).' };
  const entries = buf.readUInt16LE(eocd + 10);
  const cdSize = buf.readUInt32LE(eocd + 12);
  const cdOffset = buf.readUInt32LE(eocd + 16);
  if (entries === 0xffff || cdOffset === 0xffffffff) return { ok: false, message: 'The XLSX workbook uses zip64 extensions, which are not accepted; save it again as a normal workbook.' };
  if (entries > limits.maxEntries) return { ok: false, message: `The XLSX workbook holds ${entries} parts; at most ${limits.maxEntries} are accepted.` };
  if (cdOffset + cdSize > buf.length) return { ok: false, message: 'The XLSX workbook is damaged or truncated.' };
  let p = cdOffset;
  let total = 0;
  for (let k = 0; k < entries; k++) {
    if (p + 46 > buf.length || buf.readUInt32LE(p) !== 0x02014b50) return { ok: false, message: 'The XLSX workbook is damaged (its zip directory is broken).' };
    const compressed = buf.readUInt32LE(p + 20);
    const size = buf.readUInt32LE(p + 24);
    if (size === 0xffffffff || compressed === 0xffffffff) return { ok: false, message: 'The XLSX workbook uses zip64 entries, which are not accepted.' };
    total += size;
    if (size > limits.ratioFloorBytes && size / Math.max(1, compressed) > limits.maxRatio) {
      return { ok: false, message: 'The XLSX workbook expands to far more than its size (a compressed "zip bomb"); it was not opened.' };
    }
    if (total > limits.maxTotalBytes) return { ok: false, message: `The XLSX workbook expands to more than ${Math.round(limits.maxTotalBytes / 1048576)} MB; it was not opened.` };
    p += 46 + buf.readUInt16LE(p + 28) + buf.readUInt16LE(p + 30) + buf.readUInt16LE(p + 32);
  }
  return { ok: true, entries, uncompressed: total };
}
