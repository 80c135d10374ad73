import React, { useState } from "react";
import { View } from "react-native";
import { useLocalSearchParams } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { PressableLink } from "@/components/ui/pressable-link";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { ProgressBar } from "@/components/ui/progress-bar";
import { StatusBadge, statusLabel } from "@/components/ui/status-badge";
import { SafetyNote } from "@/components/ui/safety-note";
import { Banner, ErrorState, LoadingState } from "@/components/ui/states";
import { LazyChart } from "@/components/charts/lazy-chart";
import type { ChartSpec } from "@/components/charts/chart-spec";
import { formatSweepFigure, sweepLineSpec } from "@/components/charts/specs";
import { formatCount, formatNumber } from "@/shared/number-format";
import { ConfirmAction } from "@/components/lab/confirm-action";
import {
  useCancelSweep,
  useDeleteSweep,
  useRestoreSweep,
  useResumeSweep,
  useSweep,
  type SweepDetail,
} from "@/components/data/sweeps";
import { useCurrentLab } from "@/components/data/current-lab";
import { DeletedBanner } from "@/components/ui/deleted-banner";
import { useTheme } from "@/components/theme/use-theme";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { RegimeMaps } from "@/components/sweeps/regime-map";
import { sweepProgress } from "@/components/sweeps/sweep-progress";
import { TargetPanel } from "@/components/regimes/target-panel";
import { useRefineSweep } from "@/components/data/regime-maps";
import { ApiError } from "@/components/data/api";
import { API_LIMITS } from "@/shared/limits";
import type { TargetAnswer } from "@/shared/schemas/api-regime-maps";
import { isFinishedRunStatus } from "@/shared/schemas/api-runs";

type Figure = "d50" | "falsePassRate" | "medianDelay" | "peak" | "fano";
const FIGURES: { value: Figure; label: string }[] = [
  { value: "d50", label: "d50 (min)" },
  { value: "falsePassRate", label: "False-pass rate" },
  { value: "medianDelay", label: "Median delay (min)" },
  { value: "peak", label: "Median peak" },
  { value: "fano", label: "Fano factor" },
];

/** The definitions-page entry of each sweep figure. */
const FIGURE_TERMS: Record<Figure, string> = {
  d50: "d50",
  falsePassRate: "false-pass-rate",
  medianDelay: "response-delay",
  peak: "fwhm",
  fano: "fano",
};

function figureOf(p: SweepDetail["points"][number], f: Figure): number | null {
  return p.figures ? (p.figures[f] as number | null) : null;
}

export default function SweepDetailScreen() {
  const t = useTheme();
  const { id } = useLocalSearchParams<{ id: string }>();
  // Deleted on the server (restorable for the undo period): the sweep stays on screen with Undo; it answers 404 meanwhile.
  const [deleted, setDeleted] = useState(false);
  const q = useSweep(id, { paused: deleted });
  const cancel = useCancelSweep();
  const resume = useResumeSweep();
  const del = useDeleteSweep();
  const restore = useRestoreSweep();
  const { canEdit } = useCurrentLab();
  const [figure, setFigure] = useState<Figure>("d50");
  const [target, setTarget] = useState<TargetAnswer | null>(null);
  const refine = useRefineSweep();
  const bp = useBreakpoints();
  if (q.isPending)
    return (
      <Screen back={{ href: "/sweeps", label: "Sweeps" }} title="Sweep">
        <LoadingState />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: "/sweeps", label: "Sweeps" }} title="Sweep">
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const s = q.data;
  const active = s.status === "queued" || s.status === "running";
  // pointsDone counts every point that ended (cancelled and failed ones too); finished ones from the points' statuses
  const finishedPoints = s.points.filter((p) => isFinishedRunStatus(p.status)).length;
  const progress = sweepProgress({ ...s, pointsFinished: finishedPoints });
  const figLabel = FIGURES.find((f) => f.value === figure)!.label;
  const [ax, ay] = s.axes;
  const chart: ChartSpec | null =
    s.axes.length === 1 ? sweepLineSpec(ax.parameter, ax.values, s.points, figure, figLabel, t.colors) : null;
  const chartEmpty = s.axes.length === 1 && chart === null;
  const vals = s.points.map((p) => figureOf(p, figure)).filter((v): v is number => v !== null);
  const lo = Math.min(...vals),
    hi = Math.max(...vals);
  const shade = (v: number | null) => {
    if (v === null || !vals.length) return t.colors.surfaceAlt;
    // Blend from the soft tint half-way to the primary colour, so dark text stays above 4.5:1 on every cell.
    const f = 0.5 * (hi > lo ? (v - lo) / (hi - lo) : 0.5);
    const a = [0xd4, 0xed, 0xe5],
      b = [0x0a, 0x65, 0x52];
    return `rgb(${a.map((c, i) => Math.round(c + (b[i] - c) * f)).join(",")})`;
  };
  return (
    <Screen
      back={{ href: "/sweeps", label: "Sweeps" }}
      title={s.name}
      actions={
        canEdit && !deleted ? (
          active ? (
            <ConfirmAction
              label="Cancel sweep"
              icon="x-circle"
              question={`Cancel ${s.name}? The ${formatCount(finishedPoints)} finished points and the replicates stored so far are kept; Resume sweep goes on with the other ${formatCount(s.pointCount - finishedPoints)} later.`}
              confirmLabel="Cancel the sweep"
              busy={cancel.isPending}
              onConfirm={() => cancel.mutate(s.id)}
              testID="cancel-sweep"
            />
          ) : s.status === "cancelled" || s.status === "failed" ? (
            <Button
              label="Resume sweep"
              variant="secondary"
              compact
              icon="play"
              onPress={() => resume.mutate(s.id)}
              busy={resume.isPending}
              testID="resume-sweep"
            />
          ) : null
        ) : null
      }
    >
      <Card>
        <StatusBadge status={s.status} />
        <ProgressBar value={progress.fraction} label={`Progress of ${s.name}`} />
        <Text variant="caption" tone="muted">
          {progress.caption} · {formatCount(s.replicatesPerPoint)} replicates each
        </Text>
      </Card>
      <SafetyNote />
      {deleted ? (
        <DeletedBanner
          what="sweep"
          busy={restore.isPending}
          onUndo={() => restore.mutate(s.id, { onSuccess: () => setDeleted(false) })}
          back={{ label: "Back to sweeps", href: "/sweeps" }}
          testID="sweep-deleted"
        />
      ) : null}
      {del.error ? <ErrorState title="The sweep could not be deleted" error={del.error} /> : null}
      {restore.error ? <ErrorState title="The sweep could not be restored" error={restore.error} /> : null}
      <Card>
        <RegimeMaps
          sweep={s}
          wide={bp.isWide}
          meets={target ? new Map(target.points.map((p) => [p.index, p.meets])) : undefined}
        />
        {canEdit && !deleted ? (
          <View style={{ gap: t.spacing.xs }}>
            <Button
              label="Refine boundaries"
              variant="secondary"
              icon="grid"
              onPress={() => refine.mutate(s.id)}
              busy={refine.isPending}
              testID="refine-sweep"
            />
            <Text variant="caption" tone="muted">
              Adds a point half-way between neighbours whose labels differ, each seeded by its own coordinates (at most{" "}
              {API_LIMITS.maxRefinementPoints} in all; {s.points.filter((p) => p.refined).length} so far).
            </Text>
            <DefinitionLink term="boundary-refinement" label="Boundary refinement" />
            {refine.error instanceof ApiError ? <Banner tone="notice">{refine.error.message}</Banner> : null}
          </View>
        ) : null}
      </Card>
      <Card>
        <TargetPanel kind="sweeps" id={s.id} pulses onAnswer={setTarget} />
      </Card>
      <Choice label="Figure" value={figure} options={FIGURES} onChange={setFigure} />
      <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
        <Text variant="caption" tone="muted">
          {figLabel}:
        </Text>
        <DefinitionLink term={FIGURE_TERMS[figure]} label={figLabel} />
      </View>
      {chart ? (
        <Card>
          <LazyChart spec={chart} testID="sweep-chart" source={{ name: s.name, seed: s.seed ?? null }} />
        </Card>
      ) : chartEmpty ? (
        <Card testID="sweep-chart-empty">
          <Text tone="muted">
            No point has a {figLabel} value{active ? " yet" : ""}. Choose another figure.
          </Text>
        </Card>
      ) : null}
      {s.axes.length === 2 ? (
        <Card>
          <Text variant="heading">
            {figLabel}: {ax.parameter} (rows) × {ay.parameter} (columns)
          </Text>
          <Text variant="caption" tone="muted">
            Darker is higher ({formatSweepFigure(figure, lo)} to {formatSweepFigure(figure, hi)}). A dash is a point
            without a value. Tap a cell to open its run.
          </Text>
          {ax.values.map((xv, i) => (
            <View key={i} style={{ flexDirection: "row", gap: 2, alignItems: "center" }}>
              <Text variant="caption" style={{ width: 64 }}>
                {formatNumber(xv)}
              </Text>
              {ay.values.map((yv, j) => {
                const p = s.points.find((pt) => pt.index === i * ay.values.length + j);
                const v = p ? figureOf(p, figure) : null;
                const label = `${ax.parameter} ${formatNumber(xv)}, ${ay.parameter} ${formatNumber(yv)}: ${
                  v === null
                    ? `no value (${p?.figures?.reasons?.[figure] ?? (p?.figures ? "not estimable" : "no results yet")})`
                    : formatSweepFigure(figure, v)
                }`;
                const cellStyle = {
                  flex: 1,
                  minWidth: MIN_TOUCH,
                  minHeight: MIN_TOUCH,
                  backgroundColor: shade(v),
                  alignItems: "center",
                  justifyContent: "center",
                  borderRadius: 4,
                } as const;
                const value = (
                  <Text variant="caption" style={{ color: "#17211D" }}>
                    {formatNumber(v, 2)}
                  </Text>
                );
                return p ? (
                  <PressableLink
                    key={j}
                    href={`/runs/${p.runId}`}
                    accessibilityLabel={label}
                    aria-label={label}
                    style={cellStyle}
                  >
                    {value}
                  </PressableLink>
                ) : (
                  <View key={j} aria-label={label} role="img" style={cellStyle}>
                    {value}
                  </View>
                );
              })}
            </View>
          ))}
        </Card>
      ) : null}
      <Card>
        <Text variant="heading">Points</Text>
        {s.points.map((p) => (
          <Card key={p.index} href={`/runs/${p.runId}`} style={{ padding: t.spacing.md }}>
            <Text variant="bodyStrong">
              {Object.entries(p.values)
                .map(([k, v]) => `${k} = ${formatNumber(v)}`)
                .join(", ")}
            </Text>
            <Text variant="caption" tone="muted">
              {statusLabel(p.status)} · {figLabel}:{" "}
              {figureOf(p, figure) === null && p.figures
                ? `no value (${p.figures.reasons?.[figure] ?? "not estimable"})`
                : formatSweepFigure(figure, figureOf(p, figure))}
            </Text>
          </Card>
        ))}
      </Card>
      {canEdit && !deleted ? (
        <Card>
          <Button
            label="Delete sweep"
            variant="secondary"
            icon="trash-2"
            busy={del.isPending}
            onPress={() => del.mutate(s.id, { onSuccess: () => setDeleted(true) })}
            style={{ alignSelf: "flex-start" }}
            testID="delete-sweep"
          />
          <Text variant="caption" tone="muted">
            Its {s.pointCount} point runs go with it{active ? " (the ones computing are cancelled)" : ""}. It can be
            restored for {API_LIMITS.undoDays} days, then it is purged.
          </Text>
        </Card>
      ) : null}
    </Screen>
  );
}
