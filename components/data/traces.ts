/**
 * Single-cell trace sets and matches (contract: shared/schemas/api-traces.ts,
 * docs/traces.md). Uploads are multipart (file + options JSON); everything else
 * goes through the shared JSON `api` wrapper.
 */
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { Platform } from "react-native";
import * as DocumentPicker from "expo-document-picker";
import { z } from "zod";
import { api, apiUrl, ApiError } from "./api";
import { useLabId } from "./current-lab";
import { usePagedQuery } from "./paged";
import { ApiErrorSchema } from "@/shared/schemas/errors";
import {
  MatchDetailSchema,
  TraceParseErrorSchema,
  TracePreviewSchema,
  TraceSetDetailSchema,
  TraceSetListItemSchema,
  TraceSetListPageSchema,
  type MatchDetail,
  type MatchRequest,
  type TraceParseError,
  type TracePreview,
  type TraceSetDetail,
  type TraceSetListItem,
  type TraceSetPatch,
  type TraceUploadOptionsInput,
} from "@/shared/schemas/api-traces";

export type { MatchDetail, TraceParseError, TracePreview, TraceSetDetail, TraceSetListItem };

export const traceKeys = {
  all: ["traces"] as const,
  lists: () => [...traceKeys.all, "list"] as const,
  list: (labId: string) => [...traceKeys.lists(), labId] as const,
  detail: (id: string) => [...traceKeys.all, "detail", id] as const,
  match: (id: string) => [...traceKeys.all, "match", id] as const,
};

/** A file chosen for upload: a browser File/Blob on the web, a local uri on a device. */
export type TraceFile = { name: string; size: number | null; mimeType: string | null; blob?: Blob; uri?: string };

/**
 * A rejected upload. `lines` lists the file's problems with 1-based line and
 * column (column 0 = the whole line), as the server found them; empty for
 * other errors (options, size, permissions).
 */
export class TraceUploadError extends ApiError {
  readonly lines: TraceParseError[];
  constructor(status: number, code: string, message: string, fields: { path: string; message: string }[], lines: TraceParseError[]) {
    super(status, code, message, fields);
    this.name = "TraceUploadError";
    this.lines = lines;
  }
}

const UploadErrorBodySchema = ApiErrorSchema.extend({
  error: ApiErrorSchema.shape.error.extend({ lines: z.array(TraceParseErrorSchema).optional() }),
});

/** The line/column problems of an upload error (empty when there are none). */
export function uploadLines(error: unknown): TraceParseError[] {
  return error instanceof TraceUploadError ? error.lines : [];
}

/**
 * POSTs a multipart upload. The JSON `api` wrapper sends JSON bodies only, and
 * the trace endpoints answer a rejected file with a structured `error.lines`
 * list that the shared error schema does not carry, hence this small sibling.
 */
async function postTraces<T>(path: string, file: TraceFile, options: TraceUploadOptionsInput, schema: z.ZodType<T>): Promise<T> {
  const form = new FormData();
  if (file.blob) form.append("file", file.blob, file.name);
  else if (file.uri) form.append("file", { uri: file.uri, name: file.name, type: file.mimeType ?? "text/csv" } as unknown as Blob);
  form.append("options", JSON.stringify(options));
  let res: Response;
  try {
    res = await fetch(apiUrl(path), { method: "POST", credentials: "same-origin", headers: { Accept: "application/json" }, body: form });
  } catch {
    throw new ApiError(0, "network", "Could not reach the Linger server. Check your connection and try again.");
  }
  const text = await res.text();
  let json: unknown;
  try {
    json = text ? JSON.parse(text) : undefined;
  } catch {
    json = undefined;
  }
  if (!res.ok) {
    const parsed = UploadErrorBodySchema.safeParse(json);
    if (parsed.success) {
      const e = parsed.data.error;
      throw new TraceUploadError(res.status, e.code, e.message, e.fields ?? [], e.lines ?? []);
    }
    const message =
      res.status === 413 ? "The file is larger than 5 MB; split it or drop columns you do not need."
      : res.status === 401 ? "Please sign in."
      : `The server answered ${res.status}.`;
    throw new TraceUploadError(res.status, res.status === 413 ? "file_too_large" : `http_${res.status}`, message, [], []);
  }
  const parsed = schema.safeParse(json);
  if (!parsed.success) throw new ApiError(res.status, "bad_response", `Unexpected response from ${path}: ${parsed.error.issues[0]?.message ?? "invalid"}`);
  return parsed.data;
}

/** The lab's trace sets, a page at a time (`loadMore` for the next), newest first. */
export function useTraceSets() {
  const labId = useLabId();
  return usePagedQuery<TraceSetListItem>({
    queryKey: traceKeys.list(labId),
    path: `/api/labs/${labId}/traces`,
    schema: TraceSetListPageSchema,
    enabled: !!labId,
  });
}

/**
 * One set's detail. `paused` stops fetching and keeps the data shown: after a
 * delete the server answers 404 until the set is restored, and the screen
 * still shows the deleted set with its Undo.
 */
export function useTraceSet(id: string | undefined, opts: { paused?: boolean } = {}) {
  return useQuery({
    queryKey: traceKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/traces/${id}`, { schema: TraceSetDetailSchema, signal }),
    enabled: !!id && !opts.paused,
  });
}

export type UploadRequest = { file: TraceFile; options: TraceUploadOptionsInput };

/** Parses and analyses a file without storing it; rejects with TraceUploadError. */
export function usePreviewTraces() {
  const labId = useLabId();
  return useMutation({
    mutationFn: (req: UploadRequest): Promise<TracePreview> => postTraces(`/api/labs/${labId}/traces/preview`, req.file, req.options, TracePreviewSchema),
  });
}

/** Stores a trace set; resolves with its detail. */
export function useUploadTraces() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: UploadRequest): Promise<TraceSetDetail> => postTraces(`/api/labs/${labId}/traces`, req.file, req.options, TraceSetDetailSchema),
    onSuccess: (d) => {
      qc.setQueryData(traceKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: traceKeys.lists() });
    },
  });
}

/** Renames or changes preprocessing settings; the server recomputes the figures and answers with the detail. */
export function usePatchTraceSet(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: TraceSetPatch) => api(`/api/traces/${id}`, { method: "PATCH", body, schema: TraceSetDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(traceKeys.detail(id), d);
      qc.invalidateQueries({ queryKey: traceKeys.lists() });
    },
  });
}

/**
 * Deletes at once; the server keeps the set restorable for the undo period
 * (useRestoreTraceSet). The cached detail is kept so the screen can offer Undo.
 */
export function useDeleteTraceSet() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/traces/${id}`, { method: "DELETE" }),
    onSuccess: (_d, id) => {
      void qc.cancelQueries({ queryKey: traceKeys.detail(id) });
      qc.invalidateQueries({ queryKey: traceKeys.lists() });
    },
  });
}

/** Undoes a delete (POST /api/traces/:id/restore); the detail and lists are fetched again. */
export function useRestoreTraceSet() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/traces/${id}/restore`, { method: "POST", schema: TraceSetListItemSchema }),
    onSuccess: (_d, id) => {
      qc.invalidateQueries({ queryKey: traceKeys.detail(id) });
      qc.invalidateQueries({ queryKey: traceKeys.lists() });
    },
  });
}

/** Matches the set against a finished run or a sweep; the stored match is cached under its id. */
export function useRunMatch(traceSetId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: MatchRequest) => api(`/api/traces/${traceSetId}/match`, { method: "POST", body: req, schema: MatchDetailSchema }),
    onSuccess: (m) => {
      qc.setQueryData(traceKeys.match(m.id), m);
      qc.invalidateQueries({ queryKey: traceKeys.detail(traceSetId) });
    },
  });
}

export function useMatch(id: string | undefined) {
  return useQuery({
    queryKey: traceKeys.match(id ?? ""),
    queryFn: ({ signal }) => api(`/api/matches/${id}`, { schema: MatchDetailSchema, signal }),
    enabled: !!id,
    staleTime: Infinity,
  });
}

export function metricsCsvUrl(id: string): string {
  return apiUrl(`/api/traces/${id}/export/metrics.csv`);
}

/** Picks one CSV/TSV file with the system picker (expo-document-picker); null when cancelled. */
export async function pickTraceFile(): Promise<TraceFile | null> {
  const r = await DocumentPicker.getDocumentAsync({
    type: Platform.OS === "web" ? [".csv", ".tsv", ".txt", "text/csv", "text/tab-separated-values", "text/plain"] : ["text/*", "application/octet-stream"],
    multiple: false,
    base64: false,
    copyToCacheDirectory: true,
  });
  if (r.canceled || !r.assets?.length) return null;
  const a = r.assets[0];
  return { name: a.name, size: a.size ?? a.file?.size ?? null, mimeType: a.mimeType ?? null, blob: a.file ?? undefined, uri: a.file ? undefined : a.uri };
}
