import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Banner } from "@/components/ui/states";
import { ApiError } from "@/components/data/api";
import { pickBundleFile, useImportBundle } from "@/components/data/bundles";

export type ImportProblem = { file?: string; message: string; fields: { path: string; message: string }[] };

/** A refused import in plain words: the server's message and each field it named (paths inside the bundle). */
export function importProblemOf(error: unknown, file?: string): ImportProblem {
  if (error instanceof ApiError) {
    const fields = error.fields.map((f) => ({
      path: f.path.replace(/^body\.bundle\.|^body\.|^bundle\./, ""),
      message: f.message,
    }));
    return {
      file,
      message:
        error.status === 400 && fields.length ? "This file is not a run bundle Linger can re-run." : error.message,
      fields,
    };
  }
  return { file, message: error instanceof Error ? error.message : "The bundle could not be imported.", fields: [] };
}

/**
 * Pick a bundle.json, import it into the current lab, and hand back the new
 * run's id. Problems (not JSON, 400 with field errors) are kept for ImportProblems.
 */
export function useBundleImportFlow(onImported: (runId: string) => void) {
  const importer = useImportBundle();
  const [picking, setPicking] = useState(false);
  const [problem, setProblem] = useState<ImportProblem | null>(null);
  const start = async () => {
    setProblem(null);
    setPicking(true);
    let picked;
    try {
      picked = await pickBundleFile();
    } catch (e) {
      setProblem(importProblemOf(e));
      return;
    } finally {
      setPicking(false);
    }
    if (!picked) return;
    if ("parseError" in picked) return setProblem({ file: picked.name, message: picked.parseError, fields: [] });
    const name = picked.name;
    importer.mutate(picked.json, {
      onSuccess: (run) => onImported(run.id),
      onError: (e) => setProblem(importProblemOf(e, name)),
    });
  };
  return { start, busy: picking || importer.isPending, problem, dismiss: () => setProblem(null) };
}

/** The reasons a bundle was refused, each field on its own line. */
export function ImportProblems({ problem }: { problem: ImportProblem }) {
  const t = useTheme();
  return (
    <Banner tone="danger" testID="import-problems">
      <View style={{ gap: t.spacing.xs }}>
        <Text variant="bodyStrong" style={{ color: t.colors.onDangerSoft }}>
          {problem.file ? `${problem.file}: ${problem.message}` : problem.message}
        </Text>
        {problem.fields.map((f, i) => (
          <Text
            key={`${f.path}-${i}`}
            style={{ color: t.colors.onDangerSoft }}
          >{`• ${f.path || "bundle"}: ${f.message}`}</Text>
        ))}
      </View>
    </Banner>
  );
}
