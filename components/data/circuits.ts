import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { useLabId } from "./current-lab";
import { usePagedQuery } from "./paged";
import {
  CheckCircuitResponseSchema,
  CircuitDetailResponseSchema,
  CircuitListResponseSchema,
  CircuitSummarySchema,
  type CircuitSummary,
  CircuitVersionResponseSchema,
  TemplatesResponseSchema,
  type CreateCircuitRequest,
  type UpdateCircuitRequest,
} from "@/shared/schemas/api-circuits";

export const circuitKeys = {
  all: ["circuits"] as const,
  lists: () => [...circuitKeys.all, "list"] as const,
  list: (labId: string, archived = false) => [...circuitKeys.lists(), labId, archived] as const,
  detail: (id: string) => [...circuitKeys.all, "detail", id] as const,
  version: (id: string, v: number) => [...circuitKeys.all, "version", id, v] as const,
  templates: ["templates"] as const,
  check: (labId: string, body: unknown) => [...circuitKeys.all, "check", labId, body] as const,
};

/** The lab's circuits, a page at a time (`loadMore` for the next), most recently changed first. */
export function useCircuits(opts: { archived?: boolean } = {}) {
  const labId = useLabId();
  return usePagedQuery<CircuitSummary>({
    queryKey: circuitKeys.list(labId, !!opts.archived),
    path: `/api/labs/${labId}/circuits`,
    params: { archived: opts.archived ? "1" : undefined },
    schema: CircuitListResponseSchema,
    enabled: !!labId,
  });
}

export function useCircuit(id: string | undefined) {
  return useQuery({
    queryKey: circuitKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/circuits/${id}`, { schema: CircuitDetailResponseSchema, signal }),
    enabled: !!id,
  });
}

export function useCircuitVersion(id: string | undefined, version: number | undefined) {
  return useQuery({
    queryKey: circuitKeys.version(id ?? "", version ?? 0),
    queryFn: ({ signal }) => api(`/api/circuits/${id}/versions/${version}`, { schema: CircuitVersionResponseSchema, signal }),
    enabled: !!id && !!version,
  });
}

export function useTemplates() {
  return useQuery({
    queryKey: circuitKeys.templates,
    queryFn: ({ signal }) => api("/api/templates", { schema: TemplatesResponseSchema, signal }),
    staleTime: 5 * 60_000,
    select: (r) => r.templates,
  });
}

/** Server-side check of a circuit body as typed (field errors and the feed-forward type). */
export function useCircuitCheck(body: unknown, enabled = true) {
  const labId = useLabId();
  return useQuery({
    queryKey: circuitKeys.check(labId, body),
    queryFn: ({ signal }) => api(`/api/labs/${labId}/circuits/check`, { method: "POST", body: { body }, schema: CheckCircuitResponseSchema, signal }),
    enabled: enabled && !!labId,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    retry: false,
  });
}

export function useCreateCircuit() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: CreateCircuitRequest) => api(`/api/labs/${labId}/circuits`, { method: "POST", body: req, schema: CircuitDetailResponseSchema }),
    onSuccess: (d) => {
      qc.setQueryData(circuitKeys.detail(d.circuit.id), d);
      qc.invalidateQueries({ queryKey: circuitKeys.lists() });
    },
  });
}

export function useUpdateCircuit(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: UpdateCircuitRequest) => api(`/api/circuits/${id}`, { method: "PUT", body: req, schema: CircuitDetailResponseSchema }),
    onSuccess: (d) => {
      qc.setQueryData(circuitKeys.detail(id), d);
      qc.invalidateQueries({ queryKey: circuitKeys.lists() });
    },
  });
}

export function useDuplicateCircuit() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, name }: { id: string; name?: string }) => api(`/api/circuits/${id}/duplicate`, { method: "POST", body: name ? { name } : {}, schema: CircuitDetailResponseSchema }),
    onSuccess: (d) => {
      qc.setQueryData(circuitKeys.detail(d.circuit.id), d);
      qc.invalidateQueries({ queryKey: circuitKeys.lists() });
    },
  });
}

export function useArchiveCircuit() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, archived }: { id: string; archived: boolean }) =>
      api(`/api/circuits/${id}/${archived ? "archive" : "unarchive"}`, { method: "POST", schema: CircuitSummarySchema }),
    onSuccess: (_d, v) => {
      qc.invalidateQueries({ queryKey: circuitKeys.detail(v.id) });
      qc.invalidateQueries({ queryKey: circuitKeys.lists() });
    },
  });
}
