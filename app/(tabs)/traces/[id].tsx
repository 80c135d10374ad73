import React, { useState } from "react";
import { Linking, View } from "react-native";
import { useLocalSearchParams } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { SafetyNote } from "@/components/ui/safety-note";
import { DeletedBanner } from "@/components/ui/deleted-banner";
import { Banner, ErrorState, LoadingState } from "@/components/ui/states";
import { HeadlineCards } from "@/components/runs/headline-cards";
import { LazyChart } from "@/components/charts/lazy-chart";
import { formatCount, formatNumber, formatQuantity } from "@/shared/number-format";
import { cellsOverScheduleSpec } from "@/components/traces/trace-specs";
import { median } from "@/components/traces/median";
import { CellTable } from "@/components/traces/cell-table";
import { MatchPanel } from "@/components/traces/match-panel";
import { EditTraceSet } from "@/components/traces/edit-trace-set";
import { SyntheticBadge, SYNTHETIC_NOTE } from "@/components/traces/synthetic-badge";
import {
  metricsCsvUrl,
  useDeleteTraceSet,
  usePatchTraceSet,
  useRestoreTraceSet,
  useTraceSet,
} from "@/components/data/traces";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { DefinitionLink } from "@/components/definitions/definition-link";

export default function TraceSetScreen() {
  const t = useTheme();
  const { id } = useLocalSearchParams<{ id: string }>();
  const { canEdit } = useCurrentLab();
  // Deleted on the server (restorable for the undo period): the set stays on screen with Undo; it answers 404 meanwhile.
  const [deleted, setDeleted] = useState(false);
  const q = useTraceSet(id, { paused: deleted });
  const patch = usePatchTraceSet(id ?? "");
  const del = useDeleteTraceSet();
  const restore = useRestoreTraceSet();
  const [editing, setEditing] = useState(false);
  if (q.isPending)
    return (
      <Screen back={{ href: "/traces", label: "Traces" }} title="Trace set">
        <LoadingState label="Loading the trace set" />
      </Screen>
    );
  if (q.error && !q.data)
    return (
      <Screen back={{ href: "/traces", label: "Traces" }} title="Trace set">
        <ErrorState title="This trace set could not be loaded" error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const s = q.data;
  const a = s.analysis;
  const sum = a.summary;
  const chart = cellsOverScheduleSpec(s.cells, s.schedule, t.colors, {
    thresholdTraceUnits: median(a.cells.map((c) => c.thresholdTraceUnits)),
  });
  const uploaded = new Date(s.createdAt).toLocaleDateString("en-GB", {
    day: "numeric",
    month: "short",
    year: "numeric",
  });
  return (
    <Screen
      back={{ href: "/traces", label: "Traces" }}
      title={s.name}
      subtitle={`${formatCount(s.cellCount)} cells · uploaded by ${s.uploadedByName ?? "Linger (demo data)"} · ${uploaded}`}
      testID="trace-detail-screen"
    >
      {s.synthetic ? (
        <View style={{ gap: t.spacing.sm }}>
          <SyntheticBadge />
          <Banner tone="notice" testID="synthetic-note">
            {SYNTHETIC_NOTE}
          </Banner>
        </View>
      ) : null}
      <SafetyNote />

      <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
        <Text variant="heading">Headline figures</Text>
        <DefinitionLink term="pass" label="pass" />
      </View>
      <Text variant="caption" tone="muted">
        Each cell counts as a replicate: {formatCount(sum.pulsesAnalysed)} cell × pulse records scored;{" "}
        {sum.skippedNotCovered} not watched whole{sum.skippedGap ? `, ${sum.skippedGap} left out for gaps` : ""}. Frame
        interval {formatQuantity(a.frameIntervalMinutes, "min")}. Scale: {a.scaleNote}
      </Text>
      <HeadlineCards summary={sum.analysis} peakUnit="trace units" />

      {chart ? (
        <Card testID="chart-card-cells">
          <Text variant="heading">Sample cells</Text>
          <LazyChart spec={chart} testID="chart-cells" source={{ name: s.name }} />
          {s.cells.length < s.cellCount ? (
            <Text variant="caption" tone="muted">
              Charts hold the first {s.cells.length} cells; the figures cover all {s.cellCount}.
            </Text>
          ) : null}
        </Card>
      ) : null}

      <Card>
        <Text variant="heading">Per-cell figures</Text>
        <CellTable cells={a.cells} />
      </Card>

      {!deleted ? <MatchPanel traceSet={s} canEdit={canEdit} /> : null}

      {!deleted ? (
        <Card>
          <Text variant="heading">Export</Text>
          <Button
            label="Download metrics.csv"
            variant="secondary"
            icon="download"
            compact
            onPress={() => Linking.openURL(metricsCsvUrl(s.id))}
            style={{ alignSelf: "flex-start" }}
            testID="export-metrics"
          />
          <Text variant="caption" tone="muted">
            One row per cell and scored pulse{s.synthetic ? "; the file starts with a line marking it synthetic" : ""}.
          </Text>
        </Card>
      ) : null}

      {/* In place of the settings card, where the Delete button was: in view after the press. */}
      {deleted ? (
        <DeletedBanner
          what="trace set"
          busy={restore.isPending}
          onUndo={() => restore.mutate(s.id, { onSuccess: () => setDeleted(false) })}
          back={{ label: "Back to trace sets", href: "/traces" }}
          testID="trace-deleted"
        />
      ) : null}
      {del.error ? <ErrorState title="The trace set could not be deleted" error={del.error} /> : null}
      {restore.error ? <ErrorState title="The trace set could not be restored" error={restore.error} /> : null}

      {canEdit && !deleted ? (
        <Card>
          <Text variant="heading">Settings</Text>
          {editing ? (
            <EditTraceSet
              key={s.id}
              traceSet={s}
              busy={patch.isPending}
              error={patch.error}
              saved={patch.isSuccess}
              onSave={(body) => patch.mutate(body)}
              onCancel={() => {
                patch.reset();
                setEditing(false);
              }}
            />
          ) : (
            <>
              <Text variant="caption" tone="muted">
                Threshold {formatQuantity(s.settings.thresholdMolecules, "molecules")} · background{" "}
                {s.settings.background.mode === "preInput"
                  ? "before first pulse"
                  : s.settings.background.mode === "value"
                    ? `${formatNumber(s.settings.background.value)} units`
                    : "none"}{" "}
                · scale {formatNumber(a.scaleUnitsPerMolecule)} units per molecule · smoothing{" "}
                {s.settings.smoothing.mode === "movingAverage" ? `${s.settings.smoothing.widthFrames} frames` : "none"}{" "}
                · window {formatQuantity(s.settings.windowMinutes, "min")}
              </Text>
              <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
                <DefinitionLink term="threshold" label="threshold" />
                <DefinitionLink term="window" label="response window" />
              </View>
              <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
                <Button
                  label="Edit name and preprocessing"
                  variant="secondary"
                  icon="sliders"
                  onPress={() => setEditing(true)}
                  testID="edit-trace-open"
                />
                <Button
                  label="Delete trace set"
                  variant="secondary"
                  icon="trash-2"
                  busy={del.isPending}
                  onPress={() => del.mutate(s.id, { onSuccess: () => setDeleted(true) })}
                  testID="delete-trace-set"
                />
              </View>
            </>
          )}
        </Card>
      ) : null}
    </Screen>
  );
}
