import React from "react";
import { View } from "react-native";
import type { RunSummary } from "@/shared/schemas/analysis";
import type { Circuit } from "@/shared/schemas/circuit";
import {
  formatCount,
  formatInterval,
  formatNumber,
  formatProbability,
  formatQuantity,
  formatReached,
} from "@/shared/number-format";
import { StatCard } from "@/components/ui/stat-card";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import { DefinitionLink } from "@/components/definitions/definition-link";

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
const pct = (p: number | null | undefined) => formatProbability(p);
const ci = (c: [number | null, number | null] | null | undefined, unit = "min") =>
  c ? formatInterval(c, unit) : undefined;

/** The headline figures of a finished run (or of a trace set, cells as replicates: peaks are then in trace units). */
/** The d50 card's value when no number is given: the pass-curve verdict in words (sim/analysis/pass-curve-d50.ts). */
export function d50Refusal(summary: RunSummary): string {
  const v = summary.passCurveD50;
  if (!v) return "not estimable";
  switch (v.kind) {
    case "not-bracketed":
      return v.side === "below-shortest"
        ? `below ${formatQuantity(v.bound, "min")} (shortest tried)`
        : `above ${formatQuantity(v.bound, "min")} (longest tried)`;
    case "not-estimable":
      return `not estimable: no durations between ${formatNumber(v.between[0])} and ${formatQuantity(v.between[1], "min")}`;
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
          value={summary.d50 === null ? d50Refusal(summary) : formatQuantity(summary.d50, "min")}
          detail={
            summary.d50 === null
              ? (summary.d50Note ?? undefined)
              : `${ci(summary.d50Ci)} (tried durations) · monotone pass curve`
          }
          extra={<DefinitionLink term="d50" />}
        />
        <StatCard
          style={CARD}
          testID="card-median-delay"
          label="Median response delay"
          value={formatReached(summary.delay.median, "min")}
          detail={`${summary.delay.median === null ? "fewer than half responded" : ci(summary.delay.medianCi)} · ${formatCount(summary.delay.censored)} of ${formatCount(summary.delay.evaluable)} without response`}
          extra={<DefinitionLink term="response-delay" />}
        />
        <StatCard
          style={CARD}
          testID="card-false-pass"
          label={`False-pass rate (pulses under ${formatQuantity(summary.noiseDurationMinutes, "min")})`}
          value={pct(summary.falsePassRate)}
          detail={
            summary.falsePass
              ? `${formatCount(summary.falsePass.passed)} of ${formatCount(summary.falsePass.pulses)} passed · ${formatInterval(summary.falsePass.ci, "%")}`
              : "no pulses shorter than the noise duration"
          }
          extra={<DefinitionLink term="false-pass-rate" />}
        />
        {summary.delayCost ? (
          <StatCard
            style={CARD}
            label={`Delay paid for long pulses (≥ ${formatQuantity(summary.delayCost.minDurationMinutes, "min")})`}
            value={formatReached(summary.delayCost.medianDelay, "min")}
            detail={`${formatCount(summary.delayCost.responded)} of ${formatCount(summary.delayCost.pulses)} responded · durations ${summary.delayCost.durations.map((d) => formatNumber(d)).join(", ")} min`}
            extra={<DefinitionLink term="delay-cost" />}
          />
        ) : null}
        {isPulseGenerator ? (
          <>
            <StatCard
              style={CARD}
              label="Median peak above baseline"
              value={formatQuantity(pg.peakAboveBaseline.median, peakUnit)}
              detail={`time to peak ${formatQuantity(pg.timeToPeak.median, "min")}`}
              extra={<DefinitionLink term="fwhm" />}
            />
            <StatCard
              style={CARD}
              label="Median pulse width (FWHM)"
              value={formatQuantity(pg.fwhm.median, "min")}
              detail={`${pg.fwhmNotMeasurable} not measurable`}
              extra={<DefinitionLink term="fwhm" />}
            />
          </>
        ) : null}
        {summary.noise.fano !== null ? (
          <StatCard
            style={CARD}
            testID="card-fano"
            label="Output noise (Fano factor)"
            value={formatNumber(summary.noise.fano)}
            detail={`variance / mean over ${formatCount(summary.noise.replicates)} replicates · CV ${formatNumber(summary.noise.cv)}`}
            extra={<DefinitionLink term="fano" />}
          />
        ) : null}
      </View>
      <View style={{ gap: t.spacing.xs }}>
        <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
          <Text variant="label">Pass probability per input duration</Text>
          <DefinitionLink term="pass-probability" />
        </View>
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
                {formatQuantity(e.duration, "min")}: {pct(e.passProbability)} ({formatCount(e.passed)}/
                {formatCount(e.pulses)})
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
