/**
 * A chart described as plain data. Screens build specs (cheap, testable, no
 * Skia); the lazily loaded renderer (chart-renderer.tsx) draws them with
 * victory-native, and svg-writer.ts writes the same spec as an SVG image
 * (Skia has no SVG output). Every spec carries a text description for screen
 * readers. A null value is "no data here": lines and bands break at it.
 */
export { formatNumber } from "@/shared/number-format";

export type ChartRow = { x: number } & Record<string, number | null>;

export type ChartLayer =
  | {
      type: "line";
      key: string;
      color: string;
      width?: number;
      curve?: "linear" | "stepAfter" | "monotoneX";
      opacity?: number;
      /** Dotted: an estimate drawn between data points (no data on the segment itself). */
      dashed?: boolean;
    }
  | { type: "errorBars"; lower: string; upper: string; color: string; width?: number }
  | { type: "band"; lower: string; upper: string; color: string; opacity?: number }
  | { type: "points"; key: string; color: string; radius?: number }
  | { type: "bars"; key: string; color: string }
  | { type: "area"; key: string; color: string; opacity?: number; curve?: "linear" | "stepAfter" };

export type ChartSpec = {
  /** Accessible name of the chart. */
  title: string;
  /** One or two sentences a screen reader reads instead of the drawing. */
  description: string;
  xLabel: string;
  yLabel: string;
  rows: ChartRow[];
  layers: ChartLayer[];
  legend: { label: string; color: string; dashed?: boolean }[];
  xDomain?: [number, number];
  yDomain?: [number, number];
  height?: number;
  /** Logarithmic x axis (values are plotted as log10 and labelled back); ticks 1, 2, 5, 10, ... */
  logX?: boolean;
  /** Remarks printed under the chart and in its image, e.g. why a point is a gap. */
  notes?: string[];
};

/** Every numeric key that a layer reads (the chart's yKeys). */
export function seriesKeys(spec: ChartSpec): string[] {
  const keys = new Set<string>();
  for (const l of spec.layers) {
    if (l.type === "band" || l.type === "errorBars") {
      keys.add(l.lower);
      keys.add(l.upper);
    } else keys.add(l.key);
  }
  return [...keys];
}
