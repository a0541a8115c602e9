import { useState } from 'react';
import { Link } from 'react-router';
import Papa from 'papaparse';
import { sniffFile } from '../../../../shared/file-signature';
import { guessMapping, layoutOf, type ColumnMapping } from '../../../../shared/import-columns';
import type { DryRun, ImportProgress, ImportView } from '../../../../shared/schemas/imports';
import { useCurrentFederation } from '../../../lib/use-federation';
import { ErrorNotice } from '../../../components/status';
import { useCommitImport } from '../api/commit-import';
import { useDiscardImport } from '../api/discard-import';
import { followProgress, newJobId } from '../api/job-progress';
import { useMappings } from '../api/list-mappings';
import { useDryRun } from '../api/upload-dry-run';
import { ColumnMapping as ColumnMappingStep, type MappingState } from './column-mapping';
import { CsvPreview } from './csv-preview';
import { AthleteChangesConfirmation, DryRunResult } from './dry-run-result';
import { FilePicker } from './file-picker';
import { ImportHistory } from './import-history';
import { ProgressBar } from './progress-bar';

const number = new Intl.NumberFormat('en');

interface Preview {
  headers: string[];
  rows: string[][];
}

/** A file the preview refuses before any mapping (a workbook renamed .csv, a PDF…), with the server's words. */
class NotACsv extends Error {}

/**
 * Reads the first rows in the browser, for the preview and the guess of the mapping: the first
 * bytes first, so that a workbook or another binary file is refused before any column is shown,
 * and UTF-16 text is read by its encoding.
 */
async function readPreview(file: File): Promise<Preview> {
  const head = new Uint8Array(await file.slice(0, 4096).arrayBuffer());
  const sniffed = sniffFile(head);
  if ('refused' in sniffed) throw new NotACsv(sniffed.refused);
  return new Promise((resolve, reject) => {
    Papa.parse<string[]>(file, {
      encoding: sniffed.encoding,
      preview: 11,
      skipEmptyLines: 'greedy',
      complete: (result) => {
        const [header, ...rows] = result.data;
        if (!header) return reject(new Error('The file is empty.'));
        resolve({ headers: header.map((h, i) => (i === 0 ? h.replace(/^\uFEFF/, '') : h).trim()), rows });
      },
      error: (error) => reject(error),
    });
  });
}

const PHASE_WORDS: Record<ImportProgress['phase'], string> = {
  waiting: 'Waiting for the server',
  reading: 'Reading the file',
  checking: 'Comparing with the federation’s data',
  writing: 'Writing the import',
  reverting: 'Reverting',
  done: 'Done',
  failed: 'Stopped',
};

/** Imports of panel decisions for leads: upload, map, dry run, commit; and the history with revert. */
export function ImportsPage() {
  const { federation } = useCurrentFederation();
  const slug = federation.slug;
  const saved = useMappings(slug);
  const dryRun = useDryRun(slug);
  const commit = useCommitImport(slug);
  const discard = useDiscardImport(slug);

  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [previewError, setPreviewError] = useState<string | null>(null);
  const [state, setState] = useState<MappingState>({ layout: 'long', mapping: {}, dateFormat: 'iso', addClassifiers: false });
  const [note, setNote] = useState<string | null>(null);
  const [unmapped, setUnmapped] = useState<string[]>([]);
  const [progress, setProgress] = useState<{ label: string; value: number | null } | null>(null);
  const [result, setResult] = useState<DryRun | null>(null);
  const [committed, setCommitted] = useState<ImportView | null>(null);
  const [confirmAthletes, setConfirmAthletes] = useState(false);

  const chooseFile = async (chosen: File) => {
    setFile(chosen);
    setConfirmAthletes(false);
    setResult(null);
    setCommitted(null);
    setUnmapped([]);
    dryRun.reset();
    commit.reset();
    try {
      const p = await readPreview(chosen);
      setPreview(p);
      setPreviewError(null);
      const guess = guessMapping(p.headers);
      // Keep what the lead chose for headers this file shares with the last one.
      const mapping: ColumnMapping = { ...guess.mapping };
      for (const h of p.headers) if (state.mapping[h] !== undefined) mapping[h] = state.mapping[h]!;
      let applied: string | null = null;
      const full = (saved.data?.mappings ?? []).find((m) => p.headers.filter((h) => h !== '').every((h) => m.mapping[h] !== undefined));
      if (full && p.headers.some((h) => mapping[h] === undefined)) {
        for (const h of p.headers) if (full.mapping[h] !== undefined) mapping[h] = full.mapping[h]!;
        applied = full.name;
      }
      setState({ ...state, mapping, layout: layoutOf(mapping), dateFormat: full && applied ? full.dateFormat : state.dateFormat });
      setNote(applied ? `The saved mapping “${applied}” matches this file’s columns and was applied.` : null);
    } catch (error) {
      setPreview(null);
      if (error instanceof NotACsv) {
        setFile(null);
        setPreviewError(`${chosen.name}: ${error.message}`);
        return;
      }
      setPreviewError(
        `The browser could not read the file for a preview (${(error as Error).message}). You can still check it: the server reads it again.`,
      );
    }
  };

  const check = async () => {
    if (!file) return;
    const missing = (preview?.headers ?? []).filter((h) => h !== '' && state.mapping[h] === undefined);
    setUnmapped(missing);
    if (missing.length > 0) return;
    setResult(null);
    const job = newJobId();
    setProgress({ label: `Uploading ${file.name}`, value: 0 });
    const stream = await followProgress(slug, job, (p) => {
      if (p.phase === 'reading') setProgress({ label: PHASE_WORDS.reading, value: p.total ? p.done / p.total : null });
      else if (p.phase === 'checking') setProgress({ label: PHASE_WORDS.checking, value: null });
    });
    try {
      const mapping = Object.fromEntries(Object.entries(state.mapping).filter(([h]) => preview === null || preview.headers.includes(h)));
      const answer = await dryRun.mutateAsync({
        file,
        mapping,
        dateFormat: state.dateFormat,
        addClassifiers: state.addClassifiers,
        job,
        onUploadProgress: (share) =>
          setProgress((p) => (p && p.label.startsWith('Uploading') ? { label: `Uploading ${file.name}`, value: share } : p)),
      });
      setResult(answer);
    } catch {
      // Shown from dryRun.error.
    } finally {
      stream.close();
      setProgress(null);
    }
  };

  const commitImport = async () => {
    if (!result?.importId || !result.counts) return;
    const job = newJobId();
    const c = result.counts;
    const label = `Writing ${number.format(c.assessments.new + c.assessments.changed)} assessments and ${number.format(c.ratings.new + c.ratings.changed)} ratings`;
    setProgress({ label, value: null });
    const stream = await followProgress(slug, job, (p) => {
      if (p.phase === 'writing') setProgress({ label, value: p.total && p.done === p.total ? 1 : null });
    });
    try {
      const view = await commit.mutateAsync({ importId: result.importId, job, confirmAthleteChanges: confirmAthletes });
      setCommitted(view);
      setResult(null);
    } catch {
      // Shown from commit.error.
    } finally {
      stream.close();
      setProgress(null);
    }
  };

  const startOver = () => {
    setFile(null);
    setPreview(null);
    setResult(null);
    setCommitted(null);
    dryRun.reset();
    commit.reset();
  };

  const busy = progress !== null;
  const athleteChanges = result?.outcome === 'ready' ? (result.athleteChangeCount ?? 0) : 0;

  return (
    <div className="space-y-8">
      <div>
        <h1>Imports</h1>
        <p className="text-muted">
          Import panel decisions from a CSV file: check it first (a dry run writes nothing), then commit it. A committed import can be
          reverted.
        </p>
      </div>

      <section aria-labelledby="step-file" className="card space-y-4">
        <h2 id="step-file">1. Choose a file</h2>
        <FilePicker onFile={(f) => void chooseFile(f)} disabled={busy} />
        {file ? (
          <p className="text-sm">
            Chosen: <strong>{file.name}</strong> ({number.format(Math.ceil(file.size / 1024))} KB)
          </p>
        ) : null}
        {previewError ? (
          <p role="alert" className="field-error">
            {previewError}
          </p>
        ) : null}
        {preview && file ? <CsvPreview headers={preview.headers} rows={preview.rows} fileName={file.name} /> : null}
      </section>

      {file && preview ? (
        <section aria-labelledby="step-mapping" className="card space-y-4">
          <h2 id="step-mapping">2. Match the columns</h2>
          {note ? (
            <p role="status" className="text-sm">
              {note}
            </p>
          ) : null}
          <ColumnMappingStep
            federation={slug}
            headers={preview.headers}
            state={state}
            onChange={setState}
            saved={saved.data?.mappings ?? []}
            unmapped={unmapped}
          />
        </section>
      ) : null}

      {file ? (
        <section aria-labelledby="step-check" className="card space-y-4">
          <h2 id="step-check">3. Check and commit</h2>
          {unmapped.length > 0 ? (
            <p role="alert" className="field-error">
              Choose what {unmapped.length === 1 ? 'the column' : 'the columns'} {unmapped.map((h) => `“${h}”`).join(', ')}{' '}
              {unmapped.length === 1 ? 'holds' : 'hold'}, or ignore {unmapped.length === 1 ? 'it' : 'them'}.
            </p>
          ) : null}
          <div className="flex flex-wrap gap-3">
            <button type="button" className="btn btn-primary" onClick={() => void check()} disabled={busy}>
              Check the file
            </button>
            {result?.outcome === 'ready' ? (
              <>
                <button
                  type="button"
                  className="btn btn-primary"
                  onClick={() => void commitImport()}
                  disabled={busy || (athleteChanges > 0 && !confirmAthletes)}
                >
                  Commit the import
                </button>
                <button
                  type="button"
                  className="btn btn-quiet"
                  disabled={busy || discard.isPending}
                  onClick={() => discard.mutate(result.importId!, { onSuccess: () => setResult(null) })}
                >
                  Discard
                </button>
              </>
            ) : null}
          </div>
          <div aria-live="polite">{progress ? <ProgressBar label={progress.label} value={progress.value} /> : null}</div>
          {dryRun.error ? <ErrorNotice error={dryRun.error} /> : null}
          {commit.error ? <ErrorNotice error={commit.error} /> : null}
          {result ? <DryRunResult result={result} /> : null}
          {athleteChanges > 0 && result ? (
            <AthleteChangesConfirmation result={result} confirmed={confirmAthletes} onConfirm={setConfirmAthletes} disabled={busy} />
          ) : null}
          {committed ? (
            <div role="status" className="space-y-2 rounded-lg bg-ok-soft px-4 py-3 text-ok">
              <p>
                Import #{committed.id} is committed: {number.format(committed.counts?.assessments?.new ?? 0)} new and{' '}
                {number.format(committed.counts?.assessments?.changed ?? 0)} changed assessments,{' '}
                {number.format(committed.counts?.ratings?.new ?? 0)} new ratings.
              </p>
              <p className="flex flex-wrap gap-4">
                <Link to={`/f/${slug}`} className="underline">
                  See the overview
                </Link>
                <button type="button" className="underline" onClick={startOver}>
                  Import another file
                </button>
              </p>
            </div>
          ) : null}
        </section>
      ) : null}

      <ImportHistory federation={slug} />
    </div>
  );
}
