import React from "react";
import { View } from "react-native";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Checkbox } from "@/components/ui/checkbox";
import { SafetyNote } from "@/components/ui/safety-note";
import { StatCard } from "@/components/ui/stat-card";
import { PressableLink } from "@/components/ui/pressable-link";
import { runDateLabel } from "@/components/ui/run-row";
import { Banner, EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { LazyChart } from "@/components/charts/lazy-chart";
import { compareDelaySpec, compareFilterSpec } from "@/components/charts/specs";
import {
  formatCount,
  formatInterval,
  formatPValue,
  formatProbability,
  formatQuantity,
  formatReached,
} from "@/shared/number-format";
import { useComparison, useRuns, useRunsByIds } from "@/components/data/runs";
import { LoadMore } from "@/components/ui/load-more";
import { useTheme } from "@/components/theme/use-theme";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import type { Comparison, ComparisonPair } from "@/shared/schemas/analysis";
import { isFinishedRunStatus } from "@/shared/schemas/api-runs";

const pct = (p: number | null) => formatProbability(p);
const pval = (p: number) => formatPValue(p);

/** A pair's tests in plain words. */
export function pairSentences(cmp: Comparison, pair: ComparisonPair): string[] {
  const name = (id: string) => cmp.runs.find((r) => r.id === id)?.name ?? id;
  const a = name(pair.a);
  const b = name(pair.b);
  // The server states its findings in plain words; use them when present.
  if (pair.flags.length) return pair.flags;
  const out: string[] = [];
  const d = pair.delays;
  if (d.withinNoise === null) out.push(`Response delays of ${a} and ${b} could not be tested (too few responses).`);
  else if (d.withinNoise)
    out.push(
      `Response delays of ${a} and ${b} do not differ beyond noise (Kolmogorov-Smirnov and Mann-Whitney, Holm-adjusted, both p ≥ 0.05).`,
    );
  else
    out.push(
      `Response delays differ` +
        (d.medianA !== null && d.medianB !== null
          ? `: median ${formatQuantity(d.medianA, "min")} for ${a} against ${formatQuantity(d.medianB, "min")} for ${b}`
          : ` between ${a} and ${b}`) +
        (d.mannWhitney ? ` (Mann-Whitney ${pval(d.mannWhitney.pHolm)} after Holm adjustment).` : "."),
    );
  const w = pair.widths;
  if (w.withinNoise === false)
    out.push(
      `Output pulse widths differ: median ${formatQuantity(w.medianA, "min")} against ${formatQuantity(w.medianB, "min")}.`,
    );
  const diffs = pair.passDifferences.filter((p) => !p.withinNoise);
  if (diffs.length === 0 && pair.passDifferences.length)
    out.push(`Pass probabilities do not differ beyond noise at any duration (Fisher's exact test, Holm-adjusted).`);
  for (const p of diffs)
    out.push(
      `At ${formatQuantity(p.duration, "min")}, ${a} passes ${pct(p.passProbabilityA)} of pulses against ${pct(p.passProbabilityB)} for ${b} (Fisher ${pval(p.pHolm)}, Holm-adjusted).`,
    );
  return out;
}

function ComparisonView({ ids }: { ids: string[] }) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const q = useComparison(ids);
  if (q.isPending) return <LoadingState label="Comparing runs" />;
  if (q.error)
    return <ErrorState title="The comparison could not be made" error={q.error} onRetry={() => q.refetch()} />;
  const cmp = q.data;
  const filter = compareFilterSpec(cmp, t.colors);
  const delays = compareDelaySpec(cmp, t.colors);
  const source = { name: `Comparison of ${cmp.runs.map((r) => r.name).join(", ")}` };
  return (
    <View style={{ gap: t.spacing.lg }} testID="comparison">
      {cmp.settingsWarnings.length ? (
        <Banner tone="notice" testID="compare-settings-warning">
          <View style={{ gap: t.spacing.xs }}>
            <Text variant="bodyStrong" style={{ color: t.colors.onNoticeSoft }}>
              These runs were not measured the same way
            </Text>
            {cmp.settingsWarnings.map((w) => (
              <Text key={w} style={{ color: t.colors.onNoticeSoft }}>
                • {w}
              </Text>
            ))}
          </View>
        </Banner>
      ) : null}
      <SafetyNote />
      <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.md }}>
        {cmp.runs.map((r, k) => (
          <View key={r.id} style={{ flex: isWide ? 1 : undefined, gap: t.spacing.sm }}>
            <View style={{ flexDirection: "row", alignItems: "center", gap: t.spacing.sm }}>
              <View style={{ width: 12, height: 12, borderRadius: 6, backgroundColor: t.colors.series[k] }} />
              <PressableLink
                href={`/runs/${r.id}`}
                accessibilityLabel={`Open ${r.name}`}
                aria-label={`Open ${r.name}`}
                style={{ flexShrink: 1, minHeight: 44, justifyContent: "center" }}
              >
                <Text variant="bodyStrong" tone="primary">
                  {r.name}
                </Text>
              </PressableLink>
            </View>
            <StatCard
              label="d50"
              value={r.headline.d50 === null ? "no number" : `${formatQuantity(r.headline.d50, "min")}`}
              detail={
                r.headline.d50 === null
                  ? (r.headline.d50Note ?? "not estimable")
                  : formatInterval(r.headline.d50Ci, "min")
              }
              extra={<DefinitionLink term="d50" />}
            />
            <StatCard
              label="Median delay"
              value={formatReached(r.headline.medianDelay, "min")}
              detail={r.headline.medianDelay === null ? undefined : formatInterval(r.headline.medianDelayCi, "min")}
              extra={<DefinitionLink term="response-delay" />}
            />
            <StatCard
              label="False-pass rate"
              value={pct(r.headline.falsePassRate)}
              detail="pulses shorter than the noise duration that passed"
              extra={<DefinitionLink term="false-pass-rate" />}
            />
            <StatCard
              label="Pulses passed"
              value={`${formatCount(r.headline.passed)} of ${formatCount(r.headline.evaluable)}`}
              detail="every evaluable pulse, all durations"
              extra={<DefinitionLink term="pass" />}
            />
            <StatCard
              label="Delay paid for long pulses"
              value={formatReached(r.headline.delayCostMedian, "min")}
              extra={<DefinitionLink term="delay-cost" />}
            />
          </View>
        ))}
      </View>
      <View style={isWide ? { flexDirection: "row", flexWrap: "wrap", gap: t.spacing.lg } : { gap: t.spacing.lg }}>
        <View style={isWide ? { width: "48%", flexGrow: 1 } : undefined}>
          <Card testID="chart-card-compare-filter">
            <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
              <Text variant="heading">Filter curves</Text>
              <DefinitionLink term="filter-curve" label="filter curve" />
            </View>
            <LazyChart spec={filter} testID="chart-compare-filter" source={source} />
          </Card>
        </View>
        {delays ? (
          <View style={isWide ? { width: "48%", flexGrow: 1 } : undefined}>
            <Card>
              <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
                <Text variant="heading">Response delays</Text>
                <DefinitionLink term="response-delay" label="response delay" />
              </View>
              <LazyChart spec={delays} testID="chart-compare-delays" source={source} />
            </Card>
          </View>
        ) : null}
      </View>
      <Card testID="comparison-tests">
        <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
          <Text variant="heading">What the tests say</Text>
          <DefinitionLink term="within-noise" label="within noise" />
        </View>
        {cmp.pairs.map((p) => (
          <View key={`${p.a}-${p.b}`} style={{ gap: t.spacing.xs }} testID="comparison-pair">
            {cmp.pairs.length > 1 ? (
              <Text variant="label">
                {cmp.runs.find((r) => r.id === p.a)?.name} and {cmp.runs.find((r) => r.id === p.b)?.name}
              </Text>
            ) : null}
            {pairSentences(cmp, p).map((s) => (
              <Text key={s}>• {s}</Text>
            ))}
          </View>
        ))}
        <Text variant="caption" tone="muted">
          {cmp.method}
        </Text>
      </Card>
    </View>
  );
}

export default function Compare() {
  const router = useRouter();
  const params = useLocalSearchParams<{ ids?: string }>();
  const ids = (params.ids ?? "").split(",").filter(Boolean);
  const runs = useRuns();
  // The chosen runs by id (they may be on a page not loaded yet, or archived), then the finished runs loaded.
  const chosen = useRunsByIds(ids);
  const loaded = runs.data ?? [];
  const finished = [
    ...ids.flatMap((id) => {
      const r = chosen.byId.get(id);
      return r && !loaded.some((x) => x.id === id) ? [r] : [];
    }),
    ...loaded.filter((r) => isFinishedRunStatus(r.status) || ids.includes(r.id)),
  ];
  const toggle = (id: string, on: boolean) => {
    const next = on ? [...ids, id].slice(0, 4) : ids.filter((x) => x !== id);
    router.setParams({ ids: next.join(",") });
  };
  return (
    <Screen title="Compare" subtitle="Choose two to four finished runs; on a wide screen they stand side by side.">
      <Card>
        {runs.isPending ? (
          <LoadingState label="Loading runs" />
        ) : runs.error ? (
          <ErrorState error={runs.error} onRetry={() => runs.refetch()} />
        ) : finished.length < 2 ? (
          <EmptyState
            icon="columns"
            title="Not enough finished runs"
            message="Comparisons need at least two finished runs."
          />
        ) : (
          finished.map((r) => (
            <Checkbox
              key={r.id}
              label={`${r.name} (${[r.circuitName, runDateLabel(r.createdAt), r.createdBy].filter(Boolean).join(", ")})`}
              checked={ids.includes(r.id)}
              disabled={!ids.includes(r.id) && ids.length >= 4}
              onChange={(on) => toggle(r.id, on)}
              testID={`compare-pick-${r.id}`}
            />
          ))
        )}
        {runs.data ? <LoadMore list={runs} noun="runs" testID="compare-load-more" /> : null}
      </Card>
      {ids.length >= 2 ? (
        <ComparisonView ids={ids} />
      ) : (
        <Text tone="muted">{ids.length === 1 ? "Choose at least one more run." : "Nothing chosen yet."}</Text>
      )}
    </Screen>
  );
}
