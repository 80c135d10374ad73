/** Sweeps: list, detail with per-point figures, launch, cancel, resume. Shapes from shared/schemas/api-runs.ts. */
import { useInfiniteQuery, useMutation, useQueries, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { useLabId } from "./current-lab";
import { runKeys, usePagedList, type PagedList } from "./runs";
import {
  SweepDetailSchema,
  SweepListItemSchema,
  SweepListPageSchema,
  type LaunchSweepInput,
  type SweepDetail,
  type SweepListItem,
} from "@/shared/schemas/api-runs";

export { SweepDetailSchema, SweepListItemSchema, type SweepDetail };

export const sweepKeys = {
  all: ["sweeps"] as const,
  lists: () => [...sweepKeys.all, "list"] as const,
  list: (labId: string) => [...sweepKeys.lists(), labId] as const,
  detail: (id: string) => [...sweepKeys.all, "detail", id] as const,
};

const active = (s: string) => s === "queued" || s === "running";

/** The lab's sweeps, page by page (`loadMore` for the next); polls while one is active. */
export function useSweeps(): PagedList<SweepListItem> {
  const labId = useLabId();
  const q = useInfiniteQuery({
    queryKey: sweepKeys.list(labId),
    initialPageParam: undefined as string | undefined,
    queryFn: ({ pageParam, signal }) =>
      api(`/api/labs/${labId}/sweeps${pageParam ? `?cursor=${encodeURIComponent(pageParam)}` : ""}`, {
        schema: SweepListPageSchema,
        signal,
      }),
    getNextPageParam: (last) => last.nextCursor ?? undefined,
    enabled: !!labId,
    refetchInterval: (q) => (q.state.data?.pages.some((p) => p.items.some((s) => active(s.status))) ? 4000 : false),
  });
  return usePagedList(q);
}

/**
 * Names of sweeps by id, wherever they are in the paged list (each read through its detail query, shared with
 * useSweep's cache): for naming what a few stored items (such as a trace set's matches) point at.
 */
export function useSweepNames(ids: readonly string[]): Map<string, string> {
  const wanted = [...new Set(ids)].sort();
  const qs = useQueries({
    queries: wanted.map((id) => ({
      queryKey: sweepKeys.detail(id),
      queryFn: ({ signal }: { signal: AbortSignal }) => api(`/api/sweeps/${id}`, { schema: SweepDetailSchema, signal }),
    })),
  });
  const names = new Map<string, string>();
  qs.forEach((q, i) => {
    if (q.data) names.set(wanted[i], q.data.name);
  });
  return names;
}

/**
 * One sweep's detail, polled while it computes. `paused` stops fetching and keeps the data shown: after a
 * delete the server answers 404 until the sweep is restored, and the screen still shows it with its Undo.
 */
export function useSweep(id: string | undefined, opts: { paused?: boolean } = {}) {
  return useQuery({
    queryKey: sweepKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/sweeps/${id}`, { schema: SweepDetailSchema, signal }),
    enabled: !!id && !opts.paused,
    refetchInterval: (q) => (q.state.data && active(q.state.data.status) ? 3000 : false),
  });
}

export function useLaunchSweep() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: LaunchSweepInput) => api(`/api/labs/${labId}/sweeps`, { method: "POST", body: req, schema: SweepDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(sweepKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: sweepKeys.lists() });
    },
  });
}

export function useCancelSweep() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/sweeps/${id}/cancel`, { method: "POST" }),
    onSuccess: (_d, id) => {
      qc.invalidateQueries({ queryKey: sweepKeys.detail(id) });
      qc.invalidateQueries({ queryKey: sweepKeys.lists() });
    },
  });
}

/** Re-queues a cancelled or failed sweep's unfinished points (POST /api/sweeps/:id/resume): they go on from their stored chunks. */
export function useResumeSweep() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/sweeps/${id}/resume`, { method: "POST", schema: SweepDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(sweepKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: sweepKeys.lists() });
    },
  });
}

/** Soft delete (DELETE /api/sweeps/:id, its point runs with it): restorable for the undo period. */
export function useDeleteSweep() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/sweeps/${id}`, { method: "DELETE" }),
    onSuccess: (_d, id) => {
      void qc.cancelQueries({ queryKey: sweepKeys.detail(id) });
      qc.invalidateQueries({ queryKey: sweepKeys.lists() });
      qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}

/** Undoes a delete (POST /api/sweeps/:id/restore), answering the sweep's detail. */
export function useRestoreSweep() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/sweeps/${id}/restore`, { method: "POST", schema: SweepDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(sweepKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: sweepKeys.lists() });
      qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}
