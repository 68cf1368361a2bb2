/**
 * Which text encoding a file is in, from its first bytes. TextDecoder (in browsers and in Node) reads
 * every encoding listed here, so this module only has to choose.
 */

export const IMPORT_ENCODINGS = ['utf-8', 'utf-16le', 'utf-16be', 'windows-1252'] as const;
export type ImportEncoding = (typeof IMPORT_ENCODINGS)[number];

export interface EncodingGuess {
  encoding: ImportEncoding;
  /** Bytes of byte-order mark to skip. */
  bomBytes: number;
  reason: string;
}

/** Is `bytes` valid UTF-8? A sequence cut at the end of a sample is allowed (up to 3 bytes). */
export function isValidUtf8(bytes: Uint8Array): boolean {
  let i = 0;
  const n = bytes.length;
  while (i < n) {
    const b = bytes[i] as number;
    let need: number;
    if (b < 0x80) {
      i++;
      continue;
    } else if (b >= 0xc2 && b <= 0xdf) need = 1;
    else if (b >= 0xe0 && b <= 0xef) need = 2;
    else if (b >= 0xf0 && b <= 0xf4) need = 3;
    else return false;
    if (i + need >= n) return i + need - n < 3 && [...bytes.subarray(i + 1)].every((c) => (c & 0xc0) === 0x80);
    for (let k = 1; k <= need; k++) if (((bytes[i + k] as number) & 0xc0) !== 0x80) return false;
    i += need + 1;
  }
  return true;
}

/**
 * Byte-order marks first (EF BB BF, FF FE, FE FF — The Unicode Standard §23.8); without one, UTF-8 if
 * the bytes are valid UTF-8 (plain ASCII included), otherwise Windows-1252, the usual encoding of
 * spreadsheet and scale software on Western-European Windows (common practice).
 */
export function detectEncoding(bytes: Uint8Array): EncodingGuess {
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) return { encoding: 'utf-8', bomBytes: 3, reason: 'UTF-8 with a byte-order mark' };
  if (bytes[0] === 0xff && bytes[1] === 0xfe) return { encoding: 'utf-16le', bomBytes: 2, reason: 'UTF-16 little-endian (byte-order mark FF FE)' };
  if (bytes[0] === 0xfe && bytes[1] === 0xff) return { encoding: 'utf-16be', bomBytes: 2, reason: 'UTF-16 big-endian (byte-order mark FE FF)' };
  if (isValidUtf8(bytes)) {
    const ascii = bytes.every((b) => b < 0x80);
    return { encoding: 'utf-8', bomBytes: 0, reason: ascii ? 'Plain ASCII text, read as UTF-8' : 'Valid UTF-8 without a byte-order mark' };
  }
  return { encoding: 'windows-1252', bomBytes: 0, reason: 'Not valid UTF-8 and no byte-order mark: read as Windows-1252 (Western European)' };
}

/** Signatures of file types people upload by mistake. */
const MAGIC: { bytes: number[]; name: string }[] = [
  { bytes: [0x50, 0x4b, 0x03, 0x04], name: 'a ZIP archive (an .xlsx or .ods spreadsheet is one; save it as CSV first)' },
  { bytes: [0xd0, 0xcf, 0x11, 0xe0], name: 'an old-style Office document (.xls); save it as CSV first' },
  { bytes: [0x25, 0x50, 0x44, 0x46], name: 'a PDF document' },
  { bytes: [0x89, 0x50, 0x4e, 0x47], name: 'a PNG image' },
  { bytes: [0xff, 0xd8, 0xff], name: 'a JPEG image' },
  { bytes: [0x1f, 0x8b], name: 'a gzip-compressed file' },
  { bytes: [0x53, 0x51, 0x4c, 0x69, 0x74, 0x65], name: 'an SQLite database' },
];

/**
 * Why these first bytes are not a text file, or null if they look like text. UTF-16 text is full of
 * zero bytes, so zero bytes count only for the 8-bit encodings.
 */
export function binaryReason(bytes: Uint8Array, encoding: ImportEncoding): string | null {
  for (const m of MAGIC) if (m.bytes.every((b, i) => bytes[i] === b)) return `This is ${m.name}, not a text file of readings`;
  if (encoding === 'utf-16le' || encoding === 'utf-16be') return null;
  let control = 0;
  for (const b of bytes) {
    if (b === 0) return 'This file contains zero bytes, so it is a binary file, not a text file of readings';
    if (b < 0x20 && b !== 0x09 && b !== 0x0a && b !== 0x0d && b !== 0x0c) control++;
  }
  return bytes.length > 0 && control / bytes.length > 0.05
    ? 'This file is full of control characters, so it is a binary file, not a text file of readings'
    : null;
}
