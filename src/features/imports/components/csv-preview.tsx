/** The first rows of the chosen file, as the browser reads them (the server reads it again). */
export function CsvPreview({ headers, rows, fileName }: { headers: string[]; rows: string[][]; fileName: string }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-line bg-card">
      <table className="w-full border-collapse text-sm">
        <caption className="px-3 py-2 text-left text-sm text-muted">
          First {rows.length} rows of {fileName}
        </caption>
        <thead className="bg-paper">
          <tr>
            {headers.map((h, i) => (
              <th key={`${h}-${i}`} scope="col" className="border-b border-line px-3 py-2 text-left font-semibold">
                {h || <span className="text-muted">(no header)</span>}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, r) => (
            <tr key={r} className="border-b border-line last:border-0">
              {headers.map((_h, c) => (
                <td key={c} className="whitespace-nowrap px-3 py-1.5">
                  {row[c] ?? ''}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
