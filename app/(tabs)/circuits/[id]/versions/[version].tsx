import React from "react";
import { useLocalSearchParams } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { WiringDiagram } from "@/components/circuits/wiring-diagram";
import { CircuitView, FeedForwardBadge } from "@/components/circuits/circuit-view";
import { useCircuitVersion } from "@/components/data/circuits";

export default function CircuitVersionScreen() {
  const { id, version } = useLocalSearchParams<{ id: string; version: string }>();
  const q = useCircuitVersion(id, Number(version));
  if (q.isPending)
    return (
      <Screen back={{ href: `/circuits/${id}`, label: "Circuit" }} title={`Version ${version}`}>
        <LoadingState />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: `/circuits/${id}`, label: "Circuit" }} title={`Version ${version}`}>
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const v = q.data;
  return (
    <Screen
      back={{ href: `/circuits/${id}`, label: "Circuit" }}
      title={`${v.body.name}, version ${v.version}`}
      subtitle={`${new Date(v.createdAt).toLocaleString("en-GB")}${v.isCurrent ? " · current" : ""}${v.note ? ` · ${v.note}` : ""}`}
    >
      <FeedForwardBadge ff={v.feedForward} />
      <Card>
        <Text variant="heading">Wiring</Text>
        <WiringDiagram nodes={v.wiring.nodes} edges={v.wiring.edges} feedForward={v.feedForward} />
      </Card>
      <CircuitView body={v.body} />
    </Screen>
  );
}
