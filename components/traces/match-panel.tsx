/**
 * Match a trace set against a finished run or a sweep of the lab: choose the
 * target and the tolerance (fixed before any distance is computed; default
 * the closest 5% of points), run, and read the result. Earlier matches of the
 * set can be reopened. A sweep with no finished point (say, cancelled before
 * any point finished) is not offered: there is nothing to match against, and
 * the server would refuse it (409 sweep_not_finished); a line names it instead.
 */
import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { parseNumber } from "@/components/forms/zod-errors";
import { useRuns, useRunsByIds } from "@/components/data/runs";
import { LoadMore } from "@/components/ui/load-more";
import { useSweepNames, useSweeps } from "@/components/data/sweeps";
import { useMatch, useRunMatch, type TraceSetDetail } from "@/components/data/traces";
import { MatchResultView } from "./match-result";
import type { MatchRequest } from "@/shared/schemas/api-traces";
import { isFinishedRunStatus } from "@/shared/schemas/api-runs";
import { formatNumber } from "@/shared/number-format";
import { sweepProgress } from "@/components/sweeps/sweep-progress";

export type MatchFormValues = {
  target: "run" | "sweep";
  runId: string;
  sweepId: string;
  toleranceKind: "fraction" | "distance";
  percent: string;
  distance: string;
};

/** Checks the match form; returns the request or field messages. */
export function matchRequestOf(v: MatchFormValues): {
  request: MatchRequest | null;
  errors: Partial<Record<keyof MatchFormValues, string>>;
} {
  const errors: Partial<Record<keyof MatchFormValues, string>> = {};
  if (v.target === "run" && !v.runId) errors.runId = "Choose a finished run.";
  if (v.target === "sweep" && !v.sweepId) errors.sweepId = "Choose a sweep.";
  const pct = parseNumber(v.percent);
  const dist = parseNumber(v.distance);
  if (v.toleranceKind === "fraction" && !(pct > 0 && pct <= 100))
    errors.percent = "Enter a percentage above 0 and at most 100.";
  if (v.toleranceKind === "distance" && !(dist >= 0 && dist <= 3))
    errors.distance = "Enter a combined distance from 0 to 3.";
  if (Object.keys(errors).length) return { request: null, errors };
  const tolerance =
    v.toleranceKind === "fraction"
      ? { kind: "fraction" as const, fraction: pct / 100 }
      : { kind: "distance" as const, distance: dist };
  return { request: v.target === "run" ? { runId: v.runId, tolerance } : { sweepId: v.sweepId, tolerance }, errors };
}

function ShownMatch({ id, names }: { id: string; names: Map<string, string> }) {
  const q = useMatch(id);
  if (q.isPending) return <LoadingState label="Loading the match" />;
  if (q.error) return <ErrorState title="This match could not be loaded" error={q.error} onRetry={() => q.refetch()} />;
  const target = q.data.runId ?? q.data.sweepId ?? "";
  return <MatchResultView match={q.data} targetName={names.get(target)} />;
}

export function MatchPanel({ traceSet, canEdit }: { traceSet: TraceSetDetail; canEdit: boolean }) {
  const t = useTheme();
  const runs = useRuns();
  const sweeps = useSweeps();
  const match = useRunMatch(traceSet.id);
  const [v, setV] = useState<MatchFormValues>({
    target: "run",
    runId: "",
    sweepId: "",
    toleranceKind: "fraction",
    percent: "5",
    distance: "0.5",
  });
  const [showErrors, setShowErrors] = useState(false);
  const [shownId, setShownId] = useState<string | null>(traceSet.matches[0]?.id ?? null);
  const set = <K extends keyof MatchFormValues>(k: K, value: MatchFormValues[K]) => setV((s) => ({ ...s, [k]: value }));

  const finishedRuns = (runs.data ?? []).filter((r) => isFinishedRunStatus(r.status) && !r.sweepId);
  const pendingRuns = (runs.data ?? []).filter((r) => (r.status === "running" || r.status === "queued") && !r.sweepId);
  const sweepList = sweeps.data ?? [];
  const matchableSweeps = sweepList.filter((s) => s.pointsFinished > 0);
  const unmatchableSweeps = sweepList.filter((s) => s.pointsFinished === 0);
  // Names of the runs shown matches were against, wherever they are in the paged list.
  const matchedRuns = useRunsByIds(traceSet.matches.flatMap((m) => (m.runId ? [m.runId] : [])));
  // ...and of the sweeps they were against (the earlier matches shown and the one open), loaded or not.
  const matchedSweeps = useSweepNames(
    traceSet.matches
      .filter((m, i) => i < 8 || m.id === shownId)
      .flatMap((m) => (m.sweepId && !sweepList.some((s) => s.id === m.sweepId) ? [m.sweepId] : [])),
  );
  const names = new Map<string, string>([
    ...[...matchedRuns.byId.values()].map((r) => [r.id, r.name] as const),
    ...(runs.data ?? []).map((r) => [r.id, r.name] as const),
    ...sweepList.map((s) => [s.id, s.name] as const),
    ...matchedSweeps,
  ]);
  const { request, errors } = matchRequestOf(v);
  const err = (k: keyof MatchFormValues) => (showErrors ? errors[k] : undefined);
  const run = () => {
    setShowErrors(true);
    if (!request) return;
    match.mutate(request, { onSuccess: (m) => setShownId(m.id) });
  };

  return (
    <Card testID="match-panel">
      <Text variant="heading">Match against simulations</Text>
      <Text variant="caption" tone="muted">
        Compares the spread of pass, response delay and pulse width of these cells with a finished run, or with every
        finished point of a sweep (then the closest points form the accept set). Use runs with the same threshold (
        {formatThreshold(traceSet.settings.thresholdMolecules)} molecules) and input schedule.
      </Text>
      {canEdit ? (
        <View style={{ gap: t.spacing.md }}>
          <Choice
            label="Match against"
            testID="match-target"
            value={v.target}
            options={[
              { value: "run", label: "A finished run" },
              { value: "sweep", label: "A sweep" },
            ]}
            onChange={(x) => set("target", x)}
          />
          {v.target === "run" ? (
            runs.isPending ? (
              <LoadingState label="Loading runs" />
            ) : runs.error ? (
              <ErrorState error={runs.error} onRetry={() => runs.refetch()} />
            ) : finishedRuns.length ? (
              <Choice
                label="Run"
                testID="match-run"
                value={v.runId}
                options={finishedRuns.map((r) => ({ value: r.id, label: r.name }))}
                onChange={(x) => set("runId", x)}
              />
            ) : (
              <Text tone="muted">
                {runs.hasMore ? "No finished run among the runs loaded so far" : "No finished run in this lab yet"}
                {pendingRuns.length ? ` (${pendingRuns.length} still running)` : ""}.
              </Text>
            )
          ) : sweeps.isPending ? (
            <LoadingState label="Loading sweeps" />
          ) : sweeps.error ? (
            <ErrorState error={sweeps.error} onRetry={() => sweeps.refetch()} />
          ) : matchableSweeps.length ? (
            <Choice
              label="Sweep"
              testID="match-sweep"
              value={v.sweepId}
              options={matchableSweeps.map((s) => ({
                value: s.id,
                label: `${s.name} (${sweepProgress(s).caption})`,
              }))}
              onChange={(x) => set("sweepId", x)}
            />
          ) : (
            <Text tone="muted">
              {!sweepList.length
                ? "No sweep in this lab yet."
                : sweeps.hasMore
                  ? "No sweep with a finished point among the sweeps loaded so far."
                  : "No sweep with a finished point in this lab yet."}
            </Text>
          )}
          {v.target === "sweep" && unmatchableSweeps.length ? (
            <Text variant="caption" tone="muted" testID="match-sweeps-unmatchable">
              {`Not listed, with no finished point to match against: ${unmatchableSweeps.map((s) => s.name).join(", ")}.`}
            </Text>
          ) : null}
          {v.target === "run" && runs.data ? <LoadMore list={runs} noun="runs" testID="match-runs-more" /> : null}
          {v.target === "sweep" && sweeps.data ? (
            <LoadMore list={sweeps} noun="sweeps" testID="match-sweeps-more" />
          ) : null}
          {err("runId") || err("sweepId") ? (
            <Text variant="caption" tone="danger" role="alert">
              {err("runId") ?? err("sweepId")}
            </Text>
          ) : null}
          <Choice
            label="Tolerance (fixed before matching)"
            testID="match-tolerance"
            value={v.toleranceKind}
            options={[
              { value: "fraction", label: "Closest share of points" },
              { value: "distance", label: "Distance cut-off" },
            ]}
            onChange={(x) => set("toleranceKind", x)}
          />
          {v.toleranceKind === "fraction" ? (
            <Field
              label="Accept the closest"
              unit="% of points"
              value={v.percent}
              onChangeText={(x) => set("percent", x)}
              error={err("percent")}
              keyboardType="decimal-pad"
              hint="At least one point is always accepted."
              testID="match-percent"
            />
          ) : (
            <Field
              label="Accept points with combined distance at most"
              unit="0 to 3"
              value={v.distance}
              onChangeText={(x) => set("distance", x)}
              error={err("distance")}
              keyboardType="decimal-pad"
              testID="match-distance"
            />
          )}
          <Button
            label="Run the match"
            icon="crosshair"
            busy={match.isPending}
            onPress={run}
            style={{ alignSelf: "flex-start" }}
            testID="match-run-button"
          />
          {match.error ? <ErrorState title="The match could not be run" error={match.error} /> : null}
        </View>
      ) : null}
      {traceSet.matches.length > 1 || (traceSet.matches.length === 1 && shownId !== traceSet.matches[0].id) ? (
        <View style={{ gap: t.spacing.xs }}>
          <Text variant="label">Earlier matches</Text>
          <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
            {traceSet.matches.slice(0, 8).map((m) => (
              <Button
                key={m.id}
                compact
                variant={m.id === shownId ? "primary" : "secondary"}
                label={`${names.get(m.runId ?? m.sweepId ?? "") ?? (m.sweepId ? "Sweep" : "Run")} · ${new Date(m.createdAt).toLocaleDateString("en-GB", { day: "numeric", month: "short" })}`}
                accessibilityLabel={`Show the match against ${names.get(m.runId ?? m.sweepId ?? "") ?? "a simulation"} from ${new Date(m.createdAt).toLocaleString("en-GB")}`}
                onPress={() => setShownId(m.id)}
              />
            ))}
          </View>
        </View>
      ) : null}
      {shownId ? <ShownMatch id={shownId} names={names} /> : null}
    </Card>
  );
}

function formatThreshold(x: number): string {
  return formatNumber(x, 4);
}
