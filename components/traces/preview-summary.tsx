import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { StatCard } from "@/components/ui/stat-card";
import { Banner } from "@/components/ui/states";
import { LazyChart } from "@/components/charts/lazy-chart";
import { formatCount, formatNumber, formatQuantity } from "@/shared/number-format";
import { cellsOverScheduleSpec } from "./trace-specs";
import { median } from "./median";
import type { TracePreview } from "@/shared/schemas/api-traces";

const CARD = { flexGrow: 1, flexBasis: 140, minWidth: 130 } as const;

const LAYOUT = { long: "long (one row per cell and time)", wide: "wide (one column per cell)" } as const;
const DELIM = { comma: "commas", tab: "tabs", semicolon: "semicolons" } as const;

/** What the server found in a file: cells, rows, span, schedule, warnings and a sample chart. */
export function PreviewSummary({ preview, stale }: { preview: TracePreview; stale?: boolean }) {
  const t = useTheme();
  const a = preview.analysis;
  const s = a.summary;
  const chart = cellsOverScheduleSpec(preview.sample, preview.schedule, t.colors, {
    thresholdTraceUnits: median(a.cells.map((c) => c.thresholdTraceUnits)),
    title: "First cells of the file over the input schedule",
  });
  const passed = s.analysis.counts.passed;
  const evaluable = s.analysis.counts.evaluable;
  return (
    <Card testID="upload-preview-result">
      <Text variant="heading">Preview{preview.fileName ? ` of ${preview.fileName}` : ""}</Text>
      {stale ? (
        <Banner tone="notice">
          You changed the file or the settings after this preview; preview again to update it.
        </Banner>
      ) : null}
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
        <StatCard style={CARD} testID="preview-cells" label="Cells found" value={formatCount(preview.cellCount)} />
        <StatCard style={CARD} testID="preview-rows" label="Data rows" value={formatCount(preview.rows)} />
        <StatCard
          style={CARD}
          label="Input pulses"
          value={formatCount(preview.schedule.length)}
          detail={`${formatNumber(preview.timeRangeMinutes[0])}–${formatQuantity(preview.timeRangeMinutes[1], "min")}`}
        />
        <StatCard
          style={CARD}
          label="Pulses passed"
          value={`${passed} of ${evaluable}`}
          detail={`cell × pulse pairs · ${s.skippedNotCovered} not watched whole`}
        />
      </View>
      <Text variant="caption" tone="muted">
        Read as {LAYOUT[preview.layout]}, separated by {DELIM[preview.delimiter]}, times in {preview.timeUnit} (shown in
        minutes). Frame interval {formatQuantity(a.frameIntervalMinutes, "min")}. Scale: {a.scaleNote}
      </Text>
      {preview.warnings.length ? (
        <Banner tone="notice" testID="preview-warnings">
          <View style={{ gap: t.spacing.xs }}>
            {preview.warnings.map((w) => (
              <Text key={w} variant="caption" style={{ color: t.colors.onNoticeSoft }}>
                • {w}
              </Text>
            ))}
          </View>
        </Banner>
      ) : null}
      {preview.schedule.length === 0 ? (
        <Banner tone="notice">
          No input pulse was found, so no pulse can be scored. Check the schedule column or program.
        </Banner>
      ) : null}
      {chart ? <LazyChart spec={chart} testID="chart-preview" /> : null}
    </Card>
  );
}
