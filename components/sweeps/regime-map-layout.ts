/**
 * The cells of a regime map: a sweep's points laid out on its axes (one axis:
 * one row; two axes: rows are the first axis, columns the second, point index
 * i * columns + j as the server numbers them), each with its behaviour label
 * for the chosen model and which of its right and lower edges are boundaries
 * (the neighbour there has another label).
 */
import type { RegimeLabelValue } from "@/shared/schemas/regime";

export type MapModel = "deterministic" | "stochastic";

/** What a map is drawn from: a sweep's points, or a mean-field map's (runId null, no stochastic label). */
export interface MapSource {
  axes: { parameter: string; values: number[] }[];
  points: {
    index: number;
    runId: string | null;
    values: Record<string, number>;
    refined?: boolean;
    regime?: { deterministic: RegimeLabelValue | null; stochastic: RegimeLabelValue | null } | null;
  }[];
}

/** A point added by boundary refinement, drawn as a marker on the edge it lies on. */
export interface RefinedMarker {
  index: number;
  runId: string | null;
  label: RegimeLabelValue | null;
  values: Record<string, number>;
}

export interface MapCell {
  row: number;
  col: number;
  runId: string | null;
  label: RegimeLabelValue | null;
  values: Record<string, number>;
  boundaryRight: boolean;
  boundaryBelow: boolean;
  /** Refined points half-way to the right and lower neighbours. */
  refinedRight?: RefinedMarker;
  refinedBelow?: RefinedMarker;
  /** Whether the point meets the design target shown (undefined: no target). */
  meets?: boolean | null;
}

export interface MapLayout {
  rowAxis: { parameter: string; values: number[] } | null;
  colAxis: { parameter: string; values: number[] };
  cells: MapCell[][];
  /** Labels present, in vocabulary order of first appearance. */
  labels: RegimeLabelValue[];
  /** Boundary edges drawn (for the caption and tests). */
  boundaries: number;
  /** Every refined point, in index order (also those that could not be placed on an edge). */
  refined: RefinedMarker[];
}

const near = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
const between = (v: number, a: number, b: number) => v > Math.min(a, b) && v < Math.max(a, b);

export function regimeMapLayout(
  sweep: MapSource,
  model: MapModel,
  meets?: ReadonlyMap<number, boolean | null>,
): MapLayout {
  const [a0, a1] = sweep.axes;
  const colAxis = a1 ?? a0;
  const rowAxis = a1 ? a0 : null;
  const nRows = rowAxis ? rowAxis.values.length : 1;
  const nCols = colAxis.values.length;
  const byIndex = new Map(sweep.points.filter((p) => !p.refined).map((p) => [p.index, p]));
  const cells: MapCell[][] = [];
  const seen = new Set<RegimeLabelValue>();
  for (let i = 0; i < nRows; i++) {
    const row: MapCell[] = [];
    for (let j = 0; j < nCols; j++) {
      const index = rowAxis ? i * nCols + j : j;
      const p = byIndex.get(index);
      const label = p?.regime?.[model] ?? null;
      if (label) seen.add(label);
      const values: Record<string, number> = {};
      if (rowAxis) values[rowAxis.parameter] = rowAxis.values[i];
      values[colAxis.parameter] = colAxis.values[j];
      row.push({
        row: i,
        col: j,
        runId: p?.runId ?? null,
        label,
        values,
        boundaryRight: false,
        boundaryBelow: false,
        meets: meets ? (meets.get(index) ?? null) : undefined,
      });
    }
    cells.push(row);
  }
  let boundaries = 0;
  for (let i = 0; i < nRows; i++)
    for (let j = 0; j < nCols; j++) {
      const c = cells[i][j];
      const right = cells[i][j + 1];
      const below = cells[i + 1]?.[j];
      if (right && c.label && right.label && c.label !== right.label) {
        c.boundaryRight = true;
        boundaries++;
      }
      if (below && c.label && below.label && c.label !== below.label) {
        c.boundaryBelow = true;
        boundaries++;
      }
    }
  const refined: RefinedMarker[] = [];
  for (const p of sweep.points) {
    if (!p.refined) continue;
    const m: RefinedMarker = { index: p.index, runId: p.runId, label: p.regime?.[model] ?? null, values: p.values };
    if (m.label) seen.add(m.label);
    refined.push(m);
    const cv = p.values[colAxis.parameter];
    const rv = rowAxis ? p.values[rowAxis.parameter] : undefined;
    const i = rowAxis ? rowAxis.values.findIndex((v) => near(v, rv!)) : 0;
    const j = colAxis.values.findIndex((v) => near(v, cv));
    if (i >= 0 && j < 0) {
      const jj = colAxis.values.findIndex((v, k) => k + 1 < nCols && between(cv, v, colAxis.values[k + 1]));
      if (jj >= 0) cells[i][jj].refinedRight = m;
    } else if (rowAxis && j >= 0 && i < 0) {
      const ii = rowAxis.values.findIndex((v, k) => k + 1 < nRows && between(rv!, v, rowAxis.values[k + 1]));
      if (ii >= 0) cells[ii][j].refinedBelow = m;
    }
  }
  return { rowAxis, colAxis, cells, labels: [...seen], boundaries, refined };
}
