import React, { useState } from "react";
import { View } from "react-native";

import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { LoadMore } from "@/components/ui/load-more";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { useCircuits } from "@/components/data/circuits";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";

export default function CircuitsScreen() {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const { canEdit } = useCurrentLab();
  const [show, setShow] = useState<"active" | "archived">("active");
  const circuits = useCircuits({ archived: show === "archived" });
  return (
    <Screen
      title="Circuits"
      subtitle="Species, reactions and rate laws your lab simulates."
      actions={
        canEdit ? (
          <>
            <Button label="New circuit" icon="plus" href={"/circuits/new"} testID="new-circuit" />
            <Button
              label="Import SBML"
              variant="secondary"
              icon="upload"
              href={"/circuits/import"}
              testID="import-sbml"
            />
          </>
        ) : null
      }
    >
      <Choice
        label="Show"
        value={show}
        options={[
          { value: "active", label: "Active" },
          { value: "archived", label: "Archived" },
        ]}
        onChange={setShow}
      />
      {circuits.isPending ? (
        <LoadingState label="Loading circuits" />
      ) : circuits.error ? (
        <ErrorState title="Circuits could not be loaded" error={circuits.error} onRetry={() => circuits.refetch()} />
      ) : circuits.data.length === 0 ? (
        <EmptyState
          icon="share-2"
          title={show === "archived" ? "No archived circuits" : "No circuits yet"}
          message="Start from a template such as the coherent feed-forward AND circuit, or from scratch."
          actionLabel={canEdit && show === "active" ? "New circuit" : undefined}
          actionHref={"/circuits/new"}
        />
      ) : (
        <View style={isWide ? { flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md } : { gap: t.spacing.md }}>
          {circuits.data.map((c) => (
            <View key={c.id} style={isWide ? { width: "48%", flexGrow: 1 } : undefined}>
              <Card href={`/circuits/${c.id}`} testID={`circuit-row-${c.id}`}>
                <Text variant="bodyStrong">{c.name}</Text>
                <Text variant="caption" tone="muted">
                  {c.speciesCount} species · {c.reactionCount} reactions · output {c.outputSpecies} · version{" "}
                  {c.currentVersion}
                </Text>
                {c.feedForwardLabel ? (
                  <Text variant="caption" tone="primary">
                    Feed-forward: {c.feedForwardLabel}
                  </Text>
                ) : null}
              </Card>
            </View>
          ))}
          <LoadMore list={circuits} noun="circuits" testID="circuits-load-more" />
        </View>
      )}
    </Screen>
  );
}
