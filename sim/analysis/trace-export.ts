/**
 * The CSV exports of an uploaded trace set and their data dictionary, by the
 * same rule as a run's (./csv-export.ts, docs/metrics.md "Exports"): one row
 * per (cell, analysed pulse) in metrics.csv, one row per output pulse in
 * output-pulses.csv, snake_case names ending in their unit (`_min`,
 * `_trace_units` for levels in the upload's own units), booleans true/false,
 * and a `synthetic` column so demo data stay labelled in every row.
 */
import type { TraceAnalysis } from "@/shared/schemas/api-traces";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { toCsv, type ExportColumn } from "./csv-export";
import { field, packageName, tableResource, EXPORT_CONVENTIONS, type DataPackage } from "./export-dictionary";

type TracePulse = PulseStat & { longestGapMinutes: number };
interface TraceRow {
  cell: string;
  p: TracePulse;
  threshold: number;
  synthetic: boolean;
}

export const TRACE_METRIC_COLUMNS: readonly ExportColumn<TraceRow>[] = [
  { name: "cell", type: "string", unit: null, description: "Cell id as uploaded.", get: (r) => r.cell },
  {
    name: "pulse_index",
    type: "integer",
    unit: null,
    description: "Input pulse index in the schedule, from 0.",
    get: (r) => r.p.pulseIndex,
  },
  { name: "on_min", type: "number", unit: "min", description: "Time the input pulse switched on.", get: (r) => r.p.on },
  { name: "off_min", type: "number", unit: "min", description: "Time it switched off.", get: (r) => r.p.off },
  {
    name: "duration_min",
    type: "number",
    unit: "min",
    description: "Input pulse duration used for the per-duration figures.",
    get: (r) => r.p.durationBin,
  },
  {
    name: "excluded",
    type: "boolean",
    unit: null,
    description: "The cell was already above threshold at on: left out of pass and delay figures.",
    get: (r) => r.p.excluded,
  },
  {
    name: "passed",
    type: "boolean",
    unit: null,
    description: "The trace crossed the threshold upwards within the response window.",
    get: (r) => r.p.passed,
  },
  {
    name: "delay_min",
    type: "number",
    unit: "min",
    description: "Response delay (first up-crossing minus on). Empty = no response in the window.",
    get: (r) => r.p.delay,
  },
  {
    name: "off_delay_min",
    type: "number",
    unit: "min",
    description: "OFF delay (first down-crossing minus off). Empty = none in the window.",
    get: (r) => r.p.offDelay,
  },
  {
    name: "output_pulses",
    type: "integer",
    unit: null,
    description: "Output pulses starting in the window; their widths are rows of output-pulses.csv.",
    get: (r) => r.p.widths.length,
  },
  {
    name: "peak_trace_units",
    type: "number",
    unit: "trace units",
    description: "Highest (preprocessed) trace value in the window, in the upload's units.",
    get: (r) => r.p.peak,
  },
  {
    name: "time_to_peak_min",
    type: "number",
    unit: "min",
    description: "Time of the peak minus on.",
    get: (r) => r.p.timeToPeak,
  },
  {
    name: "fwhm_min",
    type: "number",
    unit: "min",
    description: "Full width at half maximum above the baseline. Empty = not measurable.",
    get: (r) => r.p.fwhm,
  },
  {
    name: "baseline_trace_units",
    type: "number",
    unit: "trace units",
    description: "Trace value at on.",
    get: (r) => r.p.baseline,
  },
  {
    name: "threshold_trace_units",
    type: "number",
    unit: "trace units",
    description: "The cell's threshold in trace units: background + scale x threshold in molecules.",
    get: (r) => r.threshold,
  },
  {
    name: "longest_gap_min",
    type: "number",
    unit: "min",
    description: "Longest gap between samples inside the window.",
    get: (r) => r.p.longestGapMinutes,
  },
  {
    name: "synthetic",
    type: "boolean",
    unit: null,
    description: "true = synthetic traces made by Linger from hidden parameters (demo data, not measurements).",
    get: (r) => r.synthetic,
  },
];

interface TraceWidthRow {
  cell: string;
  pulseIndex: number;
  k: number;
  width: number;
}
export const TRACE_OUTPUT_PULSE_COLUMNS: readonly ExportColumn<TraceWidthRow>[] = [
  { name: "cell", type: "string", unit: null, description: "Cell id as uploaded.", get: (r) => r.cell },
  {
    name: "pulse_index",
    type: "integer",
    unit: null,
    description: "The input pulse in whose window the output pulse started (metrics.csv).",
    get: (r) => r.pulseIndex,
  },
  {
    name: "output_pulse_index",
    type: "integer",
    unit: null,
    description: "Order of the output pulse within that window, from 0.",
    get: (r) => r.k,
  },
  {
    name: "width_min",
    type: "number",
    unit: "min",
    description: "Output pulse width: up-crossing of the threshold to the next down-crossing of the lower level.",
    get: (r) => r.width,
  },
];

const rowsOf = (analysis: TraceAnalysis, synthetic: boolean): TraceRow[] =>
  analysis.cells.flatMap((c) =>
    (c.pulses as TracePulse[]).map((p) => ({ cell: c.cell, p, threshold: c.thresholdTraceUnits, synthetic })),
  );

/** metrics.csv: one row per (cell, analysed pulse). */
export function traceMetricsCsv(analysis: TraceAnalysis, synthetic: boolean): string {
  return toCsv(TRACE_METRIC_COLUMNS, rowsOf(analysis, synthetic));
}

/** output-pulses.csv of a trace set: one row per output pulse. */
export function traceOutputPulsesCsv(analysis: TraceAnalysis): string {
  const rows: TraceWidthRow[] = [];
  for (const c of analysis.cells)
    for (const p of c.pulses)
      p.widths.forEach((width, k) => rows.push({ cell: c.cell, pulseIndex: p.pulseIndex, k, width }));
  return toCsv(TRACE_OUTPUT_PULSE_COLUMNS, rows);
}

/** datapackage.json of a trace set's exports, files named `<filePrefix>-<file>`. */
export function traceDataPackage(opts: { title: string; filePrefix: string; synthetic: boolean }): DataPackage {
  const label = opts.synthetic ? " SYNTHETIC traces made by Linger (demo data, not measurements)." : "";
  return {
    profile: "tabular-data-package",
    name: packageName(opts.title),
    title: opts.title,
    description: `Per-cell, per-pulse figures of an uploaded trace set (definitions in docs/metrics.md and docs/traces.md).${label}`,
    conventions: EXPORT_CONVENTIONS + " Levels measured in the upload's own units end in _trace_units.",
    settings: null,
    method: null,
    synthetic: opts.synthetic,
    resources: [
      tableResource({
        name: "metrics",
        path: `${opts.filePrefix}-metrics.csv`,
        title: "Cells and pulses",
        description: "One row per (cell, analysed input pulse).",
        fields: TRACE_METRIC_COLUMNS.map(field),
        primaryKey: ["cell", "pulse_index"],
      }),
      tableResource({
        name: "output-pulses",
        path: `${opts.filePrefix}-output-pulses.csv`,
        title: "Output pulses",
        description: "One row per output pulse, keyed to its cell and input pulse.",
        fields: TRACE_OUTPUT_PULSE_COLUMNS.map(field),
        primaryKey: ["cell", "pulse_index", "output_pulse_index"],
        foreignKeys: [
          { fields: ["cell", "pulse_index"], reference: { resource: "metrics", fields: ["cell", "pulse_index"] } },
        ],
      }),
    ],
  };
}
