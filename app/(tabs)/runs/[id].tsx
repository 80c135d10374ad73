import React from "react";
import { Linking, View } from "react-native";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { ProgressBar } from "@/components/ui/progress-bar";
import { StatusBadge } from "@/components/ui/status-badge";
import { SafetyNote } from "@/components/ui/safety-note";
import { DeletedBanner } from "@/components/ui/deleted-banner";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { HeadlineCards } from "@/components/runs/headline-cards";
import { ReproductionCard } from "@/components/runs/reproduction-card";
import { AccelerationCard } from "@/components/runs/acceleration-card";
import { RegimeCard } from "@/components/regimes/regime-card";
import { PulseTable } from "@/components/runs/pulse-table";
import { ShareLinkCard } from "@/components/runs/share-link";
import { ConfirmAction } from "@/components/lab/confirm-action";
import { SettingsBlock } from "@/components/runs/settings-block";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { useReproduceRun } from "@/components/data/bundles";
import { LazyChart } from "@/components/charts/lazy-chart";
import { delayHistogramSpec, filterCurveSpec, meanBandSpec, trajectoriesSpec } from "@/components/charts/specs";
import {
  ACTIVE_STATUSES,
  exportUrl,
  RUN_EXPORTS,
  runSummary,
  useArchiveRun,
  useCancelRun,
  useDeleteRun,
  useLaunchControl,
  useRestoreRun,
  useRun,
  useRunSeries,
  useControlRun,
} from "@/components/data/runs";
import { useCurrentLab } from "@/components/data/current-lab";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { formatCount, formatSeconds } from "@/shared/number-format";
import { isFinishedRunStatus } from "@/shared/schemas/api-runs";

function RunCharts({ runId, finished }: { runId: string; finished: boolean }) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const series = useRunSeries(runId, finished);
  const run = useRun(runId);
  const summary = runSummary(run.data);
  const specs = [
    summary
      ? { key: "filter", title: "Filter curve", term: "filter-curve", spec: filterCurveSpec(summary, t.colors) }
      : null,
    series.data
      ? { key: "trajectories", title: "Sample trajectories", spec: trajectoriesSpec(series.data, t.colors) }
      : null,
    series.data ? { key: "mean", title: "Mean and spread", spec: meanBandSpec(series.data, t.colors) } : null,
    summary
      ? { key: "delays", title: "Response delays", term: "response-delay", spec: delayHistogramSpec(summary, t.colors) }
      : null,
  ].filter(
    (s): s is { key: string; title: string; term?: string; spec: NonNullable<ReturnType<typeof trajectoriesSpec>> } =>
      !!s && !!s.spec,
  );
  return (
    <View style={isWide ? { flexDirection: "row", flexWrap: "wrap", gap: t.spacing.lg } : { gap: t.spacing.lg }}>
      {series.error ? (
        <ErrorState title="Time series could not be loaded" error={series.error} onRetry={() => series.refetch()} />
      ) : null}
      {specs.map((s) => (
        <View key={s.key} style={isWide ? { width: "48%", flexGrow: 1 } : undefined}>
          <Card testID={`chart-card-${s.key}`}>
            <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
              <Text variant="heading">{s.title}</Text>
              {s.term ? <DefinitionLink term={s.term} label={s.title} /> : null}
            </View>
            <LazyChart
              spec={s.spec}
              testID={`chart-${s.key}`}
              source={run.data ? { name: run.data.name, seed: run.data.seed } : undefined}
            />
          </Card>
        </View>
      ))}
      {series.isPending && finished ? <LoadingState label="Loading time series" /> : null}
    </View>
  );
}

export default function RunDetailScreen() {
  const t = useTheme();
  const router = useRouter();
  const { id } = useLocalSearchParams<{ id: string }>();
  const { canEdit, lab } = useCurrentLab();
  const q = useRun(id);
  const reproduce = useReproduceRun();
  const cancel = useCancelRun();
  const archive = useArchiveRun();
  const del = useDeleteRun();
  const restore = useRestoreRun();
  const control = useLaunchControl();
  const controlRun = useControlRun(id).data;
  if (q.isPending)
    return (
      <Screen back={{ href: "/runs", label: "Runs" }} title="Run">
        <LoadingState label="Loading run" />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: "/runs", label: "Runs" }} title="Run">
        <ErrorState title="This run could not be loaded" error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const run = q.data;
  const summary = runSummary(run);
  const active = ACTIVE_STATUSES.has(run.status);
  const hasResults = isFinishedRunStatus(run.status);
  const p = run.progress;
  return (
    <Screen
      back={{ href: "/runs", label: "Runs" }}
      title={run.name}
      subtitle={`${run.circuitName} · ${run.programName}`}
      actions={
        <>
          {active && canEdit ? (
            <ConfirmAction
              label="Cancel run"
              icon="x-circle"
              question={`Cancel ${run.name}? The ${formatCount(p.replicatesDone)} replicates done so far are discarded.`}
              confirmLabel="Cancel the run"
              busy={cancel.isPending}
              onConfirm={() => cancel.mutate(run.id)}
              testID="cancel-run"
            />
          ) : null}
          {hasResults ? (
            <Button
              label="Compare"
              variant="secondary"
              icon="columns"
              href={`/compare?ids=${[run.id, controlRun?.id].filter(Boolean).join(",")}`}
              testID="compare-run"
            />
          ) : null}
          {hasResults && canEdit ? (
            <Button
              label="Reproduce"
              variant="secondary"
              icon="repeat"
              busy={reproduce.isPending}
              onPress={() => reproduce.mutate(run.id, { onSuccess: (r) => router.push(`/runs/${r.id}`) })}
              testID="reproduce-run"
            />
          ) : null}
        </>
      }
    >
      {run.deletedAt ? (
        <DeletedBanner what="run" busy={restore.isPending} onUndo={() => restore.mutate(run.id)} />
      ) : null}
      <Card testID="run-status">
        <View
          style={{
            flexDirection: "row",
            justifyContent: "space-between",
            alignItems: "center",
            gap: t.spacing.sm,
            flexWrap: "wrap",
          }}
        >
          <StatusBadge status={run.status} />
          <Text variant="caption" tone="muted">
            seed {run.seed} · engine {run.engineVersion}
          </Text>
        </View>
        <ProgressBar
          value={run.status === "finished" ? 1 : p.fraction}
          label={`Progress of ${run.name}`}
          color={t.colors.status[run.status]}
        />
        <Text variant="caption" tone="muted">
          {formatCount(p.replicatesDone)} of {formatCount(p.replicates)} replicates
          {active && p.secondsLeft !== null ? ` · about ${formatSeconds(p.secondsLeft)} left` : ""}
          {run.statusReason ? ` · ${run.statusReason}` : ""}
        </Text>
      </Card>
      {run.history.length ? (
        <Card testID="run-history">
          <Text variant="heading">History</Text>
          {run.history.map((h, i) => (
            <Text key={`${h.action}-${i}`} variant="caption" tone="muted">
              {`${h.words} · ${new Date(h.at).toLocaleString("en")}`}
            </Text>
          ))}
        </Card>
      ) : null}
      {run.reproduction ? <ReproductionCard reproduction={run.reproduction} /> : null}
      {reproduce.error ? <ErrorState title="The reproduction could not be started" error={reproduce.error} /> : null}
      <SafetyNote />
      <SettingsBlock settings={run.settings} spec={run.spec} />
      {summary ? (
        <>
          <Text variant="heading">Headline figures</Text>
          <HeadlineCards summary={summary} circuit={run.spec.circuit} />
        </>
      ) : active ? (
        <Text tone="muted">Figures appear when the run finishes.</Text>
      ) : null}
      {run.regime ? <RegimeCard regime={run.regime} /> : null}
      {run.acceleration ? <AccelerationCard acceleration={run.acceleration} runId={run.id} /> : null}
      {hasResults ? <RunCharts runId={run.id} finished={hasResults} /> : null}
      {hasResults ? (
        <Card>
          <Text variant="heading">Per-replicate figures</Text>
          <PulseTable runId={run.id} durations={(summary?.byDuration ?? []).map((d) => d.duration)} />
        </Card>
      ) : null}
      {hasResults ? (
        <Card>
          <Text variant="heading">Export</Text>
          <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
            {RUN_EXPORTS.map((f) => (
              <Button
                key={f}
                label={`Download ${f}`}
                variant="secondary"
                icon="download"
                compact
                onPress={() => Linking.openURL(exportUrl(run.id, f))}
              />
            ))}
          </View>
          <Text variant="caption" tone="muted">
            The bundle holds the circuit version, program, settings and seed, so anyone can reproduce the run exactly.
          </Text>
        </Card>
      ) : null}
      <ShareLinkCard runId={run.id} labName={lab?.name} canEdit={canEdit} />
      {canEdit ? (
        <Card>
          <Text variant="heading">More</Text>
          <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
            {hasResults && !run.controlOf ? (
              controlRun ? (
                <Button
                  label="Open the matched control"
                  variant="secondary"
                  icon="git-branch"
                  href={`/runs/${controlRun.id}`}
                />
              ) : (
                <Button
                  label="Run a matched simple-regulation control"
                  variant="secondary"
                  icon="git-branch"
                  busy={control.isPending}
                  onPress={() => control.mutate(run.id, { onSuccess: (c) => router.push(`/runs/${c.id}`) })}
                />
              )
            ) : null}
            {!active ? (
              <Button
                label={run.archived ? "Archived" : "Archive"}
                variant="secondary"
                icon="archive"
                disabled={run.archived}
                busy={archive.isPending}
                onPress={() => archive.mutate(run.id)}
              />
            ) : null}
            {!active && !run.deletedAt ? (
              <Button
                label="Delete"
                variant="secondary"
                icon="trash-2"
                busy={del.isPending}
                onPress={() => del.mutate(run.id)}
              />
            ) : null}
          </View>
          {control.error || archive.error || del.error || cancel.error ? (
            <ErrorState error={control.error ?? archive.error ?? del.error ?? cancel.error} />
          ) : null}
        </Card>
      ) : null}
    </Screen>
  );
}
