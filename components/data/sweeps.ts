/** Sweeps: list, detail with per-point figures, launch, cancel, resume. Shapes from shared/schemas/api-runs.ts. */
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "./api";
import { useLabId } from "./current-lab";
import { SweepDetailSchema, SweepListItemSchema, type LaunchSweepInput, type SweepDetail } from "@/shared/schemas/api-runs";

export { SweepDetailSchema, SweepListItemSchema, type SweepDetail };
const SweepListSchema = z.array(SweepListItemSchema);

export const sweepKeys = {
  all: ["sweeps"] as const,
  lists: () => [...sweepKeys.all, "list"] as const,
  list: (labId: string) => [...sweepKeys.lists(), labId] as const,
  detail: (id: string) => [...sweepKeys.all, "detail", id] as const,
};

const active = (s: string) => s === "queued" || s === "running";

export function useSweeps() {
  const labId = useLabId();
  return useQuery({
    queryKey: sweepKeys.list(labId),
    queryFn: ({ signal }) => api(`/api/labs/${labId}/sweeps`, { schema: SweepListSchema, signal }),
    enabled: !!labId,
    refetchInterval: (q) => (q.state.data?.some((s) => active(s.status)) ? 4000 : false),
  });
}

export function useSweep(id: string | undefined) {
  return useQuery({
    queryKey: sweepKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/sweeps/${id}`, { schema: SweepDetailSchema, signal }),
    enabled: !!id,
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
    onSuccess: (_d, id) => qc.invalidateQueries({ queryKey: sweepKeys.detail(id) }),
  });
}
