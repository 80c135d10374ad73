import React, { useState } from "react";
import { View } from "react-native";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { PressableLink } from "@/components/ui/pressable-link";
import { DefinitionLink } from "@/components/definitions/definition-link";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { parseNumber } from "@/components/forms/zod-errors";
import { ApiError } from "@/components/data/api";
import { useDesignTarget } from "@/components/data/regime-maps";
import {
  formatInterval,
  formatNumber,
  formatPercentagePoints,
  formatProbability,
  formatQuantity,
} from "@/shared/number-format";
import type { DesignTargetInput, TargetAnswer, TargetPoint } from "@/shared/schemas/api-regime-maps";

const LIMIT_WORDS: Record<TargetPoint["limits"][number]["limit"], string> = {
  falsePass: "false-pass rate",
  pass: "pass probability",
  delayCost: "delay cost",
  oscillation: "oscillation period",
};

function marginText(l: TargetPoint["limits"][number]): string {
  if (l.margin === null) return `${LIMIT_WORDS[l.limit]}: not measurable (${l.reason ?? "no figure"})`;
  const m =
    l.limit === "falsePass" || l.limit === "pass"
      ? formatPercentagePoints(Math.abs(l.margin))
      : formatQuantity(Math.abs(l.margin), "min");
  return `${LIMIT_WORDS[l.limit]}: ${l.margin >= 0 ? `inside by ${m}` : `outside by ${m}`}`;
}

const where = (p: TargetPoint) =>
  Object.entries(p.values)
    .map(([k, v]) => `${k} = ${formatNumber(v)}`)
    .join(", ");

/**
 * A design target form and its answer: which points meet it, the margin to
 * each limit, and (sweeps with cell-to-cell variation) the fraction of cells
 * meeting it. `onAnswer` hands the points' verdicts to the map.
 */
export function TargetPanel({
  kind,
  id,
  pulses,
  onAnswer,
}: {
  kind: "sweeps" | "regime-maps";
  id: string;
  /** Whether pulse limits apply (sweeps); a mean-field map has only the oscillation limit. */
  pulses: boolean;
  onAnswer: (a: TargetAnswer | null) => void;
}) {
  const t = useTheme();
  const ask = useDesignTarget(kind, id);
  const [f, setF] = useState({
    fpRate: "",
    fpBelow: "",
    passP: "",
    passAt: "",
    delay: "",
    periodMin: "",
    periodMax: "",
  });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const set = (k: keyof typeof f) => (v: string) => setF((o) => ({ ...o, [k]: v }));
  const answer = ask.data ?? null;
  const server = ask.error instanceof ApiError ? ask.error : null;
  const submit = () => {
    const e: Record<string, string> = {};
    const num = (k: keyof typeof f) => (f[k].trim() ? parseNumber(f[k]) : undefined);
    const target: DesignTargetInput = {};
    const pct = (k: keyof typeof f) => {
      const v = num(k);
      if (v === undefined) return undefined;
      if (!(v >= 0 && v <= 100)) e[k] = "A percentage from 0 to 100.";
      return v / 100;
    };
    const mins = (k: keyof typeof f) => {
      const v = num(k);
      if (v !== undefined && !(v > 0)) e[k] = "Minutes above 0.";
      return v;
    };
    const both = <A, B>(a: A | undefined, b: B | undefined, ka: string, kb: string) => {
      if ((a === undefined) !== (b === undefined)) e[a === undefined ? ka : kb] = "Fill both, or neither.";
      return a !== undefined && b !== undefined;
    };
    if (pulses) {
      const r = pct("fpRate"),
        below = mins("fpBelow");
      if (both(r, below, "fpRate", "fpBelow")) target.falsePass = { maxRate: r!, belowMinutes: below! };
      const p = pct("passP"),
        at = mins("passAt");
      if (both(p, at, "passP", "passAt")) target.pass = { minProbability: p!, atMinutes: at! };
      const d = mins("delay");
      if (d !== undefined) target.delayCost = { maxMinutes: d };
    }
    const a = mins("periodMin"),
      b = mins("periodMax");
    if (both(a, b, "periodMin", "periodMax")) {
      if (a! > b!) e.periodMax = "At least the shortest period.";
      target.oscillation = { minMinutes: a!, maxMinutes: b! };
    }
    if (!Object.keys(e).length && !Object.keys(target).length) e.form = "State at least one limit.";
    setErrors(e);
    if (Object.keys(e).length) return;
    ask.mutate(target, { onSuccess: (d) => onAnswer(d) });
  };
  return (
    <View testID="target-panel" style={{ gap: t.spacing.md }}>
      <Text variant="heading">Design to a target</Text>
      <Text variant="caption" tone="muted">
        State what a point must do; points that meet every limit are ringed on the map.
      </Text>
      <DefinitionLink term="design-target" label="How a target is judged" />
      {pulses ? (
        <>
          <View style={{ flexDirection: "row", gap: t.spacing.sm, flexWrap: "wrap" }}>
            <Field
              label="False-pass rate at most"
              unit="%"
              value={f.fpRate}
              onChangeText={set("fpRate")}
              error={errors.fpRate}
              testID="target-fp-rate"
              keyboardType="decimal-pad"
            />
            <Field
              label="for pulses shorter than"
              unit="min"
              value={f.fpBelow}
              onChangeText={set("fpBelow")}
              error={errors.fpBelow}
              testID="target-fp-below"
              keyboardType="decimal-pad"
            />
          </View>
          <View style={{ flexDirection: "row", gap: t.spacing.sm, flexWrap: "wrap" }}>
            <Field
              label="Pass probability at least"
              unit="%"
              value={f.passP}
              onChangeText={set("passP")}
              error={errors.passP}
              testID="target-pass-p"
              keyboardType="decimal-pad"
            />
            <Field
              label="at pulse duration"
              unit="min"
              value={f.passAt}
              onChangeText={set("passAt")}
              error={errors.passAt}
              testID="target-pass-at"
              keyboardType="decimal-pad"
            />
          </View>
          <Field
            label="Delay cost at most"
            unit="min"
            value={f.delay}
            onChangeText={set("delay")}
            error={errors.delay}
            testID="target-delay"
            keyboardType="decimal-pad"
          />
        </>
      ) : null}
      <View style={{ flexDirection: "row", gap: t.spacing.sm, flexWrap: "wrap" }}>
        <Field
          label="Sustained oscillation, period from"
          unit="min"
          value={f.periodMin}
          onChangeText={set("periodMin")}
          error={errors.periodMin}
          testID="target-period-min"
          keyboardType="decimal-pad"
        />
        <Field
          label="to"
          unit="min"
          value={f.periodMax}
          onChangeText={set("periodMax")}
          error={errors.periodMax}
          testID="target-period-max"
          keyboardType="decimal-pad"
        />
      </View>
      {errors.form ? <Banner tone="danger">{errors.form}</Banner> : null}
      {server ? <Banner tone="danger">{server.message}</Banner> : null}
      <View style={{ flexDirection: "row", gap: t.spacing.sm, flexWrap: "wrap" }}>
        <Button label="Show the region" icon="target" onPress={submit} busy={ask.isPending} testID="target-submit" />
        {answer ? (
          <Button
            label="Clear the target"
            variant="secondary"
            onPress={() => {
              ask.reset();
              onAnswer(null);
            }}
          />
        ) : null}
      </View>
      {answer ? <TargetResults answer={answer} /> : null}
    </View>
  );
}

function TargetResults({ answer }: { answer: TargetAnswer }) {
  const t = useTheme();
  const anyFraction = answer.points.some((p) => p.fraction);
  return (
    <View testID="target-results" style={{ gap: t.spacing.sm }}>
      <Text variant="bodyStrong" testID="target-summary">
        {answer.meeting} of {answer.points.length} points meet the target
      </Text>
      <Text variant="caption" tone="muted">
        Margins are point estimates from each point&apos;s own figures (how far inside each limit, in its unit); check
        their intervals on the run page before relying on a point near a limit.
        {anyFraction
          ? ` The fraction of cells is the share of replicates, each with its own cell-to-cell draw, that meet the target on their own pulses, with a Wilson 95% interval (at least ${answer.minReplicatesForFraction} replicates).`
          : ""}
      </Text>
      {anyFraction ? <DefinitionLink term="fraction-of-cells" label="Fraction of cells meeting a target" /> : null}
      {answer.points.map((p) => {
        const head = `${where(p)}${p.refined ? " (refined)" : ""}: ${
          p.meets === null ? `not evaluable (${p.reason ?? "no figures"})` : p.meets ? "meets" : "misses"
        }`;
        const lines = [
          ...p.limits.map(marginText),
          p.fraction
            ? `fraction of cells meeting it: ${formatProbability(p.fraction.fraction)} (${formatInterval([p.fraction.low, p.fraction.high], "%")}, ${p.fraction.replicates} replicates)`
            : p.fractionReason && anyFraction
              ? `fraction of cells: not given (${p.fractionReason})`
              : null,
        ].filter((x): x is string => !!x);
        const content = (
          <View style={{ gap: 2, minHeight: MIN_TOUCH, justifyContent: "center" }}>
            <Text variant="bodyStrong">{head}</Text>
            {lines.map((l, i) => (
              <Text key={i} variant="caption" tone="muted">
                {l}
              </Text>
            ))}
          </View>
        );
        return p.runId ? (
          <PressableLink key={p.index} href={`/runs/${p.runId}`} testID={`target-point-${p.index}`}>
            {content}
          </PressableLink>
        ) : (
          <View key={p.index} testID={`target-point-${p.index}`}>
            {content}
          </View>
        );
      })}
    </View>
  );
}
