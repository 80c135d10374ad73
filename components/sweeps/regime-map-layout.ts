/**
 * The cells of a regime map: a sweep's points laid out on its axes (one axis:
 * one row; two axes: rows are the first axis, columns the second, point index
 * i * columns + j as the server numbers them), each with its behaviour label
 * for the chosen model and which of its right and lower edges are boundaries
 * (the neighbour there has another label).
 */
import type { RegimeLabelValue } from "@/shared/schemas/regime";
import type { SweepDetail } from "@/shared/schemas/api-runs";

export type MapModel = "deterministic" | "stochastic";

export interface MapCell {
  row: number;
  col: number;
  runId: string | null;
  label: RegimeLabelValue | null;
  values: Record<string, number>;
  boundaryRight: boolean;
  boundaryBelow: boolean;
}

export interface MapLayout {
  rowAxis: { parameter: string; values: number[] } | null;
  colAxis: { parameter: string; values: number[] };
  cells: MapCell[][];
  /** Labels present, in vocabulary order of first appearance. */
  labels: RegimeLabelValue[];
  /** Boundary edges drawn (for the caption and tests). */
  boundaries: number;
}

export function regimeMapLayout(sweep: Pick<SweepDetail, "axes" | "points">, model: MapModel): MapLayout {
  const [a0, a1] = sweep.axes;
  const colAxis = a1 ?? a0;
  const rowAxis = a1 ? a0 : null;
  const nRows = rowAxis ? rowAxis.values.length : 1;
  const nCols = colAxis.values.length;
  const byIndex = new Map(sweep.points.map((p) => [p.index, p]));
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
  return { rowAxis, colAxis, cells, labels: [...seen], boundaries };
}
