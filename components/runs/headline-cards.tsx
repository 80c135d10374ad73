import React from "react";
import { View } from "react-native";
import type { RunSummary } from "@/shared/schemas/analysis";
import type { Circuit } from "@/shared/schemas/circuit";
import { formatNumber } from "@/components/charts/chart-spec";
import { StatCard } from "@/components/ui/stat-card";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";

/** A circuit whose output production has a repressor (as in an incoherent feed-forward pulse generator). */
export function outputIsRepressed(c: Circuit): boolean {
  return c.reactions.some(
    (r) =>
      r.products.some((p) => p.species === c.outputSpecies) &&
      r.rate.kind === "regulated" &&
      r.rate.regulators.some((g) => g.effect === "represses"),
  );
}

const CARD = { flexGrow: 1, flexBasis: 150, minWidth: 140 } as const;
const pct = (p: number | null | undefined) => (p === null || p === undefined ? "–" : `${formatNumber(p * 100, 3)}%`);
const ci = (c: [number | null, number | null] | null | undefined, unit = "") =>
  c
    ? `95% CI ${c[0] === null ? "not reached" : formatNumber(c[0])}–${c[1] === null ? "not reached" : formatNumber(c[1])}${unit}`
    : undefined;

/** The headline figures of a finished run (or of a trace set, cells as replicates: peaks are then in trace units). */
/** The d50 card's value when no number is given: the pass-curve verdict in words (sim/analysis/pass-curve-d50.ts). */
export function d50Refusal(summary: RunSummary): string {
  const v = summary.passCurveD50;
  if (!v) return "not estimable";
  switch (v.kind) {
    case "not-bracketed":
      return v.side === "below-shortest"
        ? `below ${formatNumber(v.bound)} min (shortest tried)`
        : `above ${formatNumber(v.bound)} min (longest tried)`;
    case "not-estimable":
      return `not estimable: no durations between ${formatNumber(v.between[0])} and ${formatNumber(v.between[1])} min`;
    case "plateau":
      return "plateau: no single d50";
    default:
      return "not estimable";
  }
}

export function HeadlineCards({
  summary,
  circuit,
  peakUnit = "molecules",
}: {
  summary: RunSummary;
  circuit?: Circuit;
  peakUnit?: string;
}) {
  const t = useTheme();
  const pg = summary.pulseGeneration;
  const isPulseGenerator =
    pg.pulses > 0 && pg.peakAboveBaseline.median !== null && (!circuit || outputIsRepressed(circuit));
  return (
    <View style={{ gap: t.spacing.md }} testID="headline-cards">
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
        <StatCard
          style={CARD}
          testID="card-d50"
          label="d50 (duration passed half the time)"
          value={summary.d50 === null ? d50Refusal(summary) : `${formatNumber(summary.d50)} min`}
          detail={summary.d50 === null ? (summary.d50Note ?? undefined) : ci(summary.d50Ci, " min")}
        />
        <StatCard
          style={CARD}
          testID="card-median-delay"
          label="Median response delay"
          value={summary.delay.median === null ? "not reached" : `${formatNumber(summary.delay.median)} min`}
          detail={ci(summary.delay.medianCi, " min") + ` · ${summary.delay.censored} without response`}
        />
        <StatCard
          style={CARD}
          testID="card-false-pass"
          label={`False-pass rate (pulses under ${formatNumber(summary.noiseDurationMinutes)} min)`}
          value={pct(summary.falsePassRate)}
          detail={
            summary.falsePass
              ? `${summary.falsePass.passed} of ${summary.falsePass.pulses} passed · 95% CI ${pct(summary.falsePass.ci[0])}–${pct(summary.falsePass.ci[1])}`
              : "no pulses shorter than the noise duration"
          }
        />
        {summary.delayCost ? (
          <StatCard
            style={CARD}
            label={`Delay paid for long pulses (≥ ${formatNumber(summary.delayCost.minDurationMinutes)} min)`}
            value={
              summary.delayCost.medianDelay === null
                ? "not reached"
                : `${formatNumber(summary.delayCost.medianDelay)} min`
            }
            detail={`${summary.delayCost.responded} of ${summary.delayCost.pulses} responded`}
          />
        ) : null}
        {isPulseGenerator ? (
          <>
            <StatCard
              style={CARD}
              label="Median peak above baseline"
              value={`${formatNumber(pg.peakAboveBaseline.median)} ${peakUnit}`}
              detail={`time to peak ${formatNumber(pg.timeToPeak.median)} min`}
            />
            <StatCard
              style={CARD}
              label="Median pulse width (FWHM)"
              value={`${formatNumber(pg.fwhm.median)} min`}
              detail={`${pg.fwhmNotMeasurable} not measurable`}
            />
          </>
        ) : null}
      </View>
      <View style={{ gap: t.spacing.xs }}>
        <Text variant="label">Pass probability per input duration</Text>
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
          {summary.byDuration.map((e) => (
            <View
              key={e.duration}
              style={{
                paddingHorizontal: t.spacing.sm,
                paddingVertical: t.spacing.xs,
                borderRadius: t.radii.sm,
                backgroundColor: t.colors.surfaceAlt,
              }}
            >
              <Text variant="caption">
                {formatNumber(e.duration)} min: {pct(e.passProbability)} ({e.passed}/{e.pulses})
              </Text>
            </View>
          ))}
        </View>
      </View>
      {summary.notes.length
        ? summary.notes.map((n) => (
            <Text key={n} variant="caption" tone="muted">
              • {n}
            </Text>
          ))
        : null}
    </View>
  );
}
