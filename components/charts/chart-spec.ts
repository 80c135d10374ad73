/**
 * A chart described as plain data. Screens build specs (cheap, testable, no
 * Skia); the lazily loaded renderer (chart-renderer.tsx) draws them with
 * victory-native. Every spec carries a text description for screen readers.
 */
export type ChartRow = { x: number } & Record<string, number | null>;

export type ChartLayer =
  | {
      type: "line";
      key: string;
      color: string;
      width?: number;
      curve?: "linear" | "stepAfter" | "monotoneX";
      opacity?: number;
    }
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
  /** Logarithmic x axis (values are plotted as log10 and labelled back). */
  logX?: boolean;
};

/** Every numeric key that a layer reads (the chart's yKeys). */
export function seriesKeys(spec: ChartSpec): string[] {
  const keys = new Set<string>();
  for (const l of spec.layers) {
    if (l.type === "band") {
      keys.add(l.lower);
      keys.add(l.upper);
    } else keys.add(l.key);
  }
  return [...keys];
}

export function formatNumber(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "–";
  const a = Math.abs(v);
  if (a !== 0 && (a >= 1e5 || a < 1e-3)) return v.toExponential(2);
  return Number(v.toPrecision(digits)).toLocaleString("en");
}
