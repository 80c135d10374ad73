import React from "react";
import { View } from "react-native";

import { Screen } from "@/components/ui/screen";
import { LoadMore } from "@/components/ui/load-more";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { ProgressBar } from "@/components/ui/progress-bar";
import { StatusBadge } from "@/components/ui/status-badge";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { useSweeps } from "@/components/data/sweeps";
import { useRegimeMaps } from "@/components/data/regime-maps";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { sweepProgress } from "@/components/sweeps/sweep-progress";

export default function SweepsScreen() {
  const t = useTheme();
  const { canEdit } = useCurrentLab();
  const sweeps = useSweeps();
  const maps = useRegimeMaps();
  return (
    <Screen
      title="Sweeps"
      subtitle="One run per parameter value: see where a circuit filters and where it does not."
      actions={canEdit ? <Button label="New sweep" icon="plus" href={"/sweeps/new"} /> : null}
    >
      {sweeps.isPending ? (
        <LoadingState label="Loading sweeps" />
      ) : sweeps.error ? (
        <ErrorState error={sweeps.error} onRetry={() => sweeps.refetch()} />
      ) : sweeps.data.length === 0 ? (
        <EmptyState
          icon="grid"
          title="No sweeps yet"
          message="Sweep one or two parameters, such as a half-max K or a rate, over a grid of values."
          actionLabel={canEdit ? "New sweep" : undefined}
          actionHref={"/sweeps/new"}
        />
      ) : (
        <View style={{ gap: t.spacing.sm }}>
          {sweeps.data.map((s) => {
            const progress = sweepProgress(s);
            return (
              <Card key={s.id} href={`/sweeps/${s.id}`}>
                <View style={{ flexDirection: "row", justifyContent: "space-between", gap: t.spacing.sm }}>
                  <Text variant="bodyStrong" style={{ flex: 1 }}>
                    {s.name}
                  </Text>
                  <StatusBadge status={s.status} />
                </View>
                <Text variant="caption" tone="muted">
                  {s.axes.join(" × ")}
                </Text>
                <ProgressBar value={progress.fraction} label={`Progress of ${s.name}`} />
                <Text variant="caption" tone="muted">
                  {progress.caption}
                </Text>
              </Card>
            );
          })}
          <LoadMore list={sweeps} noun="sweeps" testID="sweeps-load-more" />
        </View>
      )}
      {!maps.isPending && !maps.error && maps.data.length > 0 ? (
        <View style={{ gap: t.spacing.sm }} testID="regime-map-list">
          <Text variant="heading">Mean-field maps</Text>
          {maps.data.map((m) => (
            <Card key={m.id} href={`/sweeps/maps/${m.id}`}>
              <Text variant="bodyStrong">{m.name}</Text>
              <Text variant="caption" tone="muted">
                {m.axes.join(" × ")} · {m.gridPoints} points{m.refinedPoints ? ` + ${m.refinedPoints} refined` : ""}
              </Text>
            </Card>
          ))}
          <LoadMore list={maps} noun="maps" testID="maps-load-more" />
        </View>
      ) : null}
    </Screen>
  );
}
