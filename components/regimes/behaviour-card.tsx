import React from "react";
import { View } from "react-native";
import { Link } from "expo-router";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import type { CircuitDetailResponse } from "@/shared/schemas/api-circuits";
import { RegimeBadge } from "./regime-badge";
import { wiringPhrase, wiringVersusBehaviour } from "./regime-words";

/** Wiring beside measured behaviour on the circuit page: the label of its wiring and what its latest runs did. */
export function BehaviourCard({ detail }: { detail: CircuitDetailResponse }) {
  const t = useTheme();
  const wiring = wiringPhrase(
    detail.feedForward,
    detail.wiring.edges,
    detail.body.species.map((s) => s.name),
  );
  const latest = detail.behaviour ?? [];
  return (
    <Card testID="behaviour-card">
      <Text variant="heading">Wiring and behaviour</Text>
      {latest.length === 0 ? (
        <Text testID="behaviour-words">
          Wired as {wiring}. What it does depends on its parameters: run it to see its behaviour measured.
        </Text>
      ) : (
        <>
          <Text testID="behaviour-words">{wiringVersusBehaviour(wiring, latest[0].regime)}</Text>
          {latest.map((b) => (
            <View key={b.runId} style={{ gap: t.spacing.xs }}>
              <Link href={`/runs/${b.runId}`} style={{ minHeight: 44, paddingVertical: 12, color: t.colors.primary }}>
                {b.runName}
                {b.circuitVersion !== null ? ` (version ${b.circuitVersion})` : ""}
              </Link>
              <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
                <RegimeBadge label={b.regime.deterministic.label} />
                <RegimeBadge label={b.regime.stochastic.label} />
              </View>
            </View>
          ))}
          <Text variant="caption" tone="muted">
            Badges: mean-field model, then stochastic ensemble.
          </Text>
        </>
      )}
    </Card>
  );
}
