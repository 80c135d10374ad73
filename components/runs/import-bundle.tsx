import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Banner } from "@/components/ui/states";
import { Button } from "@/components/ui/button";
import { ApiError } from "@/components/data/api";
import { pickBundleFile, useImportBundle } from "@/components/data/bundles";
import { formatCount } from "@/shared/number-format";

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

/** A picked bundle waiting for the user's go-ahead. */
export type PendingImport = { file: string; json: unknown; runName: string | null; replicates: number | null };

/** What the confirmation says about a picked bundle (name and replicates when the file has them). */
export function pendingImportOf(file: string, json: unknown): PendingImport {
  const b = json && typeof json === "object" ? (json as Record<string, any>) : {};
  return {
    file,
    json,
    runName: typeof b.name === "string" ? b.name : null,
    replicates: typeof b.spec?.replicates === "number" ? b.spec.replicates : null,
  };
}

/**
 * Pick a bundle.json, confirm, import it into the current lab, and hand back
 * the new run's id. Importing starts a computation, so it waits for a second
 * press (`confirm`); `cancel` drops the picked file. Problems (not JSON, 400
 * with field errors) are kept for ImportProblems.
 */
export function useBundleImportFlow(onImported: (runId: string) => void) {
  const importer = useImportBundle();
  const [picking, setPicking] = useState(false);
  const [problem, setProblem] = useState<ImportProblem | null>(null);
  const [pending, setPending] = useState<PendingImport | null>(null);
  const start = async () => {
    setProblem(null);
    setPending(null);
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
    setPending(pendingImportOf(picked.name, picked.json));
  };
  const confirm = () => {
    if (!pending) return;
    const { file, json } = pending;
    setPending(null);
    importer.mutate(json, {
      onSuccess: (run) => onImported(run.id),
      onError: (e) => setProblem(importProblemOf(e, file)),
    });
  };
  return {
    start,
    busy: picking || importer.isPending,
    problem,
    pending,
    confirm,
    cancel: () => setPending(null),
    dismiss: () => setProblem(null),
  };
}

/** "Import this bundle and re-run it?" with the go-ahead and a way back. */
export function ImportConfirm({
  pending,
  onConfirm,
  onCancel,
}: {
  pending: PendingImport;
  onConfirm: () => void;
  onCancel: () => void;
}) {
  const t = useTheme();
  const what = pending.runName ? `“${pending.runName}”` : "this run";
  const reps = pending.replicates !== null ? ` ${formatCount(pending.replicates)} replicates` : "";
  return (
    <Banner tone="notice" testID="import-confirm-card">
      <View role="group" aria-label={`Import ${pending.file}?`} style={{ gap: t.spacing.sm }}>
        <Text variant="bodyStrong" style={{ color: t.colors.onNoticeSoft }}>
          {`Import ${pending.file}?`}
        </Text>
        <Text style={{ color: t.colors.onNoticeSoft }}>
          {`A new run in this lab re-runs${reps} of ${what} and checks that its statistics match the bundle.`}
        </Text>
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
          <Button label="Import and re-run" icon="upload" compact onPress={onConfirm} testID="import-confirm" />
          <Button label="Don't import" variant="secondary" compact onPress={onCancel} testID="import-cancel" />
        </View>
      </View>
    </Banner>
  );
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
