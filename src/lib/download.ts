import Papa from 'papaparse';
import { neutraliseCell } from '../../shared/csv-safe';

/** Offers a Blob to the browser as a download. */
export function downloadBlob(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/** Rows as a UTF-8 CSV file (with a header row), cells neutralised against formula injection. */
export function downloadCsv(rows: Record<string, unknown>[], columns: { key: string; header: string }[], fileName: string): void {
  const data = rows.map((row) => columns.map((c) => neutraliseCell(row[c.key] ?? '')));
  const text = Papa.unparse({ fields: columns.map((c) => c.header), data }, { newline: '\r\n' });
  downloadBlob(new Blob([text], { type: 'text/csv;charset=utf-8' }), fileName);
}
