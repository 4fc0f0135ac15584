// Downloads of a revision's files: the margin report (PDF), the waveforms (CSV), the export (JSON).
import { useMutation } from '@tanstack/react-query';
import { apiBlob, saveBlob } from '@/lib/api/client';

export type RevisionFile = 'report.pdf' | 'waveforms.csv' | 'export.json';

export function useDownloadRevisionFile() {
  return useMutation({
    mutationFn: async ({ revisionId, file, filename }: { revisionId: string; file: RevisionFile; filename: string }) => {
      const blob = await apiBlob(`/api/revisions/${revisionId}/${file}`);
      saveBlob(blob, filename);
      return blob.size;
    },
  });
}
