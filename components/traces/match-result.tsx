/**
 * A match of observed traces against simulations, in plain words: the
 * distances (Kolmogorov-Smirnov D and Wasserstein-1, docs/traces.md), for a
 * sweep the ranked points with the accept set marked and the accepted
 * parameter ranges, and overlay charts of observed against simulated.
 */
import React, { useMemo, useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { StatCard } from "@/components/ui/stat-card";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { Banner } from "@/components/ui/states";
import { DataTable, type Column } from "@/components/ui/data-table";
import { LazyChart } from "@/components/charts/lazy-chart";
import {
  formatCount,
  formatNumber,
  formatPercentagePoints,
  formatProbability,
  formatQuantity,
} from "@/shared/number-format";
import { distributionOverlaySpec } from "./trace-specs";
import type { Distances, MatchDetail, MatchPoint } from "@/shared/schemas/api-traces";

const CARD = { flexGrow: 1, flexBasis: 200, minWidth: 170 } as const;
const pct = (p: number | null | undefined) => formatProbability(p);

/** The tolerance in words ("the closest 5% of points", "combined distance at most 0.4"). */
export function toleranceWords(m: MatchDetail["result"]["tolerance"]): string {
  return m.kind === "fraction"
    ? `the closest ${formatProbability(m.fraction)} of points`
    : `combined distance at most ${formatNumber(m.distance)}`;
}

/** Sentences for one point's distances, used by the cards and by screen readers. */
export function distanceWords(d: Distances): { pass: string; delay: string; width: string; combined: string } {
  const shift = (w: number | null, what: string) =>
    w === null
      ? ""
      : ` On average ${what} would have to move ${formatQuantity(w, "min")} to line up (Wasserstein-1 distance).`;
  return {
    pass: `Pass rates differ by ${formatPercentagePoints(d.pass)}, weighted over the input durations both sides have.`,
    delay: `The largest gap between the cumulative distributions of response delays is ${formatNumber(d.delayKs, 2)} (Kolmogorov–Smirnov D: 0 is the same distribution, 1 is no overlap).${shift(d.delayW1Minutes, "delays")}`,
    width: `For output pulse widths the largest gap is ${formatNumber(d.widthKs, 2)}.${shift(d.widthW1Minutes, "widths")}`,
    combined: `Combined distance ${formatNumber(d.combined, 3)} out of at most 3 (pass difference + delay D + width D).`,
  };
}

function DistanceCards({ d }: { d: Distances }) {
  const t = useTheme();
  const w = distanceWords(d);
  return (
    <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }} testID="match-distances">
      <StatCard
        style={CARD}
        testID="match-combined"
        label="Combined distance (0 = identical, 3 = nothing alike)"
        value={formatNumber(d.combined, 3)}
        detail={w.combined}
        extra={<DefinitionLink term="match-distance" />}
      />
      <StatCard
        style={CARD}
        testID="match-pass"
        label="Pass-rate difference"
        value={formatPercentagePoints(d.pass, "points")}
        detail={w.pass}
        extra={<DefinitionLink term="match-distance" />}
      />
      <StatCard
        style={CARD}
        testID="match-delay"
        label="Response delays: largest gap (KS D)"
        value={formatNumber(d.delayKs, 2)}
        detail={w.delay}
        extra={<DefinitionLink term="response-delay" />}
      />
      <StatCard
        style={CARD}
        testID="match-width"
        label="Pulse widths: largest gap (KS D)"
        value={formatNumber(d.widthKs, 2)}
        detail={w.width}
        extra={<DefinitionLink term="pulse-width" />}
      />
    </View>
  );
}

type PointRow = MatchPoint & { index: number };

function RankedPoints({ points, parameters }: { points: MatchPoint[]; parameters: string[] }) {
  const [page, setPage] = useState(1);
  const PAGE = 10;
  const columns: Column<PointRow>[] = [
    { key: "rank", label: "Rank", width: 64, render: (r) => formatCount(r.rank) },
    { key: "accepted", label: "Accept set", width: 104, render: (r) => (r.accepted ? "✓ accepted" : "–") },
    ...parameters.map((p) => ({
      key: `p:${p}`,
      label: p,
      width: Math.max(104, Math.min(180, p.length * 9)),
      render: (r: PointRow) => formatNumber(r.parameters[p]),
    })),
    { key: "combined", label: "Combined", width: 96, render: (r) => formatNumber(r.distances.combined, 3) },
    { key: "pass", label: "Pass diff.", width: 96, render: (r) => pct(r.distances.pass) },
    { key: "delayKs", label: "Delay D", width: 84, render: (r) => formatNumber(r.distances.delayKs, 2) },
    { key: "widthKs", label: "Width D", width: 84, render: (r) => formatNumber(r.distances.widthKs, 2) },
  ];
  const rows = points.map((p, index) => ({ ...p, index }));
  const pageCount = Math.max(1, Math.ceil(rows.length / PAGE));
  return (
    <DataTable
      testID="match-points"
      caption="Sweep points ranked by combined distance, closest first; accepted points are marked"
      columns={columns}
      rows={rows.slice((page - 1) * PAGE, page * PAGE)}
      sort="rank"
      dir="asc"
      onSort={() => {}}
      page={page}
      pageCount={pageCount}
      onPage={setPage}
    />
  );
}

export function MatchResultView({ match, targetName }: { match: MatchDetail; targetName?: string }) {
  const t = useTheme();
  const r = match.result;
  const isSweep = !!match.sweepId;
  const best = r.points[0];
  const parameters = useMemo(() => r.ranges.map((x) => x.parameter), [r.ranges]);
  const delayChart =
    best && r.bestSimulated
      ? distributionOverlaySpec(r.observed.delays, r.bestSimulated.delays, t.colors, {
          title: "Response delays: observed and simulated",
          quantity: "response delay",
          ks: best.distances.delayKs,
          w1: best.distances.delayW1Minutes,
          simulatedLabel: isSweep ? "Simulated, closest point" : "Simulated",
        })
      : null;
  const widthChart =
    best && r.bestSimulated
      ? distributionOverlaySpec(r.observed.widths, r.bestSimulated.widths, t.colors, {
          title: "Output pulse widths: observed and simulated",
          quantity: "pulse width",
          ks: best.distances.widthKs,
          w1: best.distances.widthW1Minutes,
          simulatedLabel: isSweep ? "Simulated, closest point" : "Simulated",
        })
      : null;
  return (
    <View style={{ gap: t.spacing.md }} testID="match-result">
      <Text variant="heading">
        Match against {isSweep ? "sweep" : "run"}
        {targetName ? ` “${targetName}”` : ""}
      </Text>
      <Text variant="caption" tone="muted">
        {new Date(match.createdAt).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })} · observed:{" "}
        {r.observed.n} scored pulses, pass rate {pct(r.observed.passRate)}
        {r.bestSimulated
          ? ` · simulated${isSweep ? " (closest point)" : ""}: ${r.bestSimulated.n} pulses, pass rate ${pct(r.bestSimulated.passRate)}`
          : ""}
      </Text>
      {r.notes.length ? (
        <Banner tone="notice" testID="match-notes">
          <View style={{ gap: t.spacing.xs }}>
            {r.notes.map((n) => (
              <Text key={n} variant="caption" style={{ color: t.colors.onNoticeSoft }}>
                • {n}
              </Text>
            ))}
          </View>
        </Banner>
      ) : null}
      {best ? (
        <>
          {isSweep ? (
            <Text variant="label">
              Closest point
              {Object.keys(best.parameters).length
                ? `: ${Object.entries(best.parameters)
                    .map(([k, v]) => `${k} = ${formatNumber(v)}`)
                    .join(", ")}`
                : ""}
            </Text>
          ) : null}
          <DistanceCards d={best.distances} />
        </>
      ) : (
        <Text tone="muted">No finished point to compare with.</Text>
      )}
      {isSweep ? (
        <View style={{ gap: t.spacing.sm }}>
          <Text variant="heading">Accept set</Text>
          <Text testID="match-accept-summary">
            {r.acceptedCount} of {r.pointCount} points accepted ({toleranceWords(r.tolerance)}
            {r.acceptDistance !== null ? `; combined distance up to ${formatNumber(r.acceptDistance, 3)}` : ""}). ABC
            rejection: the sweep grid is the prior, the accepted points approximate the parameters that fit.
          </Text>
          {r.ranges.length ? (
            <View style={{ gap: t.spacing.xs }} testID="match-ranges">
              {r.ranges.map((g) => (
                <Text key={g.parameter} variant="label">
                  {g.parameter}: accepted {formatNumber(g.acceptedMin)}–{formatNumber(g.acceptedMax)} of swept{" "}
                  {formatNumber(g.sweptMin)}–{formatNumber(g.sweptMax)}
                </Text>
              ))}
            </View>
          ) : null}
          <RankedPoints points={r.points} parameters={parameters} />
        </View>
      ) : null}
      {r.skippedRuns.length ? (
        <Text variant="caption" tone="muted">
          {r.skippedRuns.length} unfinished point{r.skippedRuns.length === 1 ? "" : "s"} left out.
        </Text>
      ) : null}
      {delayChart ? (
        <View style={{ gap: t.spacing.xs }}>
          <Text variant="label">{delayChart.title} (cumulative)</Text>
          <LazyChart spec={delayChart} testID="chart-match-delays" />
        </View>
      ) : null}
      {widthChart ? (
        <View style={{ gap: t.spacing.xs }}>
          <Text variant="label">{widthChart.title} (cumulative)</Text>
          <LazyChart spec={widthChart} testID="chart-match-widths" />
        </View>
      ) : null}
      {best && r.bestSimulated && !delayChart && !widthChart ? (
        <Text variant="caption" tone="muted">
          No delays or widths on one side, so there is nothing to overlay.
        </Text>
      ) : null}
    </View>
  );
}
