import React, { useState } from "react";
import { View } from "react-native";
import { useLocalSearchParams } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Banner, ErrorState, LoadingState } from "@/components/ui/states";
import { SafetyNote } from "@/components/ui/safety-note";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { RegimeLegend, RegimeMap } from "@/components/sweeps/regime-map";
import { regimeMapLayout, type MapSource } from "@/components/sweeps/regime-map-layout";
import { TargetPanel } from "@/components/regimes/target-panel";
import {
  useDeleteRegimeMap,
  useRefineRegimeMap,
  useRegimeMap,
  useRestoreRegimeMap,
} from "@/components/data/regime-maps";
import { DeletedBanner } from "@/components/ui/deleted-banner";
import { ApiError } from "@/components/data/api";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { formatNumber, formatQuantity } from "@/shared/number-format";
import type { RegimeMapDetail, TargetAnswer } from "@/shared/schemas/api-regime-maps";
import { API_LIMITS } from "@/shared/schemas/api-runs";

const toSource = (m: RegimeMapDetail): MapSource => ({
  axes: m.axes,
  points: m.points.map((p) => ({
    index: p.index,
    runId: null,
    values: p.values,
    refined: p.refined,
    regime: { deterministic: p.verdict.label, stochastic: null },
  })),
});

export default function RegimeMapScreen() {
  const t = useTheme();
  const { id } = useLocalSearchParams<{ id: string }>();
  // Deleted on the server (restorable for the undo period): the map stays on screen with Undo; it answers 404 meanwhile.
  const [deleted, setDeleted] = useState(false);
  const q = useRegimeMap(id, { paused: deleted });
  const refine = useRefineRegimeMap();
  const del = useDeleteRegimeMap();
  const restore = useRestoreRegimeMap();
  const { canEdit } = useCurrentLab();
  const [target, setTarget] = useState<TargetAnswer | null>(null);
  if (q.isPending)
    return (
      <Screen back={{ href: "/sweeps", label: "Sweeps" }} title="Mean-field map">
        <LoadingState />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: "/sweeps", label: "Sweeps" }} title="Mean-field map">
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const m = q.data;
  const source = toSource(m);
  const layout = regimeMapLayout(source, "deterministic");
  return (
    <Screen
      back={{ href: "/sweeps", label: "Sweeps" }}
      title={m.name}
      subtitle="What the mean-field (deterministic) model does at each point: no stochastic simulation."
    >
      <Card>
        <Text variant="caption" tone="muted">
          {m.gridPoints} grid points{m.refinedPoints ? ` and ${m.refinedPoints} refined points` : ""}, labelled in{" "}
          {formatQuantity(m.computeSeconds, "s")} of computing. Noise can change what a circuit does (noise-driven
          cycles, switching between states): launch a sweep for the stochastic labels.
        </Text>
        <DefinitionLink term="regime-map" label="Regime map" />
      </Card>
      <SafetyNote />
      {deleted ? (
        <DeletedBanner
          what="regime map"
          busy={restore.isPending}
          onUndo={() => restore.mutate(m.id, { onSuccess: () => setDeleted(false) })}
          back={{ label: "Back to sweeps", href: "/sweeps" }}
          testID="map-deleted"
        />
      ) : null}
      {del.error ? <ErrorState title="The regime map could not be deleted" error={del.error} /> : null}
      {restore.error ? <ErrorState title="The regime map could not be restored" error={restore.error} /> : null}
      <Card>
        <View testID="regime-maps" style={{ gap: t.spacing.md }}>
          <RegimeLegend labels={layout.labels} />
          <RegimeMap
            sweep={source}
            model="deterministic"
            meets={target ? new Map(target.points.map((p) => [p.index, p.meets])) : undefined}
          />
        </View>
        {canEdit && !deleted ? (
          <View style={{ gap: t.spacing.xs }}>
            <Button
              label="Refine boundaries"
              variant="secondary"
              icon="grid"
              onPress={() => refine.mutate(m.id)}
              busy={refine.isPending}
              testID="refine-map"
            />
            <Text variant="caption" tone="muted">
              Adds a point half-way between neighbours whose labels differ (at most {m.refinementCap} in all;{" "}
              {m.refinedPoints} so far).
            </Text>
            <DefinitionLink term="boundary-refinement" label="Boundary refinement" />
            {refine.error instanceof ApiError ? <Banner tone="notice">{refine.error.message}</Banner> : null}
          </View>
        ) : null}
      </Card>
      {!deleted ? (
        <Card>
          <TargetPanel kind="regime-maps" id={m.id} pulses={false} onAnswer={setTarget} />
        </Card>
      ) : null}
      <Card>
        <Text variant="heading">Points</Text>
        {m.points.map((p) => (
          <View key={p.index} style={{ gap: 2 }} testID={`map-point-${p.index}`}>
            <Text variant="bodyStrong">
              {Object.entries(p.values)
                .map(([k, v]) => `${k} = ${formatNumber(v)}`)
                .join(", ")}
              {p.refined ? " (refined)" : ""}: {p.verdict.label}
            </Text>
            <Text variant="caption" tone="muted">
              {p.verdict.reason ??
                Object.entries(p.verdict.evidence)
                  .slice(0, 6)
                  .map(
                    ([k, v]) => `${k} ${Array.isArray(v) ? v.map((x) => formatNumber(x)).join("/") : formatNumber(v)}`,
                  )
                  .join(" · ")}
            </Text>
          </View>
        ))}
      </Card>
      {canEdit && !deleted ? (
        <Card>
          <Button
            label="Delete map"
            variant="secondary"
            icon="trash-2"
            busy={del.isPending}
            onPress={() => del.mutate(m.id, { onSuccess: () => setDeleted(true) })}
            style={{ alignSelf: "flex-start" }}
            testID="delete-map"
          />
          <Text variant="caption" tone="muted">
            It can be restored for {API_LIMITS.undoDays} days, then it is purged.
          </Text>
        </Card>
      ) : null}
    </Screen>
  );
}
