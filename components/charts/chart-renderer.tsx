/**
 * Draws a ChartSpec with victory-native (Skia). Loaded lazily (see lazy-chart.tsx)
 * so the chart engine and its wasm stay out of the first-load bundle.
 */
import React from "react";
import { View } from "react-native";
import { DashPathEffect, Path, Skia, useFont } from "@shopify/react-native-skia";
import { CartesianChart, Line, Area, AreaRange, Scatter, Bar } from "victory-native";
import type { ChartSpec } from "./chart-spec";
import { seriesKeys } from "./chart-spec";
import { formatNumber } from "@/shared/number-format";
import { chartScales } from "./svg-writer";

type Pt = { x: number; y?: number | null };

/** Vertical interval bars with caps at each x where both ends are defined. */
function ErrorBars({ lower, upper, color, width }: { lower: Pt[]; upper: Pt[]; color: string; width: number }) {
  const path = React.useMemo(() => {
    const p = Skia.PathBuilder.Make();
    lower.forEach((lo, i) => {
      const hi = upper[i];
      if (!hi || typeof lo.y !== "number" || typeof hi.y !== "number") return;
      p.moveTo(lo.x, lo.y);
      p.lineTo(hi.x, hi.y);
      p.moveTo(lo.x - 4, lo.y);
      p.lineTo(lo.x + 4, lo.y);
      p.moveTo(hi.x - 4, hi.y);
      p.lineTo(hi.x + 4, hi.y);
    });
    return p.build();
  }, [lower, upper]);
  return <Path path={path} style="stroke" strokeWidth={width} color={color} />;
}

export type ChartRendererProps = { spec: ChartSpec; colors: { text: string; grid: string; frame: string } };

const INTER = require("@expo-google-fonts/inter/400Regular/Inter_400Regular.ttf");

export default function ChartRenderer({ spec, colors }: ChartRendererProps) {
  const font = useFont(INTER, 11);
  const keys = seriesKeys(spec);
  const rows = spec.logX ? spec.rows.map((r) => ({ ...r, x: Math.log10(Math.max(r.x, 1e-9)) })) : spec.rows;
  // The same domain and the same nice ticks as the chart image (1, 2, 5, 10, ... on a log axis), every one of
  // them drawn: tickCount equal to the number of ticks (a smaller count makes victory-native drop some), and a
  // little padding below the lowest tick so its label is not clipped at the bottom edge.
  const scales = chartScales(spec);
  const xTicks = scales.xTicks.map(scales.tx);
  const yTicks = scales.yTicks;
  const domain = {
    x: [scales.tx(scales.x0), scales.tx(scales.x1)] as [number, number],
    y: [scales.y0, scales.y1] as [number, number],
  };
  // victory-native's generics want literal keys; the spec is dynamic, so the props are built loosely.
  const Chart = CartesianChart as unknown as React.ComponentType<Record<string, unknown>>;
  return (
    <View style={{ height: spec.height ?? 240, width: "100%" }}>
      <Chart
        data={rows}
        xKey="x"
        yKeys={keys}
        domain={domain}
        padding={{ left: 4, right: 12, top: 8, bottom: 4 }}
        domainPadding={{ top: 8, bottom: 8, left: 8, right: 8 }}
        xAxis={{
          font,
          labelColor: colors.text,
          lineColor: colors.grid,
          tickCount: xTicks.length >= 2 ? xTicks.length : 6,
          tickValues: xTicks.length >= 2 ? xTicks : undefined,
          formatXLabel: (v: number) => formatNumber(spec.logX ? Math.pow(10, v) : v, 3),
        }}
        yAxis={[
          {
            font,
            labelColor: colors.text,
            lineColor: colors.grid,
            tickCount: yTicks.length >= 2 ? yTicks.length : 5,
            tickValues: yTicks.length >= 2 ? yTicks : undefined,
            formatYLabel: (v: number) => formatNumber(v, 3),
          },
        ]}
        frame={{ lineColor: colors.frame, lineWidth: 1 }}
      >
        {({ points, chartBounds }: { points: Record<string, never>; chartBounds: never }) => (
          <>
            {spec.layers.map((l, i) => {
              if (l.type === "band")
                return (
                  <AreaRange
                    key={i}
                    upperPoints={points[l.upper]}
                    lowerPoints={points[l.lower]}
                    color={l.color}
                    opacity={l.opacity ?? 0.22}
                  />
                );
              if (l.type === "area")
                return (
                  <Area
                    key={i}
                    points={points[l.key]}
                    y0={(chartBounds as { bottom: number }).bottom}
                    color={l.color}
                    opacity={l.opacity ?? 0.2}
                    curveType={l.curve ?? "linear"}
                  />
                );
              if (l.type === "errorBars")
                return (
                  <ErrorBars
                    key={i}
                    lower={points[l.lower] as unknown as Pt[]}
                    upper={points[l.upper] as unknown as Pt[]}
                    color={l.color}
                    width={l.width ?? 1.5}
                  />
                );
              if (l.type === "points")
                return <Scatter key={i} points={points[l.key]} radius={l.radius ?? 4} color={l.color} />;
              if (l.type === "bars")
                return (
                  <Bar
                    key={i}
                    points={points[l.key]}
                    chartBounds={chartBounds}
                    color={l.color}
                    innerPadding={0.15}
                    roundedCorners={{ topLeft: 2, topRight: 2 }}
                  />
                );
              return (
                <Line
                  key={i}
                  points={points[l.key]}
                  color={l.color}
                  strokeWidth={l.width ?? 2}
                  curveType={l.curve ?? "linear"}
                  opacity={l.opacity ?? 1}
                >
                  {l.dashed ? <DashPathEffect intervals={[4, 4]} /> : null}
                </Line>
              );
            })}
          </>
        )}
      </Chart>
    </View>
  );
}
