import {
  keepPreviousData,
  useInfiniteQuery,
  useMutation,
  useQuery,
  useQueries,
  useQueryClient,
} from "@tanstack/react-query";
import { useEffect, useMemo } from "react";
import { Platform } from "react-native";
import { api, apiUrl } from "./api";
import { useLabId } from "./current-lab";
import { usePagedList, type PagedList } from "./paged";
import {
  EstimateSchema,
  ReplicatePageSchema,
  RunDetailSchema,
  RunListPageSchema,
  RunSeriesSchema,
  API_LIMITS,
  type LaunchRunInput,
  type RunDetail,
  type RunListItem,
} from "@/shared/schemas/api-runs";
import { ComparisonSchema, RunSummarySchema, type RunSummary } from "@/shared/schemas/analysis";

export type { RunDetail, RunListItem };

/** A created run comes back as its detail. */
const RunCreatedSchema = RunDetailSchema;
const RunDetailResponseSchema = RunDetailSchema;
const ComparisonResponseSchema = ComparisonSchema;

export const runKeys = {
  all: ["runs"] as const,
  lists: () => [...runKeys.all, "list"] as const,
  list: (labId: string, archived = false) => [...runKeys.lists(), labId, archived] as const,
  detail: (id: string) => [...runKeys.all, "detail", id] as const,
  /** Runs looked up by id (`?ids=`) and a run's matched controls: list items, refreshed with the lists. */
  byIds: (labId: string, ids: string[]) => [...runKeys.lists(), labId, "ids", ids] as const,
  controls: (labId: string, runId: string) => [...runKeys.lists(), labId, "controlOf", runId] as const,
  series: (id: string) => [...runKeys.all, "series", id] as const,
  replicates: (id: string, q: object) => [...runKeys.all, "replicates", id, q] as const,
  estimate: (labId: string, req: unknown) => [...runKeys.all, "estimate", labId, req] as const,
  compare: (labId: string, ids: string[]) => [...runKeys.all, "compare", labId, ids] as const,
};

export const ACTIVE_STATUSES = new Set(["running", "queued"]);

/** Running and queued first, then newest first. */
export function sortRunsForHome<T extends { status: string; createdAt?: string | number }>(runs: T[]): T[] {
  const time = (r: T) => (r.createdAt === undefined ? 0 : typeof r.createdAt === "number" ? r.createdAt : Date.parse(r.createdAt));
  const rank = (r: T) => (r.status === "running" ? 0 : r.status === "queued" ? 1 : 2);
  return [...runs].sort((a, b) => rank(a) - rank(b) || time(b) - time(a));
}

export { usePagedList, type PagedList };

/** The lab's runs, page by page (PAGE_SIZE at a time; `loadMore` for the next); polls while one is active. */
export function useRuns(opts: { archived?: boolean } = {}): PagedList<RunListItem> {
  const labId = useLabId();
  const q = useInfiniteQuery({
    queryKey: runKeys.list(labId, !!opts.archived),
    initialPageParam: undefined as string | undefined,
    queryFn: ({ pageParam, signal }) => {
      const params = new URLSearchParams();
      if (opts.archived) params.set("archived", "1");
      if (pageParam) params.set("cursor", pageParam);
      const qs = params.toString();
      return api(`/api/labs/${labId}/runs${qs ? `?${qs}` : ""}`, { schema: RunListPageSchema, signal });
    },
    getNextPageParam: (last) => last.nextCursor ?? undefined,
    enabled: !!labId,
    refetchInterval: (q) =>
      q.state.data?.pages.some((p) => p.items.some((r) => ACTIVE_STATUSES.has(r.status))) ? 3000 : false,
  });
  return usePagedList(q);
}

/**
 * Runs of the lab by id, wherever they are in the paged list (archived too): the list items in a map.
 * Asks in batches of API_LIMITS.maxRunIdsPerLookup; ids of no run of the lab are absent from the map.
 */
export function useRunsByIds(ids: readonly string[]): { byId: Map<string, RunListItem>; isPending: boolean } {
  const labId = useLabId();
  const wanted = useMemo(() => [...new Set(ids)].sort(), [ids]);
  const batches = useMemo(() => {
    const out: string[][] = [];
    for (let i = 0; i < wanted.length; i += API_LIMITS.maxRunIdsPerLookup)
      out.push(wanted.slice(i, i + API_LIMITS.maxRunIdsPerLookup));
    return out;
  }, [wanted]);
  const results = useQueries({
    queries: batches.map((batch) => ({
      queryKey: runKeys.byIds(labId, batch),
      queryFn: ({ signal }: { signal: AbortSignal }) =>
        api(`/api/labs/${labId}/runs?ids=${batch.map(encodeURIComponent).join(",")}`, { schema: RunListPageSchema, signal }),
      enabled: !!labId,
      staleTime: 10_000,
    })),
  });
  const pages = results.map((r) => r.data);
  const byId = useMemo(() => new Map(pages.flatMap((p) => p?.items ?? []).map((r) => [r.id, r] as const)), [pages]);
  return { byId, isPending: results.some((r) => r.isPending) };
}

/** The ids of the runs a page of audit events is about (to name them with useRunsByIds). */
export function runIdsOf(events: readonly { targetType: string | null; targetId: string | null }[] | undefined): string[] {
  return (events ?? []).flatMap((e) => (e.targetType === "run" && e.targetId ? [e.targetId] : []));
}

/** The newest matched control launched for a run (null when there is none), wherever it is in the list. */
export function useControlRun(runId: string | undefined) {
  const labId = useLabId();
  return useQuery({
    queryKey: runKeys.controls(labId, runId ?? ""),
    queryFn: ({ signal }) =>
      api(`/api/labs/${labId}/runs?controlOf=${encodeURIComponent(runId ?? "")}&limit=1`, { schema: RunListPageSchema, signal }),
    enabled: !!labId && !!runId,
    select: (p) => p.items[0] ?? null,
  });
}

/** A run's status, progress and summary; polls while it is active and listens to server-sent progress on the web. */
export function useRun(id: string | undefined) {
  const qc = useQueryClient();
  const q = useQuery({
    queryKey: runKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/runs/${id}`, { schema: RunDetailResponseSchema, signal }),
    enabled: !!id,
    refetchInterval: (query) => (query.state.data && ACTIVE_STATUSES.has(query.state.data.status) ? 2000 : false),
  });
  const active = !!q.data && ACTIVE_STATUSES.has(q.data.status);
  const status = q.data?.status;
  useEffect(() => {
    // A run that has just ended changes the lists (status, headline figures).
    if (status && !ACTIVE_STATUSES.has(status)) qc.invalidateQueries({ queryKey: runKeys.lists() });
  }, [status, qc]);
  useEffect(() => {
    if (!id || !active || Platform.OS !== "web" || typeof EventSource === "undefined") return;
    const es = new EventSource(apiUrl(`/api/runs/${id}/events`), { withCredentials: true });
    const refresh = () => qc.invalidateQueries({ queryKey: runKeys.detail(id) });
    es.addEventListener("progress", refresh);
    es.addEventListener("status", refresh);
    es.addEventListener("end", refresh);
    es.onerror = () => es.close();
    return () => es.close();
  }, [id, active, qc]);
  return q;
}

/** The finished run's summary parsed with the shared RunSummary schema (null until finished). */
export function runSummary(run: RunDetail | undefined): RunSummary | null {
  if (!run?.summary) return null;
  const parsed = RunSummarySchema.safeParse(run.summary);
  return parsed.success ? parsed.data : null;
}

export function useRunSeries(id: string | undefined, enabled = true) {
  return useQuery({
    queryKey: runKeys.series(id ?? ""),
    queryFn: ({ signal }) => api(`/api/runs/${id}/series`, { schema: RunSeriesSchema, signal }),
    enabled: !!id && enabled,
    staleTime: Infinity,
  });
}

export type ReplicateQuery = {
  sort: string;
  dir: "asc" | "desc";
  page: number;
  pageSize: number;
  /** Only pulses of this input duration (minutes). */
  durationBin?: number;
  /** Only pulses that passed, or that did not. */
  passed?: "yes" | "no";
};

/** The query string of a replicate page request. */
export function replicateQueryString(q: ReplicateQuery): string {
  const p = new URLSearchParams({ sort: q.sort, dir: q.dir, page: String(q.page), pageSize: String(q.pageSize) });
  if (q.durationBin !== undefined) p.set("durationBin", String(q.durationBin));
  if (q.passed) p.set("passed", q.passed);
  return p.toString();
}

export function useReplicates(id: string | undefined, q: ReplicateQuery, enabled = true) {
  return useQuery({
    queryKey: runKeys.replicates(id ?? "", q),
    queryFn: ({ signal }) =>
      api(`/api/runs/${id}/replicates?${replicateQueryString(q)}`, { schema: ReplicatePageSchema, signal }),
    enabled: !!id && enabled,
    placeholderData: keepPreviousData,
  });
}

export function useRunEstimate(req: LaunchRunInput | null) {
  const labId = useLabId();
  return useQuery({
    queryKey: runKeys.estimate(labId, req),
    queryFn: ({ signal }) => api(`/api/labs/${labId}/runs/estimate`, { method: "POST", body: req, schema: EstimateSchema, signal }),
    enabled: !!labId && !!req,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    retry: false,
  });
}

export function useLaunchRun() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: LaunchRunInput) => api(`/api/labs/${labId}/runs`, { method: "POST", body: req, schema: RunCreatedSchema }),
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}

function invalidateRun(qc: ReturnType<typeof useQueryClient>, id: string) {
  qc.invalidateQueries({ queryKey: runKeys.detail(id) });
  qc.invalidateQueries({ queryKey: runKeys.lists() });
}

export function useCancelRun() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: (id: string) => api(`/api/runs/${id}/cancel`, { method: "POST" }), onSuccess: (_d, id) => invalidateRun(qc, id) });
}

export function useArchiveRun() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: (id: string) => api(`/api/runs/${id}/archive`, { method: "POST" }), onSuccess: (_d, id) => invalidateRun(qc, id) });
}

export function useDeleteRun() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: (id: string) => api(`/api/runs/${id}`, { method: "DELETE" }), onSuccess: (_d, id) => invalidateRun(qc, id) });
}

export function useRestoreRun() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: (id: string) => api(`/api/runs/${id}/restore`, { method: "POST" }), onSuccess: (_d, id) => invalidateRun(qc, id) });
}

/** Launches the matched simple-regulation control of a run; resolves with the control run. */
export function useLaunchControl() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/runs/${id}/control`, { method: "POST", schema: RunCreatedSchema }),
    onSuccess: () => qc.invalidateQueries({ queryKey: runKeys.lists() }),
  });
}

export function useComparison(runIds: string[]) {
  const labId = useLabId();
  return useQuery({
    queryKey: runKeys.compare(labId, runIds),
    queryFn: ({ signal }) => api(`/api/labs/${labId}/compare`, { method: "POST", body: { runIds }, schema: ComparisonResponseSchema, signal }),
    enabled: !!labId && runIds.length >= 2 && runIds.length <= 4,
    staleTime: 60_000,
  });
}

/** The run's downloads (server/routes/runs.routes.ts); datapackage.json is the data dictionary of the CSVs. */
export const RUN_EXPORTS = [
  "pulses.csv",
  "output-pulses.csv",
  "replicates.csv",
  "aggregates.csv",
  "headline.csv",
  "datapackage.json",
  "summary.json",
  "bundle.json",
] as const;
export type RunExportFile = (typeof RUN_EXPORTS)[number];

export function exportUrl(id: string, file: RunExportFile): string {
  return apiUrl(`/api/runs/${id}/export/${file}`);
}
