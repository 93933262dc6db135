/**
 * Text of SEG-Y textual headers: EBCDIC (IBM code page 037, the code page
 * the SEG-Y standard's examples use) or ASCII, told apart by their bytes.
 *
 * The table maps each of the 256 EBCDIC byte values to its Unicode code
 * point (all fall in 0x00–0xFF, so the map is a bijection onto Latin-1 and
 * ebcdicFromText inverts it exactly).
 */

/** EBCDIC (code page 037) byte → Unicode code point. */
const EBCDIC_TO_CODE = new Uint8Array([
  0x00, 0x01, 0x02, 0x03, 0x9c, 0x09, 0x86, 0x7f, 0x97, 0x8d, 0x8e, 0x0b, 0x0c, 0x0d, 0x0e, 0x0f,
  0x10, 0x11, 0x12, 0x13, 0x9d, 0x85, 0x08, 0x87, 0x18, 0x19, 0x92, 0x8f, 0x1c, 0x1d, 0x1e, 0x1f,
  0x80, 0x81, 0x82, 0x83, 0x84, 0x0a, 0x17, 0x1b, 0x88, 0x89, 0x8a, 0x8b, 0x8c, 0x05, 0x06, 0x07,
  0x90, 0x91, 0x16, 0x93, 0x94, 0x95, 0x96, 0x04, 0x98, 0x99, 0x9a, 0x9b, 0x14, 0x15, 0x9e, 0x1a,
  0x20, 0xa0, 0xe2, 0xe4, 0xe0, 0xe1, 0xe3, 0xe5, 0xe7, 0xf1, 0xa2, 0x2e, 0x3c, 0x28, 0x2b, 0x7c,
  0x26, 0xe9, 0xea, 0xeb, 0xe8, 0xed, 0xee, 0xef, 0xec, 0xdf, 0x21, 0x24, 0x2a, 0x29, 0x3b, 0xac,
  0x2d, 0x2f, 0xc2, 0xc4, 0xc0, 0xc1, 0xc3, 0xc5, 0xc7, 0xd1, 0xa6, 0x2c, 0x25, 0x5f, 0x3e, 0x3f,
  0xf8, 0xc9, 0xca, 0xcb, 0xc8, 0xcd, 0xce, 0xcf, 0xcc, 0x60, 0x3a, 0x23, 0x40, 0x27, 0x3d, 0x22,
  0xd8, 0x61, 0x62, 0x63, 0x64, 0x65, 0x66, 0x67, 0x68, 0x69, 0xab, 0xbb, 0xf0, 0xfd, 0xfe, 0xb1,
  0xb0, 0x6a, 0x6b, 0x6c, 0x6d, 0x6e, 0x6f, 0x70, 0x71, 0x72, 0xaa, 0xba, 0xe6, 0xb8, 0xc6, 0xa4,
  0xb5, 0x7e, 0x73, 0x74, 0x75, 0x76, 0x77, 0x78, 0x79, 0x7a, 0xa1, 0xbf, 0xd0, 0xdd, 0xde, 0xae,
  0x5e, 0xa3, 0xa5, 0xb7, 0xa9, 0xa7, 0xb6, 0xbc, 0xbd, 0xbe, 0x5b, 0x5d, 0xaf, 0xa8, 0xb4, 0xd7,
  0x7b, 0x41, 0x42, 0x43, 0x44, 0x45, 0x46, 0x47, 0x48, 0x49, 0xad, 0xf4, 0xf6, 0xf2, 0xf3, 0xf5,
  0x7d, 0x4a, 0x4b, 0x4c, 0x4d, 0x4e, 0x4f, 0x50, 0x51, 0x52, 0xb9, 0xfb, 0xfc, 0xf9, 0xfa, 0xff,
  0x5c, 0xf7, 0x53, 0x54, 0x55, 0x56, 0x57, 0x58, 0x59, 0x5a, 0xb2, 0xd4, 0xd6, 0xd2, 0xd3, 0xd5,
  0x30, 0x31, 0x32, 0x33, 0x34, 0x35, 0x36, 0x37, 0x38, 0x39, 0xb3, 0xdb, 0xdc, 0xd9, 0xda, 0x9f,
]);

const CODE_TO_EBCDIC = new Uint8Array(256);
for (let b = 0; b < 256; b++) CODE_TO_EBCDIC[EBCDIC_TO_CODE[b]] = b;

/** EBCDIC space, capital C and the digits 0–9 (code page 037). */
const EBCDIC_SPACE = 0x40;
const EBCDIC_C = 0xc3;

/** The Unicode text of EBCDIC bytes. */
export function textFromEbcdic(bytes: Uint8Array): string {
  const codes = new Uint8Array(bytes.length);
  for (let i = 0; i < bytes.length; i++) codes[i] = EBCDIC_TO_CODE[bytes[i]];
  return textFromAscii(codes);
}

/** The text of ASCII (or Latin-1) bytes. */
export function textFromAscii(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i += 4096) s += String.fromCharCode(...bytes.subarray(i, i + 4096));
  return s;
}

/** EBCDIC bytes of a text; characters outside Latin-1 become EBCDIC '?' (0x6F). */
export function ebcdicFromText(text: string): Uint8Array {
  const out = new Uint8Array(text.length);
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    out[i] = c < 256 ? CODE_TO_EBCDIC[c] : 0x6f;
  }
  return out;
}

/** ASCII bytes of a text; characters outside Latin-1 become '?'. */
export function asciiFromText(text: string): Uint8Array {
  const out = new Uint8Array(text.length);
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    out[i] = c < 256 ? c : 0x3f;
  }
  return out;
}

/**
 * Whether a textual header is EBCDIC rather than ASCII. A SEG-Y header is
 * forty 80-character lines starting "C 1", "C 2", …: EBCDIC puts 0xC3 ('C')
 * and 0x40 (space) where ASCII has 0x43 and 0x20. When neither marks the
 * block, the encoding whose bytes decode to more printable characters wins
 * (common practice).
 */
export function looksEbcdic(bytes: Uint8Array): boolean {
  if (bytes.length === 0) return false;
  if (bytes[0] === EBCDIC_C) return true;
  if (bytes[0] === 0x43) return false;
  let ebcdic = 0;
  let ascii = 0;
  const n = Math.min(bytes.length, 3200);
  for (let i = 0; i < n; i++) {
    const b = bytes[i];
    if (b === EBCDIC_SPACE || (b >= 0x81 && b <= 0xe9) || (b >= 0xf0 && b <= 0xf9)) ebcdic++;
    if (b >= 0x20 && b < 0x7f) ascii++;
  }
  return ebcdic > ascii;
}

/**
 * Whether a block holds `needle` (upper-case ASCII letters and symbols),
 * read as EBCDIC or as ASCII, in any letter case. Works on the bytes, so a
 * long run of extended headers is searched without decoding it.
 */
export function blockContains(bytes: Uint8Array, needle: string): boolean {
  const n = needle.length;
  const want = Array.from(needle, (ch) => ch.charCodeAt(0));
  for (const ebcdic of [false, true]) {
    const first = ebcdic ? CODE_TO_EBCDIC[want[0]] : want[0];
    for (let i = bytes.indexOf(first); i >= 0 && i + n <= bytes.length; i = bytes.indexOf(first, i + 1)) {
      let j = 1;
      for (; j < n; j++) {
        let c = ebcdic ? EBCDIC_TO_CODE[bytes[i + j]] : bytes[i + j];
        if (c >= 0x61 && c <= 0x7a) c -= 32;
        if (c !== want[j]) break;
      }
      if (j === n) return true;
    }
  }
  return false;
}

/** Code point → itself, but control characters (C0, DEL, C1) → space, for display. */
const PRINTABLE = new Uint8Array(256).map((_, c) => (c < 0x20 || (c >= 0x7f && c < 0xa0) ? 0x20 : c));

/**
 * A textual header for display: decoded as EBCDIC or ASCII (looksEbcdic),
 * control characters shown as spaces, cut into 80-character card lines with
 * trailing blanks removed, and trailing empty lines dropped.
 */
export function textHeaderLines(block: Uint8Array): string {
  const ebcdic = looksEbcdic(block);
  const codes = new Uint8Array(block.length);
  for (let i = 0; i < block.length; i++) codes[i] = PRINTABLE[ebcdic ? EBCDIC_TO_CODE[block[i]] : block[i]];
  const lines: string[] = [];
  for (let i = 0; i < codes.length; i += 80) lines.push(String.fromCharCode(...codes.subarray(i, i + 80)).trimEnd());
  while (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();
  return lines.join('\n');
}
