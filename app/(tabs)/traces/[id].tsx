import React, { useState } from "react";
import { Linking, View } from "react-native";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "../../../components/ui/screen";
import { Card } from "../../../components/ui/card";
import { Text } from "../../../components/ui/text";
import { Button } from "../../../components/ui/button";
import { SafetyNote } from "../../../components/ui/safety-note";
import { Banner, ErrorState, LoadingState } from "../../../components/ui/states";
import { HeadlineCards } from "../../../components/runs/headline-cards";
import { LazyChart } from "../../../components/charts/lazy-chart";
import { formatNumber } from "../../../components/charts/chart-spec";
import { cellsOverScheduleSpec } from "../../../components/traces/trace-specs";
import { median } from "../../../components/traces/median";
import { CellTable } from "../../../components/traces/cell-table";
import { MatchPanel } from "../../../components/traces/match-panel";
import { EditTraceSet } from "../../../components/traces/edit-trace-set";
import { SyntheticBadge, SYNTHETIC_NOTE } from "../../../components/traces/synthetic-badge";
import { useUndoableDelete } from "../../../components/traces/use-undoable-delete";
import { metricsCsvUrl, useDeleteTraceSet, usePatchTraceSet, useTraceSet } from "../../../components/data/traces";
import { useCurrentLab } from "../../../components/data/current-lab";
import { useTheme } from "../../../components/theme/use-theme";

export default function TraceSetScreen() {
  const t = useTheme();
  const router = useRouter();
  const { id } = useLocalSearchParams<{ id: string }>();
  const { canEdit } = useCurrentLab();
  const q = useTraceSet(id);
  const patch = usePatchTraceSet(id ?? "");
  const del = useDeleteTraceSet();
  const [editing, setEditing] = useState(false);
  const removal = useUndoableDelete(() => del.mutate(id ?? "", { onSuccess: () => router.replace("/traces") }));
  if (q.isPending) return <Screen title="Trace set"><LoadingState label="Loading the trace set" /></Screen>;
  if (q.error) return <Screen title="Trace set"><ErrorState title="This trace set could not be loaded" error={q.error} onRetry={() => q.refetch()} /></Screen>;
  const s = q.data;
  const a = s.analysis;
  const sum = a.summary;
  const chart = cellsOverScheduleSpec(s.cells, s.schedule, t.colors, { thresholdTraceUnits: median(a.cells.map((c) => c.thresholdTraceUnits)) });
  const uploaded = new Date(s.createdAt).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" });
  return (
    <Screen title={s.name} subtitle={`${s.cellCount.toLocaleString("en")} cells · uploaded by ${s.uploadedByName ?? "Linger (demo data)"} · ${uploaded}`} testID="trace-detail-screen">
      {s.synthetic ? (
        <View style={{ gap: t.spacing.sm }}>
          <SyntheticBadge />
          <Banner tone="notice" testID="synthetic-note">{SYNTHETIC_NOTE}</Banner>
        </View>
      ) : null}
      {removal.pending ? (
        <Banner tone="notice" testID="delete-pending">
          <View style={{ gap: t.spacing.sm }}>
            <Text style={{ color: t.colors.onNoticeSoft }}>This trace set will be deleted in {removal.secondsLeft} s.</Text>
            <Button label="Undo delete" variant="secondary" onPress={removal.undo} style={{ alignSelf: "flex-start" }} testID="undo-delete" />
          </View>
        </Banner>
      ) : null}
      {del.error ? <ErrorState title="The trace set could not be deleted" error={del.error} /> : null}
      <SafetyNote />

      <Text variant="heading">Headline figures</Text>
      <Text variant="caption" tone="muted">
        Each cell counts as a replicate: {sum.pulsesAnalysed.toLocaleString("en")} cell × pulse records scored; {sum.skippedNotCovered} not watched whole{sum.skippedGap ? `, ${sum.skippedGap} left out for gaps` : ""}. Frame interval {formatNumber(a.frameIntervalMinutes)} min. Scale: {a.scaleNote}
      </Text>
      <HeadlineCards summary={sum.analysis} peakUnit="trace units" />

      {chart ? (
        <Card testID="chart-card-cells">
          <Text variant="heading">Sample cells</Text>
          <LazyChart spec={chart} testID="chart-cells" />
          {s.cells.length < s.cellCount ? <Text variant="caption" tone="muted">Charts hold the first {s.cells.length} cells; the figures cover all {s.cellCount}.</Text> : null}
        </Card>
      ) : null}

      <Card>
        <Text variant="heading">Per-cell figures</Text>
        <CellTable cells={a.cells} />
      </Card>

      <MatchPanel traceSet={s} canEdit={canEdit} />

      <Card>
        <Text variant="heading">Export</Text>
        <Button label="Download metrics.csv" variant="secondary" icon="download" compact onPress={() => Linking.openURL(metricsCsvUrl(s.id))} style={{ alignSelf: "flex-start" }} testID="export-metrics" />
        <Text variant="caption" tone="muted">One row per cell and scored pulse{s.synthetic ? "; the file starts with a line marking it synthetic" : ""}.</Text>
      </Card>

      {canEdit ? (
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
                Threshold {formatNumber(s.settings.thresholdMolecules)} molecules · background {s.settings.background.mode === "preInput" ? "before first pulse" : s.settings.background.mode === "value" ? `${formatNumber(s.settings.background.value)} units` : "none"} · scale {formatNumber(a.scaleUnitsPerMolecule)} units per molecule · smoothing {s.settings.smoothing.mode === "movingAverage" ? `${s.settings.smoothing.widthFrames} frames` : "none"} · window {formatNumber(s.settings.windowMinutes)} min
              </Text>
              <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
                <Button label="Edit name and preprocessing" variant="secondary" icon="sliders" onPress={() => setEditing(true)} testID="edit-trace-open" />
                {!removal.pending ? <Button label="Delete trace set" variant="secondary" icon="trash-2" busy={del.isPending} onPress={removal.start} testID="delete-trace-set" /> : null}
              </View>
            </>
          )}
        </Card>
      ) : null}
    </Screen>
  );
}
