// Bench captures (upload, preview, fit) and the parts library. Uploads go as multipart forms, so
// they use fetch directly with the same cookie, team header and error shape as lib/api.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError, apiBlob, getActiveTeam, saveBlob, TEAM_HEADER } from '@/lib/api/client';
import { designKeys } from './keys';

export const benchKeys = {
  all: ['bench'] as const,
  captures: (designId: string) => [...benchKeys.all, 'captures', designId] as const,
  capture: (id: string) => [...benchKeys.all, 'capture', id] as const,
  parts: (teamId: string | null, search: string, kind: string, archived: boolean) =>
    [...benchKeys.all, 'parts', teamId, search, kind, archived] as const,
  partsAll: () => [...benchKeys.all, 'parts'] as const,
};

export type Quantity = 'capacitorVoltage' | 'busVoltage' | 'current';

export interface CapturePreview {
  fileName: string;
  byteSize: number;
  rows: number;
  delimiter: string;
  decimal: string;
  header: string[] | null;
  timeColumn: number;
  columns: { index: number; name: string; sample: number[] }[];
  preview: string[][];
  skippedLines: number[];
}

export interface CaptureMappingInput {
  time: { column: number; unit: 's' | 'ms' | 'us' | 'ns' };
  channels: { column: number; quantity: Quantity; unit: string; scale?: number }[];
}

export interface CaptureSummary {
  id: string;
  designId: string;
  name: string;
  fileName: string;
  byteSize: number;
  sha256: string;
  rows: number;
  createdAt: string;
  uploadedBy: { id: string; name: string } | null;
}

export interface CaptureDetail extends CaptureSummary {
  data: {
    time: number[];
    channels: { column: number; name: string; quantity: Quantity; unit: 'V' | 'A'; values: number[] }[];
  };
}

export interface FitResult {
  quantity: Quantity;
  values: Record<string, number>;
  series: { inductance: number; resistance: number };
  ringing: { zeta: number; fd: number; fn: number; finalValue: number; peaks: number };
  refined: { converged: boolean; iterations: number; residualRms: number; initialResidualRms: number } | null;
  residualRms: number;
  residualMax: number;
  apply: Record<string, unknown>;
}

/** An upload error: the common shape plus, for a file that does not read, its line and column. */
export class UploadError extends ApiError {
  constructor(
    status: number,
    code: string,
    message: string,
    fields: { path: string; message: string }[],
    readonly line: number | null,
    readonly column: number | null,
  ) {
    super(status, code, message, fields);
  }
}

async function sendForm<T>(path: string, form: FormData, alsoOk: number[] = []): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  const team = getActiveTeam();
  if (team) headers[TEAM_HEADER] = team;
  let res: Response;
  try {
    res = await fetch(path, { method: 'POST', body: form, credentials: 'include', headers });
  } catch {
    throw new ApiError(0, 'network', 'The server could not be reached. Check the connection and try again.');
  }
  const text = await res.text();
  let body: unknown = null;
  try {
    body = text ? JSON.parse(text) : null;
  } catch {
    body = null;
  }
  if (!res.ok && !alsoOk.includes(res.status)) {
    const e = (body as { error?: Record<string, unknown> } | null)?.error;
    if (e && typeof e.message === 'string')
      throw new UploadError(
        res.status,
        String(e.code ?? 'error'),
        e.message,
        Array.isArray(e.fields) ? (e.fields as { path: string; message: string }[]) : [],
        typeof e.line === 'number' ? e.line : null,
        typeof e.column === 'number' ? e.column : null,
      );
    throw new UploadError(res.status, `http_${res.status}`, `The server answered ${res.status}.`, [], null, null);
  }
  return body as T;
}

export function useCapturePreview() {
  return useMutation({
    mutationFn: (file: Blob & { name?: string }) => {
      const form = new FormData();
      form.append('file', file, file.name ?? 'capture.csv');
      return sendForm<CapturePreview>('/api/captures/preview', form);
    },
  });
}

export function useUploadCapture(designId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ file, mapping, name }: { file: Blob & { name?: string }; mapping: CaptureMappingInput; name?: string }) => {
      const form = new FormData();
      form.append('mapping', JSON.stringify(mapping));
      if (name) form.append('name', name);
      form.append('file', file, file.name ?? 'capture.csv');
      return sendForm<CaptureDetail>(`/api/designs/${designId}/captures`, form);
    },
    onSuccess: (capture) => {
      queryClient.setQueryData(benchKeys.capture(capture.id), capture);
      queryClient.invalidateQueries({ queryKey: benchKeys.captures(designId) });
    },
  });
}

export function useCaptures(designId: string) {
  return useQuery({
    queryKey: benchKeys.captures(designId),
    queryFn: () => api<{ items: CaptureSummary[] }>(`/api/designs/${designId}/captures`),
  });
}

export function useCapture(id: string | null) {
  return useQuery({
    queryKey: benchKeys.capture(id ?? ''),
    enabled: !!id,
    staleTime: Infinity,
    queryFn: () => api<CaptureDetail>(`/api/captures/${id}`),
  });
}

export function useDeleteCapture(designId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/captures/${id}`, { method: 'DELETE' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: benchKeys.captures(designId) }),
  });
}

export function useFitCapture() {
  return useMutation({
    mutationFn: ({ id, ...body }: { id: string; quantity: Quantity; offset?: number; params?: string[] }) =>
      api<FitResult>(`/api/captures/${id}/fit`, { method: 'POST', body }),
  });
}

/** The engine's waveform for a design (the stateless check), for the overlay. */
export interface SimWaveform {
  t: number[];
  vC: number[];
  v: number[];
  i: number[];
}

export function useSimulatedWaveform(key: string, design: unknown) {
  return useQuery({
    queryKey: [...benchKeys.all, 'sim', key, JSON.stringify(design)] as const,
    enabled: design != null,
    staleTime: Infinity,
    queryFn: async () =>
      (await api<{ waveform: SimWaveform | null }>('/api/check', { method: 'POST', body: { design, includeWaveform: true } })).waveform,
  });
}

// ---- parts ----

export type PartRow = Record<string, unknown> & {
  id: string;
  kind: string;
  partNumber: string;
  description?: string;
  maker?: string;
  notes?: string;
  archived: boolean;
};

export interface PartsImportResult {
  imported: number;
  rows: number;
  validRows: number;
  errors: { row: number; column: string | null; message: string }[];
}

export function useParts(teamId: string | null, search: string, kind: string, archived = false) {
  return useQuery({
    queryKey: benchKeys.parts(teamId, search, kind, archived),
    queryFn: () => {
      const q = new URLSearchParams({ limit: '200' });
      if (search) q.set('search', search);
      if (kind) q.set('kind', kind);
      if (archived) q.set('archived', 'true');
      return api<{ items: PartRow[]; nextCursor: string | null }>(`/api/parts?${q.toString()}`);
    },
  });
}

export function useSavePart() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, body }: { id?: string; body: Record<string, unknown> }) =>
      id ? api<PartRow>(`/api/parts/${id}`, { method: 'PATCH', body }) : api<PartRow>('/api/parts', { method: 'POST', body }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: benchKeys.partsAll() }),
  });
}

export function useArchivePart() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, archived }: { id: string; archived: boolean }) =>
      api<PartRow>(`/api/parts/${id}/${archived ? 'archive' : 'unarchive'}`, { method: 'POST' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: benchKeys.partsAll() }),
  });
}

/** Import answers 422 with the per-row errors when nothing was imported; that comes back as a result too. */
export function useImportParts() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ file, validOnly }: { file: Blob & { name?: string }; validOnly: boolean }) => {
      const form = new FormData();
      form.append('file', file, file.name ?? 'parts.csv');
      return sendForm<PartsImportResult>(`/api/parts/import${validOnly ? '?validOnly=true' : ''}`, form, [422]);
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: benchKeys.partsAll() }),
  });
}

export function useDownloadPartsFile() {
  return useMutation({
    mutationFn: async (file: 'template.csv' | 'export.csv') => {
      const blob = await apiBlob(`/api/parts/${file}`);
      saveBlob(blob, file === 'template.csv' ? 'ringwell-parts-template.csv' : 'ringwell-parts.csv');
      return blob.size;
    },
  });
}

export function useApplyPart(designId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { slot: string; partId: string }) =>
      api<{ draft: unknown; partRefs: Record<string, string>; written: string[]; cleared: string[] }>(
        `/api/designs/${designId}/apply-part`,
        { method: 'POST', body },
      ),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: designKeys.detail(designId) }),
  });
}
