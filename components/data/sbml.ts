/**
 * SBML in and out: read a document into a preview (nothing stored), save it as
 * a circuit, and the download address of a circuit's SBML file.
 * Contract: shared/schemas/api-sbml.ts.
 */
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { Platform } from "react-native";
import * as DocumentPicker from "expo-document-picker";
import { api, apiUrl, ApiError } from "./api";
import { useLabId } from "./current-lab";
import { circuitKeys } from "./circuits";
import { SbmlPreviewSchema, SbmlRefusalSchema, type SbmlPreview, type SbmlProblemWire } from "@/shared/schemas/api-sbml";
import { CircuitDetailResponseSchema, type CircuitDetailResponse } from "@/shared/schemas/api-circuits";

/** What reading a document gave: the preview, or the list of refused elements. */
export type SbmlReading = { kind: "preview"; preview: SbmlPreview } | { kind: "refused"; message: string; problems: SbmlProblemWire[] };

/** The refusal report of a 422 answer, or null for any other error. */
export function refusalOf(error: unknown): { message: string; problems: SbmlProblemWire[] } | null {
  if (!(error instanceof ApiError) || error.status !== 422) return null;
  const parsed = SbmlRefusalSchema.safeParse(error.body);
  return parsed.success ? { message: parsed.data.error.message, problems: parsed.data.error.problems } : null;
}

export function useReadSbml() {
  const labId = useLabId();
  return useMutation({
    mutationFn: async (sbml: string): Promise<SbmlReading> => {
      try {
        const preview = await api(`/api/labs/${labId}/circuits/import-sbml`, { method: "POST", body: { sbml, save: false }, schema: SbmlPreviewSchema });
        return { kind: "preview", preview };
      } catch (e) {
        const refused = refusalOf(e);
        if (refused) return { kind: "refused", ...refused };
        throw e;
      }
    },
  });
}

export function useSaveSbml() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (req: { sbml: string; name?: string; circuitId?: string }): Promise<CircuitDetailResponse> =>
      api(`/api/labs/${labId}/circuits/import-sbml`, { method: "POST", body: { ...req, save: true }, schema: CircuitDetailResponseSchema }),
    onSuccess: (d) => {
      qc.setQueryData(circuitKeys.detail(d.circuit.id), d);
      qc.invalidateQueries({ queryKey: circuitKeys.lists() });
    },
  });
}

/** The file's address for a download link (the server names the file after the circuit). */
export function sbmlExportUrl(circuitId: string, program?: { programId: string; signal?: string } | null): string {
  const q = new URLSearchParams();
  if (program) {
    q.set("programId", program.programId);
    if (program.signal) q.set("signal", program.signal);
  }
  const qs = q.toString();
  return apiUrl(`/api/circuits/${circuitId}/sbml${qs ? `?${qs}` : ""}`);
}

export type SbmlFile = { name: string; size: number | null; text: string };

/** Picks one SBML file with the system picker and reads it as text; null when cancelled. */
export async function pickSbmlFile(): Promise<SbmlFile | null> {
  const r = await DocumentPicker.getDocumentAsync({
    type: Platform.OS === "web" ? [".xml", ".sbml", "application/xml", "text/xml", "application/sbml+xml"] : ["text/*", "application/xml", "application/octet-stream"],
    multiple: false,
    base64: false,
    copyToCacheDirectory: true,
  });
  if (r.canceled || !r.assets?.length) return null;
  const a = r.assets[0];
  const text = a.file ? await a.file.text() : await (await fetch(a.uri)).text();
  return { name: a.name, size: a.size ?? a.file?.size ?? null, text };
}
