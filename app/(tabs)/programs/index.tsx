import React from "react";
import { View } from "react-native";

import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { LoadMore } from "@/components/ui/load-more";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { usePrograms } from "@/components/data/programs";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";

const KIND_LABEL = {
  ladder: "Duration ladder",
  periodic: "Periodic train",
  pulses: "Pulse list",
  random: "Random spikes",
} as const;

export default function ProgramsScreen() {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const { canEdit } = useCurrentLab();
  const programs = usePrograms();
  return (
    <Screen
      title="Input programs"
      subtitle="Schedules of input pulses that drive a circuit."
      actions={canEdit ? <Button label="New program" icon="plus" href={"/programs/new"} testID="new-program" /> : null}
    >
      {programs.isPending ? (
        <LoadingState label="Loading programs" />
      ) : programs.error ? (
        <ErrorState title="Programs could not be loaded" error={programs.error} onRetry={() => programs.refetch()} />
      ) : programs.data.length === 0 ? (
        <EmptyState
          icon="activity"
          title="No input programs yet"
          message="A duration ladder is the usual start: pulses of growing length with recovery gaps."
          actionLabel={canEdit ? "New program" : undefined}
          actionHref={"/programs/new"}
        />
      ) : (
        <View style={isWide ? { flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md } : { gap: t.spacing.md }}>
          {programs.data.map((p) => (
            <View key={p.id} style={isWide ? { width: "48%", flexGrow: 1 } : undefined}>
              <Card href={`/programs/${p.id}`}>
                <Text variant="bodyStrong">{p.name}</Text>
                <Text variant="caption" tone="primary">
                  {KIND_LABEL[p.kind]}
                </Text>
                <Text variant="caption" tone="muted">
                  {p.description}
                </Text>
              </Card>
            </View>
          ))}
          <LoadMore list={programs} noun="programs" testID="programs-load-more" />
        </View>
      )}
    </Screen>
  );
}
