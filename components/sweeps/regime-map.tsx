import React from "react";
import { Pressable, ScrollView, View } from "react-native";
import { Link } from "expo-router";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { formatNumber } from "@/components/charts/chart-spec";
import { PENDING_LOOK, regimeLook } from "@/components/regimes/regime-style";
import type { RegimeLabelValue } from "@/shared/schemas/regime";
import { regimeMapLayout, type MapCell, type MapModel, type MapSource, type RefinedMarker } from "./regime-map-layout";

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
  const target =
    c.meets === undefined
      ? ""
      : c.meets === null
        ? ", target not evaluable"
        : c.meets
          ? ", meets the target"
          : ", misses the target";
  return `${where}: ${c.label ?? "not computed yet"} (${model === "deterministic" ? "mean-field" : "stochastic"})${target}${c.runId ? ", open its run" : ""}`;
}

const MARKER = 24;
function markerName(m: RefinedMarker): string {
  const where = Object.entries(m.values)
    .map(([k, v]) => `${k} ${formatNumber(v)}`)
    .join(", ");
  return `refined point ${where}: ${m.label ?? "not computed yet"}`;
}

/** A refined point on the edge between two cells: a small square of its own label's fill and symbol. */
function Marker({ m, side, textColor }: { m: RefinedMarker; side: "right" | "below"; textColor: string }) {
  const look = m.label ? regimeLook(m.label) : PENDING_LOOK;
  const place =
    side === "right"
      ? { right: -MARKER / 2 - 1, top: (CELL - MARKER) / 2 }
      : { bottom: -MARKER / 2 - 1, left: (CELL - MARKER) / 2 };
  return (
    <View
      role="img"
      aria-label={markerName(m)}
      accessibilityLabel={markerName(m)}
      testID={`refined-marker-${m.index}`}
      style={{
        position: "absolute",
        ...place,
        zIndex: 2,
        width: MARKER,
        height: MARKER,
        backgroundColor: look.fill,
        borderWidth: 2,
        borderColor: textColor,
        alignItems: "center",
        justifyContent: "center",
      }}
    >
      <Text style={{ color: look.ink, fontSize: 11, lineHeight: 13 }} accessibilityElementsHidden>
        {look.symbol}
      </Text>
    </View>
  );
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
  const glyph = (
    <Text style={{ color: look.ink, fontSize: 18, lineHeight: 22 }} accessibilityElementsHidden>
      {look.symbol}
    </Text>
  );
  // a point meeting the design target: its symbol inside a ring in the label's ink
  const symbol = c.meets ? (
    <View
      testID={`meets-${model}-${c.row}-${c.col}`}
      style={{
        width: 34,
        height: 34,
        borderRadius: 17,
        borderWidth: 3,
        borderColor: look.ink,
        alignItems: "center",
        justifyContent: "center",
      }}
    >
      {glyph}
    </View>
  ) : (
    glyph
  );
  const testID = `map-${model}-cell-${c.row}-${c.col}`;
  const body = !c.runId ? (
    <View
      style={style}
      testID={testID}
      role="img"
      aria-label={cellName(c, model)}
      accessibilityLabel={cellName(c, model)}
    >
      {symbol}
    </View>
  ) : (
    <Link href={`/runs/${c.runId}`} asChild>
      <Pressable role="link" accessibilityLabel={cellName(c, model)} testID={testID} style={style}>
        {symbol}
      </Pressable>
    </Link>
  );
  if (!c.refinedRight && !c.refinedBelow) return body;
  return (
    <View style={{ position: "relative" }}>
      {body}
      {c.refinedRight ? <Marker m={c.refinedRight} side="right" textColor={textColor} /> : null}
      {c.refinedBelow ? <Marker m={c.refinedBelow} side="below" textColor={textColor} /> : null}
    </View>
  );
}

/** One behaviour map of a sweep: cells coloured and marked by label, boundaries drawn, each cell a link to its run. */
export function RegimeMap({
  sweep,
  model,
  meets,
  title,
}: {
  sweep: MapSource;
  model: MapModel;
  meets?: ReadonlyMap<number, boolean | null>;
  title?: string;
}) {
  const t = useTheme();
  const layout = regimeMapLayout(sweep, model, meets);
  const { rowAxis, colAxis } = layout;
  return (
    <View testID={`regime-map-${model}`} style={{ gap: t.spacing.sm, flexGrow: 1, flexBasis: 320, minWidth: 0 }}>
      <Text variant="bodyStrong">{title ?? TITLES[model]}</Text>
      <Text variant="caption" tone="muted">
        {rowAxis ? `Rows: ${rowAxis.parameter} · columns: ${colAxis.parameter}` : `Columns: ${colAxis.parameter}`}
        {layout.boundaries > 0 ? ` · ${layout.boundaries} boundary edges drawn thick` : ""}
        {layout.refined.length > 0 ? ` · ${layout.refined.length} refined points as small squares on the edges` : ""}
      </Text>
      <ScrollView horizontal focusable accessibilityLabel={`${title ?? TITLES[model]} map`}>
        <View style={{ paddingRight: MARKER / 2, paddingBottom: MARKER / 2 }}>
          <View style={{ flexDirection: "row", marginLeft: 72 }}>
            {colAxis.values.map((v, j) => (
              <Text key={j} variant="caption" tone="muted" style={{ width: CELL, textAlign: "center" }}>
                {formatNumber(v, 2)}
              </Text>
            ))}
          </View>
          {layout.cells.map((row, i) => (
            <View key={i} style={{ flexDirection: "row", alignItems: "center", zIndex: layout.cells.length - i }}>
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
export function RegimeMaps({
  sweep,
  wide,
  meets,
}: {
  sweep: MapSource;
  wide: boolean;
  meets?: ReadonlyMap<number, boolean | null>;
}) {
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
        <RegimeMap sweep={sweep} model="deterministic" meets={meets} />
        <RegimeMap sweep={sweep} model="stochastic" meets={meets} />
      </View>
    </View>
  );
}
