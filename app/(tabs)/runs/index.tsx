import React, { useState } from "react";
import { View } from "react-native";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { RunRow } from "@/components/ui/run-row";
import { LoadMore } from "@/components/ui/load-more";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { useRuns, sortRunsForHome } from "@/components/data/runs";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { ImportConfirm, ImportProblems, useBundleImportFlow } from "@/components/runs/import-bundle";

export default function RunsScreen() {
  const t = useTheme();
  const router = useRouter();
  const { canEdit } = useCurrentLab();
  const [show, setShow] = useState<"active" | "archived">("active");
  const runs = useRuns({ archived: show === "archived" });
  const importer = useBundleImportFlow((id) => router.push(`/runs/${id}`));
  return (
    <Screen
      title="Runs"
      actions={
        <>
          <Button label="Compare runs" variant="secondary" icon="columns" href={"/compare"} />
          {canEdit ? (
            <Button
              label="Import bundle"
              variant="secondary"
              icon="upload"
              busy={importer.busy}
              onPress={importer.start}
              testID="import-bundle"
            />
          ) : null}
          {canEdit ? <Button label="Start a study" icon="play" href={"/runs/new"} /> : null}
        </>
      }
    >
      {importer.pending ? (
        <ImportConfirm pending={importer.pending} onConfirm={importer.confirm} onCancel={importer.cancel} />
      ) : null}
      {importer.problem ? <ImportProblems problem={importer.problem} /> : null}
      <Choice
        label="Show"
        value={show}
        options={[
          { value: "active", label: "Current" },
          { value: "archived", label: "Archived" },
        ]}
        onChange={setShow}
      />
      {runs.isPending ? (
        <LoadingState label="Loading runs" />
      ) : runs.error ? (
        <ErrorState title="Runs could not be loaded" error={runs.error} onRetry={() => runs.refetch()} />
      ) : runs.data.length === 0 ? (
        <EmptyState
          icon="play-circle"
          title={show === "archived" ? "No archived runs" : "No runs yet"}
          actionLabel={canEdit && show === "active" ? "Start a study" : undefined}
          actionHref={"/runs/new"}
        />
      ) : (
        <View style={{ gap: t.spacing.sm }}>
          {sortRunsForHome(runs.data).map((r) => (
            <RunRow key={r.id} run={{ ...r, replicatesDone: r.progress.replicatesDone }} href={`/runs/${r.id}`} />
          ))}
          <LoadMore list={runs} noun="runs" testID="runs-load-more" />
        </View>
      )}
    </Screen>
  );
}
