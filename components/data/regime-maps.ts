/** Mean-field regime maps, boundary refinement and design targets. Shapes from shared/schemas/api-regime-maps.ts. */
import { useInfiniteQuery, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { useLabId } from "./current-lab";
import { usePagedList, type PagedList } from "./runs";
import { sweepKeys } from "./sweeps";
import {
  RegimeMapDetailSchema,
  RegimeMapListPageSchema,
  TargetAnswerSchema,
  type DesignTargetInput,
  type LaunchRegimeMapInput,
  type RegimeMapListItem,
} from "@/shared/schemas/api-regime-maps";
import { SweepDetailSchema } from "@/shared/schemas/api-runs";

export const regimeMapKeys = {
  all: ["regime-maps"] as const,
  lists: () => [...regimeMapKeys.all, "list"] as const,
  list: (labId: string) => [...regimeMapKeys.lists(), labId] as const,
  detail: (id: string) => [...regimeMapKeys.all, "detail", id] as const,
};

export function useRegimeMaps(): PagedList<RegimeMapListItem> {
  const labId = useLabId();
  const q = useInfiniteQuery({
    queryKey: regimeMapKeys.list(labId),
    initialPageParam: undefined as string | undefined,
    queryFn: ({ pageParam, signal }) =>
      api(`/api/labs/${labId}/regime-maps${pageParam ? `?cursor=${encodeURIComponent(pageParam)}` : ""}`, {
        schema: RegimeMapListPageSchema,
        signal,
      }),
    getNextPageParam: (last) => last.nextCursor ?? undefined,
    enabled: !!labId,
  });
  return usePagedList(q);
}

/**
 * One map's detail. `paused` stops fetching and keeps the data shown: after a delete the server answers 404
 * until the map is restored, and the screen still shows the deleted map with its Undo.
 */
export function useRegimeMap(id: string | undefined, opts: { paused?: boolean } = {}) {
  return useQuery({
    queryKey: regimeMapKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/regime-maps/${id}`, { schema: RegimeMapDetailSchema, signal }),
    enabled: !!id && !opts.paused,
  });
}

/** Soft delete (DELETE /api/regime-maps/:id): restorable for the undo period. The cached detail is kept for Undo. */
export function useDeleteRegimeMap() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/regime-maps/${id}`, { method: "DELETE" }),
    onSuccess: (_d, id) => {
      void qc.cancelQueries({ queryKey: regimeMapKeys.detail(id) });
      qc.invalidateQueries({ queryKey: regimeMapKeys.lists() });
    },
  });
}

/** Undoes a delete (POST /api/regime-maps/:id/restore), answering the map's detail. */
export function useRestoreRegimeMap() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) =>
      api(`/api/regime-maps/${id}/restore`, { method: "POST", schema: RegimeMapDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(regimeMapKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: regimeMapKeys.lists() });
    },
  });
}

export function useLaunchRegimeMap() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: LaunchRegimeMapInput) =>
      api(`/api/labs/${labId}/regime-maps`, { method: "POST", body: req, schema: RegimeMapDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(regimeMapKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: regimeMapKeys.lists() });
    },
  });
}

export function useRefineRegimeMap() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/regime-maps/${id}/refine`, { method: "POST", schema: RegimeMapDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(regimeMapKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: regimeMapKeys.lists() });
    },
  });
}

export function useRefineSweep() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/sweeps/${id}/refine`, { method: "POST", schema: SweepDetailSchema }),
    onSuccess: (d) => {
      qc.setQueryData(sweepKeys.detail(d.id), d);
      qc.invalidateQueries({ queryKey: sweepKeys.lists() });
    },
  });
}

/** Evaluate a design target on a sweep ("sweeps") or a mean-field map ("regime-maps"). */
export function useDesignTarget(kind: "sweeps" | "regime-maps", id: string) {
  return useMutation({
    mutationFn: (target: DesignTargetInput) =>
      api(`/api/${kind}/${id}/target`, { method: "POST", body: target, schema: TargetAnswerSchema }),
  });
}
