import React from "react";
import { View } from "react-native";

import { Screen } from "@/components/ui/screen";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { RunRow } from "@/components/ui/run-row";
import { LabSwitcher } from "@/components/ui/lab-switcher";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { useRuns, sortRunsForHome } from "@/components/data/runs";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";

/** Home: the lab, a clear call to start a study, recent runs (running and queued first). No charts here. */
export default function Home() {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const { canEdit } = useCurrentLab();
  const runs = useRuns();
  const list = sortRunsForHome(runs.data ?? []).slice(0, 12);
  return (
    <Screen testID="home-screen">
      <View style={{ gap: t.spacing.xs }}>
        <Text variant="display" tone="primary">
          Linger
        </Text>
        <LabSwitcher />
      </View>
      <Card style={{ backgroundColor: t.colors.primarySoft, borderColor: t.colors.primarySoft, gap: t.spacing.md }}>
        <Text variant="heading" style={{ color: t.colors.onPrimarySoft }}>
          Start a study
        </Text>
        <Text style={{ color: t.colors.onPrimarySoft }}>
          Pick a circuit and an input program, choose how many replicates to simulate, and see how often short inputs
          leak through.
        </Text>
        <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.sm }}>
          <Button label="Start a study" icon="play" href={"/runs/new"} disabled={!canEdit} testID="start-study" />
          <Button label="New circuit" variant="secondary" icon="plus" href={"/circuits/new"} disabled={!canEdit} />
        </View>
        {!canEdit ? (
          <Text variant="caption" style={{ color: t.colors.onPrimarySoft }}>
            You can view this lab; an owner can make you an editor.
          </Text>
        ) : null}
      </Card>
      <View style={{ gap: t.spacing.md }}>
        <View style={{ flexDirection: "row", justifyContent: "space-between", alignItems: "center" }}>
          <Text variant="heading">Recent runs</Text>
          <Button label="All runs" variant="ghost" compact href={"/runs"} />
        </View>
        {runs.isPending ? (
          <LoadingState label="Loading runs" />
        ) : runs.error ? (
          <ErrorState title="Runs could not be loaded" error={runs.error} onRetry={() => runs.refetch()} />
        ) : list.length === 0 ? (
          <EmptyState
            icon="play-circle"
            title="No runs yet"
            message="Your lab's runs will appear here with their progress."
            actionLabel={canEdit ? "Start a study" : undefined}
            actionHref={"/runs/new"}
          />
        ) : (
          <View style={isWide ? { gap: t.spacing.sm, flexDirection: "row", flexWrap: "wrap" } : { gap: t.spacing.sm }}>
            {list.map((r) => (
              <View key={r.id} style={isWide ? { width: "49%", flexGrow: 1 } : undefined}>
                <RunRow run={{ ...r, replicatesDone: r.progress.replicatesDone }} href={`/runs/${r.id}`} />
              </View>
            ))}
          </View>
        )}
      </View>
    </Screen>
  );
}
