import React from "react";
import { View } from "react-native";
import type { Circuit } from "@/shared/schemas/circuit";
import type { FeedForward } from "@/shared/schemas/api-circuits";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Card } from "@/components/ui/card";
import { formatStoich } from "@/components/forms/stoich-text";

export function rateLawText(r: Circuit["reactions"][number]): string {
  const rate = r.rate;
  const scaled = r.scaledBy ? ` × ${r.scaledBy}` : "";
  if (rate.kind === "massAction") return `mass action, k = ${rate.ratePerMinute} /min${scaled}`;
  if (rate.kind === "constant") return `constant, ${rate.ratePerMinute} molecules/min${scaled}`;
  if (rate.kind === "expression") return `expression, ${rate.formula} molecules/min${scaled}`;
  const regs = rate.regulators
    .map((g) => `${g.source} ${g.effect === "activates" ? "activates" : "represses"} (K ${g.halfMax}, n ${g.hill})`)
    .join(rate.logic === "and" ? " AND " : " OR ");
  return `regulated, max ${rate.maxRatePerMinute} molecules/min, leak ${rate.leakFraction}; ${regs}${scaled}`;
}

/** The feed-forward type, shown wherever the wiring has one. */
export function FeedForwardBadge({ ff }: { ff: FeedForward | null | undefined }) {
  const t = useTheme();
  if (!ff) return null;
  return (
    <View
      testID="feed-forward-badge"
      style={{
        alignSelf: "flex-start",
        backgroundColor: t.colors.primarySoft,
        borderRadius: t.radii.pill,
        paddingHorizontal: t.spacing.md,
        paddingVertical: t.spacing.xs,
      }}
    >
      <Text variant="label" style={{ color: t.colors.onPrimarySoft }}>
        Feed-forward {ff.code}: {ff.label}
        {ff.logic ? `, ${ff.logic.toUpperCase()} logic` : ""} ({ff.x} → {ff.y} → {ff.z})
      </Text>
    </View>
  );
}

/** A read-only view of a circuit body: species, signals, reactions as equations. */
export function CircuitView({ body }: { body: Circuit }) {
  const t = useTheme();
  return (
    <Card>
      <Text variant="heading">Species and reactions</Text>
      <Text tone="muted">Species: {body.species.map((s) => `${s.name} (${s.initialCount} at start)`).join(", ")}</Text>
      {body.signals.length ? (
        <Text tone="muted">
          Signals: {body.signals.map((s) => `${s.name} (off ${s.offLevel}, on ${s.onLevel})`).join(", ")}
        </Text>
      ) : null}
      <Text tone="muted">Output: {body.outputSpecies}</Text>
      <View style={{ gap: t.spacing.sm, marginTop: t.spacing.sm }}>
        {body.reactions.map((r) => (
          <View key={r.name} style={{ gap: 2 }}>
            <Text variant="bodyStrong">
              {r.name}: {formatStoich(r.reactants) || "∅"} → {formatStoich(r.products) || "∅"}
            </Text>
            <Text variant="caption" tone="muted">
              {rateLawText(r)}
            </Text>
          </View>
        ))}
      </View>
    </Card>
  );
}
