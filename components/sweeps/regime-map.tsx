import React from "react";
import { Pressable, ScrollView, View } from "react-native";
import { Link } from "expo-router";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { formatNumber } from "@/components/charts/chart-spec";
import { PENDING_LOOK, regimeLook } from "@/components/regimes/regime-style";
import type { SweepDetail } from "@/shared/schemas/api-runs";
import type { RegimeLabelValue } from "@/shared/schemas/regime";
import { regimeMapLayout, type MapCell, type MapModel } from "./regime-map-layout";

const TITLES: Record<MapModel, string> = {
  deterministic: "Mean-field model (ODE)",
  stochastic: "Stochastic ensemble (SSA)",
};
const CELL = MIN_TOUCH;
const EDGE = 3;

function cellName(c: MapCell, model: MapModel): string {
  const where = Object.entries(c.values)
    .map(([k, v]) => `${k} ${formatNumber(v)}`)
    .join(", ");
  return `${where}: ${c.label ?? "not computed yet"} (${model === "deterministic" ? "mean-field" : "stochastic"})${c.runId ? ", open its run" : ""}`;
}

function Cell({ c, model, textColor }: { c: MapCell; model: MapModel; textColor: string }) {
  const look = c.label ? regimeLook(c.label) : PENDING_LOOK;
  const style = {
    width: CELL,
    height: CELL,
    backgroundColor: look.fill,
    alignItems: "center" as const,
    justifyContent: "center" as const,
    // a boundary is a thick edge in the text colour; other edges a hairline gap
    borderRightWidth: c.boundaryRight ? EDGE : 1,
    borderBottomWidth: c.boundaryBelow ? EDGE : 1,
    borderRightColor: c.boundaryRight ? textColor : "transparent",
    borderBottomColor: c.boundaryBelow ? textColor : "transparent",
  };
  const symbol = (
    <Text style={{ color: look.ink, fontSize: 18, lineHeight: 22 }} accessibilityElementsHidden>
      {look.symbol}
    </Text>
  );
  const testID = `map-${model}-cell-${c.row}-${c.col}`;
  if (!c.runId)
    return (
      <View style={style} testID={testID} accessibilityLabel={cellName(c, model)}>
        {symbol}
      </View>
    );
  return (
    <Link href={`/runs/${c.runId}`} asChild>
      <Pressable role="link" accessibilityLabel={cellName(c, model)} testID={testID} style={style}>
        {symbol}
      </Pressable>
    </Link>
  );
}

/** One behaviour map of a sweep: cells coloured and marked by label, boundaries drawn, each cell a link to its run. */
export function RegimeMap({ sweep, model }: { sweep: Pick<SweepDetail, "axes" | "points">; model: MapModel }) {
  const t = useTheme();
  const layout = regimeMapLayout(sweep, model);
  const { rowAxis, colAxis } = layout;
  return (
    <View testID={`regime-map-${model}`} style={{ gap: t.spacing.sm, flexGrow: 1, flexBasis: 320, minWidth: 0 }}>
      <Text variant="bodyStrong">{TITLES[model]}</Text>
      <Text variant="caption" tone="muted">
        {rowAxis ? `Rows: ${rowAxis.parameter} · columns: ${colAxis.parameter}` : `Columns: ${colAxis.parameter}`}
        {layout.boundaries > 0 ? ` · ${layout.boundaries} boundary edges drawn thick` : ""}
      </Text>
      <ScrollView horizontal accessibilityLabel={`${TITLES[model]} map`}>
        <View>
          <View style={{ flexDirection: "row", marginLeft: 72 }}>
            {colAxis.values.map((v, j) => (
              <Text key={j} variant="caption" tone="muted" style={{ width: CELL, textAlign: "center" }}>
                {formatNumber(v, 2)}
              </Text>
            ))}
          </View>
          {layout.cells.map((row, i) => (
            <View key={i} style={{ flexDirection: "row", alignItems: "center" }}>
              <Text variant="caption" tone="muted" style={{ width: 72 }}>
                {rowAxis ? formatNumber(rowAxis.values[i], 3) : ""}
              </Text>
              {row.map((c) => (
                <Cell key={c.col} c={c} model={model} textColor={t.colors.text} />
              ))}
            </View>
          ))}
        </View>
      </ScrollView>
    </View>
  );
}

/** The legend shared by both maps: each label's fill, symbol and name. */
export function RegimeLegend({ labels }: { labels: RegimeLabelValue[] }) {
  const t = useTheme();
  const items = [
    ...labels.map((l) => ({ name: l, look: regimeLook(l) })),
    { name: "not computed yet", look: PENDING_LOOK },
  ];
  return (
    <View
      testID="regime-legend"
      accessibilityLabel="Legend"
      style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}
    >
      {items.map((it) => (
        <View key={it.name} style={{ flexDirection: "row", alignItems: "center", gap: t.spacing.xs }}>
          <View
            style={{
              width: 28,
              height: 28,
              backgroundColor: it.look.fill,
              borderWidth: 1,
              borderColor: t.colors.border,
              alignItems: "center",
              justifyContent: "center",
            }}
          >
            <Text style={{ color: it.look.ink }} accessibilityElementsHidden>
              {it.look.symbol}
            </Text>
          </View>
          <Text variant="caption">{it.name}</Text>
        </View>
      ))}
    </View>
  );
}

/** Deterministic and stochastic maps side by side (stacked on a phone), with one legend. */
export function RegimeMaps({ sweep, wide }: { sweep: Pick<SweepDetail, "axes" | "points">; wide: boolean }) {
  const t = useTheme();
  const labels = new Set<RegimeLabelValue>();
  for (const m of ["deterministic", "stochastic"] as const)
    for (const l of regimeMapLayout(sweep, m).labels) labels.add(l);
  return (
    <View testID="regime-maps" style={{ gap: t.spacing.md }}>
      <Text variant="heading">Behaviour map</Text>
      <Text variant="caption" tone="muted">
        Each cell is one point of the sweep, marked by what the circuit does there (docs/regimes.md); thick edges are
        boundaries between behaviours. Tap a cell to open that point&apos;s run and its evidence.
      </Text>
      <RegimeLegend labels={[...labels]} />
      <View style={{ flexDirection: wide ? "row" : "column", gap: t.spacing.lg }}>
        <RegimeMap sweep={sweep} model="deterministic" />
        <RegimeMap sweep={sweep} model="stochastic" />
      </View>
    </View>
  );
}
