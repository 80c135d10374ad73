import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "./api";
import { useLabId } from "./current-lab";
import { usePagedQuery } from "./paged";
import {
  PreviewProgramResponseSchema,
  ProgramDetailResponseSchema,
  ProgramListResponseSchema,
  ProgramSummarySchema,
  type ProgramSummary,
  type CreateProgramRequest,
  type UpdateProgramRequest,
} from "@/shared/schemas/api-programs";
import type { InputProgramInput } from "@/shared/schemas/input-program";

export const programKeys = {
  all: ["programs"] as const,
  lists: () => [...programKeys.all, "list"] as const,
  list: (labId: string, archived = false) => [...programKeys.lists(), labId, archived] as const,
  detail: (id: string) => [...programKeys.all, "detail", id] as const,
  preview: (labId: string, program: unknown, end: number) => [...programKeys.all, "preview", labId, program, end] as const,
};

/** The lab's input programs, a page at a time (`loadMore` for the next), most recently changed first. */
export function usePrograms(opts: { archived?: boolean } = {}) {
  const labId = useLabId();
  return usePagedQuery<ProgramSummary>({
    queryKey: programKeys.list(labId, !!opts.archived),
    path: `/api/labs/${labId}/programs`,
    params: { archived: opts.archived ? "1" : undefined },
    schema: ProgramListResponseSchema,
    enabled: !!labId,
  });
}

export function useProgram(id: string | undefined) {
  return useQuery({
    queryKey: programKeys.detail(id ?? ""),
    queryFn: ({ signal }) => api(`/api/programs/${id}`, { schema: ProgramDetailResponseSchema, signal }),
    enabled: !!id,
  });
}

/** The compiled pulses of a program (for the live preview plot). Disabled while the program does not validate locally. */
export function useProgramPreview(program: InputProgramInput | null, endTimeMinutes: number) {
  const labId = useLabId();
  return useQuery({
    queryKey: programKeys.preview(labId, program, endTimeMinutes),
    queryFn: ({ signal }) =>
      api(`/api/labs/${labId}/programs/preview`, { method: "POST", body: { program, endTimeMinutes }, schema: PreviewProgramResponseSchema, signal }),
    enabled: !!labId && !!program && endTimeMinutes > 0,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    retry: false,
  });
}

export function useCreateProgram() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: CreateProgramRequest) => api(`/api/labs/${labId}/programs`, { method: "POST", body: req, schema: ProgramDetailResponseSchema }),
    onSuccess: (d) => {
      qc.setQueryData(programKeys.detail(d.program.id), d);
      qc.invalidateQueries({ queryKey: programKeys.lists() });
    },
  });
}

export function useUpdateProgram(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: UpdateProgramRequest) => api(`/api/programs/${id}`, { method: "PUT", body: req, schema: ProgramDetailResponseSchema }),
    onSuccess: (d) => {
      qc.setQueryData(programKeys.detail(id), d);
      qc.invalidateQueries({ queryKey: programKeys.lists() });
    },
  });
}

export function useDuplicateProgram() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id }: { id: string }) => api(`/api/programs/${id}/duplicate`, { method: "POST", body: {}, schema: ProgramDetailResponseSchema }),
    onSuccess: () => qc.invalidateQueries({ queryKey: programKeys.lists() }),
  });
}

export function useArchiveProgram() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, archived }: { id: string; archived: boolean }) =>
      api(`/api/programs/${id}/${archived ? "archive" : "unarchive"}`, { method: "POST", schema: ProgramSummarySchema }),
    onSuccess: () => qc.invalidateQueries({ queryKey: programKeys.all }),
  });
}
