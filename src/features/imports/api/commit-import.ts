import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ImportView } from '../../../../shared/schemas/imports';
import { api } from '../../../lib/api-client';
import { federationPath } from './keys';

/** Commits a staged import; every figure of the federation is fetched again afterwards. */
export function useCommitImport(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ importId, job, confirmAthleteChanges = false }: { importId: number; job: string; confirmAthleteChanges?: boolean }) =>
      api<ImportView>(`${federationPath(federation)}/imports/${importId}/commit?job=${encodeURIComponent(job)}`, {
        method: 'POST',
        body: { confirmAthleteChanges },
      }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation] }),
  });
}
