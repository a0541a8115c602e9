import { useMutation } from '@tanstack/react-query';
import type { ColumnMapping, DateFormat } from '../../../../shared/import-columns';
import type { DryRun } from '../../../../shared/schemas/imports';
import { ApiError } from '../../../lib/api-client';
import { federationPath } from './keys';

export interface DryRunInput {
  file: File;
  mapping: ColumnMapping;
  dateFormat: DateFormat;
  addClassifiers: boolean;
  /** Id of the progress job to follow (see useJobProgress). */
  job: string;
  /** Share of the file sent, 0..1. */
  onUploadProgress?: (share: number) => void;
}

/**
 * Sends the file for a dry run. XMLHttpRequest rather than fetch: it reports how much of the
 * file has been sent, for the progress bar.
 */
function uploadDryRun(federation: string, input: DryRunInput): Promise<DryRun> {
  const form = new FormData();
  form.append('mapping', JSON.stringify(input.mapping));
  form.append('dateFormat', input.dateFormat);
  form.append('addClassifiers', String(input.addClassifiers));
  form.append('file', input.file, input.file.name);
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api${federationPath(federation)}/imports?job=${encodeURIComponent(input.job)}`);
    xhr.withCredentials = true;
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) input.onUploadProgress?.(e.loaded / e.total);
    };
    xhr.onload = () => {
      let data: unknown;
      try {
        data = xhr.responseText ? JSON.parse(xhr.responseText) : undefined;
      } catch {
        data = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(data as DryRun);
      else {
        const error = (data as { error?: { code?: string; message?: string; details?: unknown } } | undefined)?.error;
        reject(new ApiError(xhr.status, error?.code ?? 'unknown', error?.message ?? xhr.statusText, error?.details));
      }
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The upload did not reach the server. Check the connection and try again.'));
    xhr.send(form);
  });
}

export function useDryRun(federation: string) {
  return useMutation({ mutationFn: (input: DryRunInput) => uploadDryRun(federation, input) });
}
