/**
 * Reproduction: re-run a run's bundle in the same lab, or import a bundle file
 * (shared/schemas/bundle.ts) into the current lab. Both answer with the new
 * run's detail, which reports "identical" or the first difference once it finishes.
 */
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { Platform } from "react-native";
import * as DocumentPicker from "expo-document-picker";
import { api } from "./api";
import { useLabId } from "./current-lab";
import { runKeys } from "./runs";
import { RunDetailSchema } from "@/shared/schemas/api-runs";
import { API_LIMITS, megabytes } from "@/shared/limits";

export function useReproduceRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => api(`/api/runs/${runId}/reproduce`, { method: "POST", schema: RunDetailSchema }),
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}

export function useImportBundle() {
  const labId = useLabId();
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (bundle: unknown) => api(`/api/labs/${labId}/bundles/import`, { method: "POST", body: { bundle }, schema: RunDetailSchema }),
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}

export type PickedBundle = { name: string; json: unknown } | { name: string; parseError: string };

/** Largest bundle file read: what the server's JSON body limit lets through (a bundle is a few kB). */
const MAX_BUNDLE_BYTES = API_LIMITS.maxJsonBodyBytes;

/** Picks a JSON file with the system picker and parses it; null when cancelled. */
export async function pickBundleFile(): Promise<PickedBundle | null> {
  const r = await DocumentPicker.getDocumentAsync({
    type: Platform.OS === "web" ? [".json", "application/json"] : ["application/json", "text/*", "application/octet-stream"],
    multiple: false,
    copyToCacheDirectory: true,
  });
  if (r.canceled || !r.assets?.length) return null;
  const a = r.assets[0];
  const size = a.size ?? a.file?.size ?? 0;
  if (size > MAX_BUNDLE_BYTES) return { name: a.name, parseError: `${a.name} is larger than ${megabytes(MAX_BUNDLE_BYTES)}; a run bundle is a small JSON file.` };
  const text = a.file ? await a.file.text() : await (await fetch(a.uri)).text();
  return parseBundleText(a.name, text);
}

/** JSON text to a picked bundle, with a plain message when it is not JSON. */
export function parseBundleText(name: string, text: string): PickedBundle {
  try {
    return { name, json: JSON.parse(text) };
  } catch {
    return { name, parseError: `${name} is not a JSON file. Choose a bundle.json downloaded from a run.` };
  }
}
