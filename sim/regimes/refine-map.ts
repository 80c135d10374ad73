/**
 * Adaptive refinement of a regime map (docs/regimes.md): after a coarse grid,
 * new points at the midpoints of every pair of neighbouring cells whose labels
 * differ (geometric midpoint on a log-spaced axis, arithmetic otherwise),
 * each with a seed fixed by its coordinates alone, capped at
 * MAX_REFINEMENT_POINTS extra points per map. Resumable: points already added
 * (by coordinates) are not proposed again and count against the cap.
 *
 * Example: refinementPoints({ axes: [{ parameter: "K", values: [10, 100] }], labels: ["steady", "memory"] })
 *   // [{ K: 31.62... }]
 */
import type { MapAxis } from "./deterministic-map";
import { API_LIMITS } from "@/shared/schemas/api-runs";

/** The documented cap (shared/limits.ts, README "Limits"). */
export const MAX_REFINEMENT_POINTS = API_LIMITS.maxRefinementPoints;

export interface RefinementInput {
  axes: MapAxis[];
  /** Labels of the grid points in point order (i * columns + j); null where not computed. */
  labels: (string | null)[];
  /** Extra points already added (their coordinates). */
  existing?: Record<string, number>[];
  cap?: number;
}

/** An axis is log-spaced when its values are positive with a constant ratio (to 1e-6). */
export function isLogAxis(values: number[]): boolean {
  if (values.length < 3 || values.some((v) => !(v > 0))) return false;
  const r = values[1] / values[0];
  if (Math.abs(r - 1) < 1e-9) return false;
  return values.every((v, i) => i === 0 || Math.abs(v / values[i - 1] / r - 1) < 1e-6);
}

const midpoint = (a: number, b: number, log: boolean) => (log ? Math.sqrt(a * b) : (a + b) / 2);

/** Coordinates as a stable text key (12 significant digits, parameters in axis order). */
export function coordinateKey(values: Record<string, number>): string {
  return Object.entries(values)
    .map(([k, v]) => `${k}=${Number(v.toPrecision(12))}`)
    .join(";");
}

/** A point's seed from the map's seed and its coordinates only (FNV-1a 32-bit of the coordinate key). */
export function refinementSeed(baseSeed: string, values: Record<string, number>): string {
  let h = 0x811c9dc5;
  for (const ch of coordinateKey(values)) {
    h ^= ch.charCodeAt(0);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return `${baseSeed}.r${h.toString(16).padStart(8, "0")}`;
}

export function refinementPoints(input: RefinementInput): Record<string, number>[] {
  const [a, b] = input.axes;
  const cap = input.cap ?? MAX_REFINEMENT_POINTS;
  const existing = new Set((input.existing ?? []).map(coordinateKey));
  let room = cap - existing.size;
  const rows = b ? a.values.length : 1;
  const cols = b ? b.values.length : a.values.length;
  const rowAxis = b ? a : null;
  const colAxis = b ?? a;
  const logRow = rowAxis ? isLogAxis(rowAxis.values) : false;
  const logCol = isLogAxis(colAxis.values);
  const at = (i: number, j: number) => input.labels[i * cols + j] ?? null;
  const coords = (i: number, j: number): Record<string, number> =>
    rowAxis
      ? { [rowAxis.parameter]: rowAxis.values[i], [colAxis.parameter]: colAxis.values[j] }
      : { [colAxis.parameter]: colAxis.values[j] };
  const out: Record<string, number>[] = [];
  const add = (p: Record<string, number>) => {
    const k = coordinateKey(p);
    if (room <= 0 || existing.has(k)) return;
    existing.add(k);
    out.push(p);
    room--;
  };
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      const l = at(i, j);
      if (!l) continue;
      if (j + 1 < cols && at(i, j + 1) && at(i, j + 1) !== l) {
        const p = coords(i, j);
        p[colAxis.parameter] = midpoint(colAxis.values[j], colAxis.values[j + 1], logCol);
        add(p);
      }
      if (rowAxis && i + 1 < rows && at(i + 1, j) && at(i + 1, j) !== l) {
        const p = coords(i, j);
        p[rowAxis.parameter] = midpoint(rowAxis.values[i], rowAxis.values[i + 1], logRow);
        add(p);
      }
    }
  return out;
}
