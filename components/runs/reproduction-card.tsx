import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Icon } from "@/components/ui/icon";
import type { RunDetail } from "@/shared/schemas/api-runs";

export type Reproduction = NonNullable<RunDetail["reproduction"]>;

/** The verdict in one line. */
export function reproductionVerdict(r: Reproduction): { tone: "same" | "differs" | "pending"; text: string } {
  if (r.identical === true) return { tone: "same", text: "Identical: every stored statistic matches the original" };
  if (r.identical === false)
    return {
      tone: "differs",
      text: r.firstDifference ? `Differs: first difference at ${r.firstDifference}` : r.message.replace(/\.$/, ""),
    };
  return { tone: "pending", text: r.message.replace(/\.$/, "") };
}

/** On a reproduction (a re-run or an imported bundle): identical statistics or the first difference, and the engine check. */
export function ReproductionCard({ reproduction }: { reproduction: Reproduction }) {
  const t = useTheme();
  const v = reproductionVerdict(reproduction);
  const fromBundle = reproduction.of === "bundle";
  const colour =
    v.tone === "same" ? t.colors.onPrimarySoft : v.tone === "differs" ? t.colors.onDangerSoft : t.colors.onNoticeSoft;
  const bg =
    v.tone === "same" ? t.colors.primarySoft : v.tone === "differs" ? t.colors.dangerSoft : t.colors.noticeSoft;
  return (
    <Card testID="reproduction-card">
      <Text variant="heading">Reproduction check</Text>
      <View
        role="status"
        style={{
          flexDirection: "row",
          gap: t.spacing.sm,
          alignItems: "flex-start",
          backgroundColor: bg,
          borderRadius: t.radii.md,
          padding: t.spacing.md,
        }}
      >
        <Icon
          name={v.tone === "same" ? "check-circle" : v.tone === "differs" ? "alert-triangle" : "clock"}
          color={colour}
        />
        <Text variant="bodyStrong" style={{ color: colour, flexShrink: 1 }} testID="reproduction-verdict">
          {v.text}
        </Text>
      </View>
      <Text tone="muted">
        {fromBundle
          ? "Re-run of an imported bundle, compared with the statistics hash stored in the bundle."
          : "Re-run of a run in this lab with the same circuit, program, settings and seed."}
      </Text>
      <Text testID="reproduction-engine">
        {reproduction.engineMatches
          ? "Engine version: the same as the original's."
          : "Engine version: different from the original's, so small differences can come from the engine itself."}
      </Text>
      {!fromBundle ? (
        <View style={{ flexDirection: "row" }}>
          <Button
            label="Open the original run"
            variant="secondary"
            icon="corner-up-left"
            compact
            href={`/runs/${reproduction.of}`}
          />
        </View>
      ) : null}
    </Card>
  );
}
