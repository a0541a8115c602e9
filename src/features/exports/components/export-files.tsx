import type { ExportView } from '../../../../shared/schemas/exports';

const FILE_LABELS: Record<string, string> = { csv: 'CSV', json: 'JSON', dictionary: 'Data dictionary' };

/** Download links of an export's files while they are kept (the session cookie authorises them). */
export function ExportFiles({ view }: { view: ExportView }) {
  if (view.expired) return <span className="text-muted">Expired</span>;
  return (
    <ul className="flex flex-wrap gap-2" aria-label={`Files of export ${view.id}`}>
      {(['csv', 'json', 'dictionary'] as const).map((file) =>
        view.files[file] ? (
          <li key={file}>
            <a
              className="btn btn-quiet min-h-10 py-1.5"
              href={`/api${view.files[file]}`}
              download
              aria-label={`${FILE_LABELS[file]} of export ${view.id}`}
            >
              {FILE_LABELS[file]}
            </a>
          </li>
        ) : null,
      )}
    </ul>
  );
}
