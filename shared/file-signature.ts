/**
 * What the first bytes of a file say it is, before anything is read as CSV: a workbook or another
 * binary file (refused, with the reason in words), UTF-16 text (read by its encoding), or UTF-8.
 * Used by the imports page's preview in the browser and by the server's reader, so a workbook
 * renamed .csv is refused in both before any column is mapped.
 */

export type TextEncoding = 'utf-8' | 'utf-16le' | 'utf-16be';

/** The message of a refused binary file, the same in the browser and on the server. */
export function notCsvMessage(kind: string): string {
  return `The file is not a CSV: it looks like ${kind}. Save it as CSV (UTF-8) and upload it again.`;
}

/**
 * The UTF-16 byte order of the text: from its byte-order mark, or (without one) from NUL bytes
 * in every other place of the first bytes, as UTF-16 gives for Latin text; null otherwise.
 */
export function utf16Order(head: Uint8Array): 'utf-16le' | 'utf-16be' | null {
  if (head[0] === 0xff && head[1] === 0xfe) return 'utf-16le';
  if (head[0] === 0xfe && head[1] === 0xff) return 'utf-16be';
  const n = Math.min(head.length, 512) & ~1;
  if (n < 4) return null;
  let evenNul = 0;
  let oddNul = 0;
  for (let i = 0; i < n; i += 2) {
    if (head[i] === 0) evenNul++;
    if (head[i + 1] === 0) oddNul++;
  }
  const pairs = n / 2;
  if (oddNul >= pairs * 0.9 && evenNul === 0) return 'utf-16le';
  if (evenNul >= pairs * 0.9 && oddNul === 0) return 'utf-16be';
  return null;
}

/** Whether the first bytes look like something other than text (a workbook, a PDF, an image…). UTF-16 text is text. */
export function binaryKind(head: Uint8Array): string | null {
  const starts = (...bytes: number[]) => bytes.every((b, i) => head[i] === b);
  if (starts(0x50, 0x4b, 0x03, 0x04) || starts(0x50, 0x4b, 0x05, 0x06))
    return 'a ZIP archive (for example a spreadsheet workbook, .xlsx or .ods)';
  if (starts(0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1)) return 'an old-style spreadsheet workbook (.xls)';
  if (starts(0x25, 0x50, 0x44, 0x46)) return 'a PDF document';
  if (starts(0x89, 0x50, 0x4e, 0x47) || starts(0xff, 0xd8, 0xff) || starts(0x47, 0x49, 0x46)) return 'an image';
  if (starts(0x1f, 0x8b)) return 'a compressed (gzip) file';
  if (utf16Order(head)) return null;
  const n = Math.min(head.length, 65536);
  for (let i = 0; i < n; i++) if (head[i] === 0) return 'binary data (it contains NUL bytes)';
  return null;
}

/** The encoding to read the file with, or a refusal message for a file that is not text. */
export function sniffFile(head: Uint8Array): { encoding: TextEncoding } | { refused: string } {
  const kind = binaryKind(head);
  if (kind) return { refused: notCsvMessage(kind) };
  return { encoding: utf16Order(head) ?? 'utf-8' };
}
