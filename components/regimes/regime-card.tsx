import React from "react";
import { View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import type { RegimeVerdictView, RunRegimeView } from "@/shared/schemas/regime";
import { differenceSentence, evidenceRows, verdictMeaning } from "./regime-words";
import { RegimeBadge } from "./regime-badge";

function VerdictPanel({
  title,
  verdict,
  testID,
  side,
}: {
  title: string;
  verdict: RegimeVerdictView;
  testID: string;
  /** Side by side (wide screens): each panel starts at 280 px wide. Stacked, a basis would fix its height instead. */
  side: boolean;
}) {
  const t = useTheme();
  const rows = evidenceRows(verdict);
  return (
    <View testID={testID} style={side ? { flexGrow: 1, flexBasis: 280, gap: t.spacing.sm } : { gap: t.spacing.sm }}>
      <Text variant="label" tone="muted">
        {title}
      </Text>
      <RegimeBadge label={verdict.label} testID={`${testID}-label`} />
      <Text>{verdictMeaning(verdict)}</Text>
      <View accessibilityLabel={`Evidence, ${title}`} style={{ gap: t.spacing.xxs }}>
        {rows.map((r) => (
          <View key={r.key} style={{ flexDirection: "row", gap: t.spacing.sm, flexWrap: "wrap" }}>
            <Text variant="caption" tone="muted" style={{ flexGrow: 1, flexBasis: 160 }}>
              {r.label}
            </Text>
            <Text variant="caption" style={{ flexShrink: 1 }}>
              {r.value}
            </Text>
          </View>
        ))}
      </View>
    </View>
  );
}

/** What the circuit does at this run's parameters: the mean-field and stochastic labels side by side, with evidence. */
export function RegimeCard({ regime }: { regime: RunRegimeView }) {
  const t = useTheme();
  const bp = useBreakpoints();
  const differs = differenceSentence(regime);
  return (
    <Card testID="regime-card">
      <Text variant="heading">Behaviour at these parameters</Text>
      {differs ? (
        <Text testID="regime-differs" variant="bodyStrong">
          {differs}
        </Text>
      ) : (
        <Text testID="regime-agrees" tone="muted">
          The mean-field model and the stochastic ensemble agree.
        </Text>
      )}
      <View style={{ flexDirection: bp.isWide ? "row" : "column", gap: t.spacing.lg }}>
        <VerdictPanel
          title="Mean-field model (ODE)"
          verdict={regime.deterministic}
          testID="regime-deterministic"
          side={bp.isWide}
        />
        <VerdictPanel
          title="Stochastic ensemble (SSA)"
          verdict={regime.stochastic}
          testID="regime-stochastic"
          side={bp.isWide}
        />
      </View>
    </Card>
  );
}
