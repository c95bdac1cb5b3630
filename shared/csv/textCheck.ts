// Is an uploaded file CSV text at all? A workbook, an image or UTF-16 text without a byte-order
// mark would otherwise be decoded into nonsense columns (and NUL characters, which PostgreSQL
// text cannot hold). Pure: the same answer in the browser and on the server.

/** Leading bytes of file kinds people upload by mistake (their published signatures). */
const SIGNATURES: Array<{ bytes: number[]; kind: string }> = [
  { bytes: [0x50, 0x4b, 0x03, 0x04], kind: "a ZIP archive, such as a spreadsheet workbook (.xlsx, .ods)" },
  { bytes: [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1], kind: "an older spreadsheet workbook (.xls)" },
  { bytes: [0x25, 0x50, 0x44, 0x46], kind: "a PDF document" },
  { bytes: [0x89, 0x50, 0x4e, 0x47], kind: "a PNG image" },
  { bytes: [0xff, 0xd8, 0xff], kind: "a JPEG image" },
  { bytes: [0x47, 0x49, 0x46, 0x38], kind: "a GIF image" },
  { bytes: [0x1f, 0x8b], kind: "a gzip-compressed file" },
];

const SAVE_AS_CSV = "Save the table as CSV (UTF-8) and upload that.";

const startsWith = (bytes: Uint8Array, prefix: number[]) => prefix.length <= bytes.length && prefix.every((b, i) => bytes[i] === b);

/**
 * Why the bytes are not a CSV text file, or null when they may be one. UTF-16 with a byte-order
 * mark is text (its zero bytes are expected); any other zero byte is not.
 *
 * @example csvTextProblem(new Uint8Array([0x25, 0x50, 0x44, 0x46, 0x2d])) // "The file is a PDF document, not a CSV text file. Save the table ..."
 */
export function csvTextProblem(bytes: Uint8Array): string | null {
  const signature = SIGNATURES.find((s) => startsWith(bytes, s.bytes));
  if (signature) return `The file is ${signature.kind}, not a CSV text file. ${SAVE_AS_CSV}`;
  if (startsWith(bytes, [0xff, 0xfe]) || startsWith(bytes, [0xfe, 0xff])) return null;
  const firstZero = bytes.indexOf(0);
  if (firstZero < 0) return null;
  // UTF-16 without a byte-order mark: text of mostly Latin letters has a zero in every other byte.
  const head = bytes.subarray(0, 400);
  let zeroEven = 0;
  let zeroOdd = 0;
  for (let i = 0; i < head.length; i++) {
    if (head[i] !== 0) continue;
    if (i % 2) zeroOdd++;
    else zeroEven++;
  }
  if (Math.max(zeroEven, zeroOdd) >= head.length / 4) {
    return `The file looks like UTF-16 text without a byte-order mark, which cannot be read reliably. ${SAVE_AS_CSV}`;
  }
  let line = 1;
  for (let i = 0; i < firstZero; i++) if (bytes[i] === 0x0a) line++;
  return `The file holds a zero byte (NUL) on line ${line}: it is not a CSV text file, or it is damaged. ${SAVE_AS_CSV}`;
}
