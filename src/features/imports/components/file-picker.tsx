import { useId, useState } from 'react';

const MAX_BYTES = 50 * 1024 * 1024;

/** A drop zone and a file chooser for one CSV file (at most 50 MB). */
export function FilePicker({ onFile, disabled }: { onFile: (file: File) => void; disabled?: boolean }) {
  const id = useId();
  const [over, setOver] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const take = (file: File | undefined) => {
    if (!file) return;
    if (file.size > MAX_BYTES) {
      setError(`“${file.name}” is larger than 50 MB: split it into smaller files, or send it through the batch API.`);
      return;
    }
    setError(null);
    onFile(file);
  };
  return (
    <div className="space-y-2">
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setOver(true);
        }}
        onDragLeave={() => setOver(false)}
        onDrop={(e) => {
          e.preventDefault();
          setOver(false);
          if (!disabled) take(e.dataTransfer.files[0]);
        }}
        className={`rounded-lg border-2 border-dashed p-6 text-center ${over ? 'border-harbour bg-harbour-soft' : 'border-line bg-paper'}`}
      >
        <p className="mb-3 text-muted">Drop a CSV file here, or</p>
        <label htmlFor={id} className="btn btn-quiet cursor-pointer">
          Choose a CSV file
        </label>
        <input
          id={id}
          type="file"
          accept=".csv,text/csv"
          className="sr-only"
          disabled={disabled}
          onChange={(e) => {
            take(e.target.files?.[0]);
            e.target.value = '';
          }}
        />
        <p className="mt-3 text-sm text-muted">UTF-8 CSV, at most 50 MB. Commas, semicolons or tabs as delimiters.</p>
      </div>
      {error ? (
        <p role="alert" className="field-error">
          {error}
        </p>
      ) : null}
    </div>
  );
}
