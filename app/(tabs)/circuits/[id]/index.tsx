import React from "react";
import { View } from "react-native";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Banner, ErrorState, LoadingState } from "@/components/ui/states";
import { WiringDiagram } from "@/components/circuits/wiring-diagram";
import { BehaviourCard } from "@/components/regimes/behaviour-card";
import { CircuitView, FeedForwardBadge } from "@/components/circuits/circuit-view";
import { SbmlExportCard } from "@/components/circuits/sbml-export";
import { useArchiveCircuit, useCircuit, useDuplicateCircuit } from "@/components/data/circuits";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";

export default function CircuitDetail() {
  const t = useTheme();
  const router = useRouter();
  const { isWide } = useBreakpoints();
  const { id } = useLocalSearchParams<{ id: string }>();
  const { canEdit } = useCurrentLab();
  const q = useCircuit(id);
  const duplicate = useDuplicateCircuit();
  const archive = useArchiveCircuit();
  if (q.isPending)
    return (
      <Screen back={{ href: "/circuits", label: "Circuits" }} title="Circuit">
        <LoadingState label="Loading circuit" />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: "/circuits", label: "Circuits" }} title="Circuit">
        <ErrorState title="This circuit could not be loaded" error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const { circuit, body, versions, wiring, feedForward } = q.data;
  const archived = !!circuit.archivedAt;
  return (
    <Screen
      back={{ href: "/circuits", label: "Circuits" }}
      title={circuit.name}
      subtitle={`Version ${circuit.currentVersion} · output ${circuit.outputSpecies}`}
      actions={
        canEdit ? (
          <>
            <Button label="Edit" icon="edit-2" href={`/circuits/${circuit.id}/edit`} testID="edit-circuit" />
            <Button label="Start a study" variant="secondary" icon="play" href={`/runs/new?circuitId=${circuit.id}`} />
          </>
        ) : null
      }
    >
      {archived ? <Banner tone="notice">This circuit is archived. Runs that used it keep their copy.</Banner> : null}
      <FeedForwardBadge ff={feedForward} />
      {circuit.description ? <Text tone="muted">{circuit.description}</Text> : null}
      <BehaviourCard detail={q.data} />
      <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.lg, alignItems: "flex-start" }}>
        <View style={{ flex: isWide ? 1 : undefined, width: isWide ? undefined : "100%", gap: t.spacing.lg }}>
          <Card>
            <Text variant="heading">Wiring</Text>
            <WiringDiagram nodes={wiring.nodes} edges={wiring.edges} feedForward={feedForward} />
          </Card>
        </View>
        <View style={{ flex: isWide ? 1 : undefined, width: isWide ? undefined : "100%", gap: t.spacing.lg }}>
          <CircuitView body={body} />
        </View>
      </View>
      <SbmlExportCard circuitId={circuit.id} body={body} />
      <Card>
        <Text variant="heading">Version history</Text>
        <Text variant="caption" tone="muted">
          Saving makes a new version; a run keeps the version it used.
        </Text>
        {versions.map((v) => (
          <Card
            key={v.version}
            href={`/circuits/${circuit.id}/versions/${v.version}`}
            style={{ padding: t.spacing.md }}
          >
            <Text variant="bodyStrong">
              Version {v.version}
              {v.version === circuit.currentVersion ? " (current)" : ""}
            </Text>
            <Text variant="caption" tone="muted">
              {new Date(v.createdAt).toLocaleString("en-GB")}
              {v.createdByName ? ` · ${v.createdByName}` : ""}
              {v.note ? ` · ${v.note}` : ""}
            </Text>
          </Card>
        ))}
      </Card>
      {canEdit ? (
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
          <Button
            label="Duplicate"
            variant="secondary"
            icon="copy"
            busy={duplicate.isPending}
            onPress={() =>
              duplicate.mutate({ id: circuit.id }, { onSuccess: (d) => router.push(`/circuits/${d.circuit.id}`) })
            }
          />
          <Button
            label={archived ? "Restore from archive" : "Archive"}
            variant="secondary"
            icon="archive"
            busy={archive.isPending}
            onPress={() => archive.mutate({ id: circuit.id, archived: !archived })}
          />
        </View>
      ) : null}
      {duplicate.error || archive.error ? <ErrorState error={duplicate.error ?? archive.error} /> : null}
    </Screen>
  );
}
