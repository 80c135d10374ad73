import React from "react";
import { View } from "react-native";

import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { LoadMore } from "@/components/ui/load-more";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { SyntheticBadge } from "@/components/traces/synthetic-badge";
import { useTraceSets } from "@/components/data/traces";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { formatCount } from "@/shared/number-format";

const date = (ms: number) =>
  new Date(ms).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" });

export default function TracesScreen() {
  const t = useTheme();
  const { canEdit } = useCurrentLab();
  const sets = useTraceSets();
  return (
    <Screen
      title="Traces"
      subtitle="Single-cell time-lapse traces, scored like simulations and matched against runs and sweeps."
      actions={
        canEdit ? <Button label="Upload traces" icon="upload" href={"/traces/upload"} testID="traces-upload" /> : null
      }
      testID="traces-screen"
    >
      {sets.isPending ? (
        <LoadingState label="Loading trace sets" />
      ) : sets.error ? (
        <ErrorState title="Trace sets could not be loaded" error={sets.error} onRetry={() => sets.refetch()} />
      ) : sets.data.length === 0 ? (
        <EmptyState
          icon="bar-chart-2"
          title="No trace sets yet"
          message="Upload a CSV or TSV of reporter values per cell over time, with the times the inducer was on."
          actionLabel={canEdit ? "Upload traces" : undefined}
          actionHref={"/traces/upload"}
        />
      ) : (
        <View style={{ gap: t.spacing.sm }}>
          {sets.data.map((s) => (
            <Card key={s.id} href={`/traces/${s.id}`} testID={`trace-row-${s.id}`}>
              <View
                style={{
                  flexDirection: "row",
                  justifyContent: "space-between",
                  alignItems: "flex-start",
                  gap: t.spacing.sm,
                  flexWrap: "wrap",
                }}
              >
                <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
                  {s.name}
                </Text>
                {s.synthetic ? <SyntheticBadge testID={`synthetic-badge-${s.id}`} /> : null}
              </View>
              <Text variant="caption" tone="muted">
                {formatCount(s.cellCount)} cells · uploaded by {s.uploadedByName ?? "Linger (demo data)"} ·{" "}
                {date(s.createdAt)}
              </Text>
              {s.fileName ? (
                <Text variant="caption" tone="muted" numberOfLines={1}>
                  {s.fileName}
                </Text>
              ) : null}
            </Card>
          ))}
          <LoadMore list={sets} noun="trace sets" testID="traces-load-more" />
        </View>
      )}
    </Screen>
  );
}
