/**
 * CSV exports of a run (RFC 4180 via papaparse's unparse) and their data
 * dictionary (./export-dictionary.ts), both read from one column list per
 * table so a column cannot be written without being described.
 *
 * One rule for every table (docs/metrics.md, "Exports"): one observation per
 * row, snake_case column names ending in their unit (`_min`, `_molecules`;
 * counts, fractions and ratios have none), booleans written `true` / `false`,
 * an empty cell for "not defined" (null), numbers at full precision, text cells
 * through csvCell (formula injection), rows in a fixed order so the same input
 * gives the same bytes. Output pulse widths are a long table of their own
 * (one row per output pulse), never a packed cell. Settings and the method
 * label live in the dictionary, never as rows of a table.
 */
import Papa from "papaparse";
import { csvCell } from "@/shared/csv-cell";
import type { ByDurationEntry, RunSummary } from "@/shared/schemas/analysis";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { describe } from "@/sim/stats/describe";
import type { ReplicateTotals } from "./summarize-run";

export type Cell = string | number | boolean | null;

/** One column of an export: its name (with unit), Table Schema type, unit and meaning, and how to read it from a row. */
export interface ExportColumn<R> {
  name: string;
  type: "integer" | "number" | "boolean" | "string";
  /** Unit of the values ("min", "molecules", "molecules^2"); null for counts, fractions, ratios and text. */
  unit: string | null;
  description: string;
  /** Allowed values of a string column. */
  values?: string[];
  get: (row: R) => Cell;
}

/** Writes rows with their header (or without, for a stream's later chunks). */
export function toCsv<R>(columns: readonly ExportColumn<R>[], rows: readonly R[], header = true): string {
  const data = rows.map((r) =>
    columns.map((c) => {
      const v = c.get(r);
      return v === null || (typeof v === "number" && !Number.isFinite(v)) ? "" : typeof v === "string" ? csvCell(v) : v;
    }),
  );
  const body = data.length ? Papa.unparse(data, { newline: "\n" }) + "\n" : "";
  return header ? Papa.unparse([columns.map((c) => c.name)], { newline: "\n" }) + "\n" + body : body;
}

// ---------- pulses.csv: one row per (replicate, input pulse)

export const PULSE_COLUMNS: readonly ExportColumn<PulseStat>[] = [
  { name: "replicate", type: "integer", unit: null, description: "Replicate index, from 0.", get: (p) => p.replicate },
  {
    name: "pulse_index",
    type: "integer",
    unit: null,
    description: "Input pulse index within the program, from 0.",
    get: (p) => p.pulseIndex,
  },
  { name: "on_min", type: "number", unit: "min", description: "Time the input pulse switches on.", get: (p) => p.on },
  {
    name: "off_min",
    type: "number",
    unit: "min",
    description: "Time the input pulse switches off.",
    get: (p) => p.off,
  },
  {
    name: "duration_min",
    type: "number",
    unit: "min",
    description: "Input pulse duration used for the per-duration figures (binned when the program draws durations).",
    get: (p) => p.durationBin,
  },
  {
    name: "excluded",
    type: "boolean",
    unit: null,
    description:
      "The output was already above threshold when the pulse switched on: left out of pass and delay figures.",
    get: (p) => p.excluded,
  },
  {
    name: "passed",
    type: "boolean",
    unit: null,
    description: "The output crossed the threshold upwards between on and the end of the response window.",
    get: (p) => p.passed,
  },
  {
    name: "delay_min",
    type: "number",
    unit: "min",
    description:
      "Response delay: first up-crossing at or after on, minus on. Empty = no response in the window (censored).",
    get: (p) => p.delay,
  },
  {
    name: "off_delay_min",
    type: "number",
    unit: "min",
    description: "OFF delay: first down-crossing at or after off, minus off. Empty = none in the window.",
    get: (p) => p.offDelay,
  },
  {
    name: "output_pulses",
    type: "integer",
    unit: null,
    description: "Output pulses starting in this pulse's window; their widths are rows of output-pulses.csv.",
    get: (p) => p.widths.length,
  },
  {
    name: "peak_molecules",
    type: "number",
    unit: "molecules",
    description: "Highest output in the window.",
    get: (p) => p.peak,
  },
  {
    name: "time_to_peak_min",
    type: "number",
    unit: "min",
    description: "Time of the peak minus on.",
    get: (p) => p.timeToPeak,
  },
  {
    name: "fwhm_min",
    type: "number",
    unit: "min",
    description: "Full width at half maximum above the baseline. Empty = not measurable.",
    get: (p) => p.fwhm,
  },
  {
    name: "baseline_molecules",
    type: "number",
    unit: "molecules",
    description: "Output when the pulse switched on.",
    get: (p) => p.baseline,
  },
];

const byReplicateAndPulse = (a: PulseStat, b: PulseStat) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex;

/** pulses.csv: one row per (replicate, input pulse), in (replicate, pulse) order. */
export function pulseStatsCsv(pulses: readonly PulseStat[], header = true): string {
  return toCsv(PULSE_COLUMNS, [...pulses].sort(byReplicateAndPulse), header);
}

// ---------- output-pulses.csv: one row per output pulse

export interface OutputPulseRow {
  replicate: number;
  pulseIndex: number;
  outputPulseIndex: number;
  width: number;
}

export const OUTPUT_PULSE_COLUMNS: readonly ExportColumn<OutputPulseRow>[] = [
  { name: "replicate", type: "integer", unit: null, description: "Replicate index, from 0.", get: (r) => r.replicate },
  {
    name: "pulse_index",
    type: "integer",
    unit: null,
    description: "The input pulse in whose window the output pulse started (pulses.csv).",
    get: (r) => r.pulseIndex,
  },
  {
    name: "output_pulse_index",
    type: "integer",
    unit: null,
    description: "Order of the output pulse within that window, from 0.",
    get: (r) => r.outputPulseIndex,
  },
  {
    name: "width_min",
    type: "number",
    unit: "min",
    description:
      "Output pulse width: from an up-crossing of the threshold to the next down-crossing of threshold x (1 - hysteresis).",
    get: (r) => r.width,
  },
];

export function outputPulseRows(pulses: readonly PulseStat[]): OutputPulseRow[] {
  const rows: OutputPulseRow[] = [];
  for (const p of [...pulses].sort(byReplicateAndPulse))
    p.widths.forEach((width, k) =>
      rows.push({ replicate: p.replicate, pulseIndex: p.pulseIndex, outputPulseIndex: k, width }),
    );
  return rows;
}

/** output-pulses.csv: one row per output pulse (the widths that pulses.csv counts). */
export function outputPulsesCsv(pulses: readonly PulseStat[], header = true): string {
  return toCsv(OUTPUT_PULSE_COLUMNS, outputPulseRows(pulses), header);
}

// ---------- replicates.csv: one row per replicate

interface ReplicateRow {
  r: ReplicateTotals;
  pulses: number;
  evaluable: number;
  passed: number;
  medianDelay: number | null;
  outputPulses: number;
  medianWidth: number | null;
}

export const REPLICATE_COLUMNS: readonly ExportColumn<ReplicateRow>[] = [
  {
    name: "replicate",
    type: "integer",
    unit: null,
    description: "Replicate index, from 0.",
    get: (x) => x.r.replicate,
  },
  { name: "events", type: "integer", unit: null, description: "Reaction firings simulated.", get: (x) => x.r.events },
  {
    name: "capped",
    type: "boolean",
    unit: null,
    description: "Stopped at the event cap before the end time.",
    get: (x) => x.r.capped,
  },
  {
    name: "output_mean_molecules",
    type: "number",
    unit: "molecules",
    description: "Time-averaged output (see docs/engine.md). Empty = unknown.",
    get: (x) => x.r.outputMean,
  },
  {
    name: "output_variance_molecules2",
    type: "number",
    unit: "molecules^2",
    description: "Time-averaged variance of the output about its mean. Empty = unknown.",
    get: (x) => x.r.outputVar,
  },
  {
    name: "output_fano",
    type: "number",
    unit: null,
    description: "Fano factor of the output: variance / mean. Empty when the mean is 0 or unknown.",
    get: (x) => (x.r.outputMean > 0 ? x.r.outputVar / x.r.outputMean : null),
  },
  {
    name: "pulses",
    type: "integer",
    unit: null,
    description: "Input pulses whose window opened.",
    get: (x) => x.pulses,
  },
  {
    name: "evaluable_pulses",
    type: "integer",
    unit: null,
    description: "Pulses not excluded (output below threshold at on).",
    get: (x) => x.evaluable,
  },
  {
    name: "excluded_pulses",
    type: "integer",
    unit: null,
    description: "Pulses that started with the output above threshold.",
    get: (x) => x.pulses - x.evaluable,
  },
  { name: "passed_pulses", type: "integer", unit: null, description: "Evaluable pulses passed.", get: (x) => x.passed },
  {
    name: "pass_fraction",
    type: "number",
    unit: null,
    description: "passed_pulses / evaluable_pulses. Empty with no evaluable pulse.",
    get: (x) => (x.evaluable ? x.passed / x.evaluable : null),
  },
  {
    name: "median_observed_delay_min",
    type: "number",
    unit: "min",
    description: "Median of the observed (uncensored) response delays of this replicate; not a Kaplan-Meier figure.",
    get: (x) => x.medianDelay,
  },
  {
    name: "output_pulses",
    type: "integer",
    unit: null,
    description: "Output pulses in the windows of the evaluable pulses.",
    get: (x) => x.outputPulses,
  },
  {
    name: "median_width_min",
    type: "number",
    unit: "min",
    description: "Median output pulse width of this replicate.",
    get: (x) => x.medianWidth,
  },
];

/** replicates.csv: one row per replicate, simulation totals, output moments and its pulse figures. */
export function replicateStatsCsv(pulses: readonly PulseStat[], replicates: readonly ReplicateTotals[]): string {
  const byRep = new Map<number, PulseStat[]>();
  for (const p of pulses) {
    if (!byRep.has(p.replicate)) byRep.set(p.replicate, []);
    byRep.get(p.replicate)!.push(p);
  }
  const rows = [...replicates]
    .sort((a, b) => a.replicate - b.replicate)
    .map((r): ReplicateRow => {
      const ps = byRep.get(r.replicate) ?? [];
      const ev = ps.filter((p) => !p.excluded);
      const widths = ev.flatMap((p) => p.widths);
      return {
        r,
        pulses: ps.length,
        evaluable: ev.length,
        passed: ev.filter((p) => p.passed).length,
        medianDelay: describe(ev.map((p) => p.delay).filter((d): d is number => d !== null)).median,
        outputPulses: widths.length,
        medianWidth: describe(widths).median,
      };
    });
  return toCsv(REPLICATE_COLUMNS, rows);
}

// ---------- aggregates.csv: one row per input pulse duration

type DurationRow = { e: ByDurationEntry; fitted: number | null };

export const DURATION_COLUMNS: readonly ExportColumn<DurationRow>[] = [
  {
    name: "duration_min",
    type: "number",
    unit: "min",
    description: "Input pulse duration (one row per distinct duration).",
    get: (x) => x.e.duration,
  },
  {
    name: "pulses",
    type: "integer",
    unit: null,
    description: "Evaluable (replicate, input pulse) pairs of this duration.",
    get: (x) => x.e.pulses,
  },
  { name: "passed", type: "integer", unit: null, description: "Of those, passed.", get: (x) => x.e.passed },
  {
    name: "pass_probability",
    type: "number",
    unit: null,
    description: "passed / pulses. Empty with no pulses.",
    get: (x) => x.e.passProbability,
  },
  {
    name: "pass_ci_low",
    type: "number",
    unit: null,
    description: "Lower end of the Wilson score 95% interval of pass_probability (Wilson 1927).",
    get: (x) => (x.e.ci ? x.e.ci[0] : null),
  },
  {
    name: "pass_ci_high",
    type: "number",
    unit: null,
    description: "Upper end of the Wilson score 95% interval of pass_probability.",
    get: (x) => (x.e.ci ? x.e.ci[1] : null),
  },
  {
    name: "fitted_pass_probability",
    type: "number",
    unit: null,
    description: "The logistic smooth at this duration (a shape assumption; see its goodness of fit in summary.json).",
    get: (x) => x.fitted,
  },
  {
    name: "median_delay_min",
    type: "number",
    unit: "min",
    description:
      "Kaplan-Meier median response delay within this duration (censoring at the window end respected). Empty = see median_delay_status.",
    get: (x) => x.e.medianDelay,
  },
  {
    name: "median_delay_ci_low_min",
    type: "number",
    unit: "min",
    description: "Lower end of the Brookmeyer-Crowley 95% interval of the median. Empty = not reached.",
    get: (x) => x.e.medianDelayCi[0],
  },
  {
    name: "median_delay_ci_high_min",
    type: "number",
    unit: "min",
    description: "Upper end of that interval. Empty = not reached.",
    get: (x) => x.e.medianDelayCi[1],
  },
  {
    name: "median_delay_status",
    type: "string",
    unit: null,
    values: ["estimate", "not-reached", "no-pulses"],
    description:
      "estimate = median_delay_min is a number; not-reached = fewer than half of the pulses responded; no-pulses = nothing to estimate from.",
    get: (x) =>
      x.e.medianDelayStatus ?? (x.e.medianDelay !== null ? "estimate" : x.e.pulses ? "not-reached" : "no-pulses"),
  },
  {
    name: "censored",
    type: "integer",
    unit: null,
    description: "Pulses with no response in their window.",
    get: (x) => x.e.censored,
  },
  {
    name: "excluded",
    type: "integer",
    unit: null,
    description: "Pulses that started with the output above threshold (not in pulses).",
    get: (x) => x.e.excluded,
  },
  {
    name: "median_width_min",
    type: "number",
    unit: "min",
    description: "Median output pulse width over the output pulses in these pulses' windows.",
    get: (x) => x.e.medianWidth,
  },
  {
    name: "median_peak_molecules",
    type: "number",
    unit: "molecules",
    description: "Median peak output in the window.",
    get: (x) => x.e.medianPeak,
  },
  {
    name: "median_off_delay_min",
    type: "number",
    unit: "min",
    description: "Median OFF delay among passed pulses with a down-crossing in the window.",
    get: (x) => x.e.medianOffDelay,
  },
];

/** aggregates.csv: the filter curve and per-duration figures, one row per duration. */
export function byDurationCsv(summary: RunSummary): string {
  const rows = summary.byDuration.map((e) => ({
    e,
    fitted: summary.logistic.fitted.find((f) => f.duration === e.duration)?.passProbability ?? null,
  }));
  return toCsv(DURATION_COLUMNS, rows);
}

// ---------- headline.csv: one row per headline figure (a long table: metric, value, unit)

interface HeadlineRow {
  metric: string;
  value: number | null;
  unit: string | null;
  description: string;
}

export const HEADLINE_COLUMNS: readonly ExportColumn<HeadlineRow>[] = [
  {
    name: "metric",
    type: "string",
    unit: null,
    description:
      "Name of the figure (snake_case, with its unit as in the unit column; see the dictionary's metrics list).",
    get: (r) => r.metric,
  },
  { name: "value", type: "number", unit: null, description: "Its value. Empty = not defined.", get: (r) => r.value },
  {
    name: "unit",
    type: "string",
    unit: null,
    description: "Unit of value: min, molecules, or empty for counts, fractions and ratios.",
    get: (r) => r.unit ?? "",
  },
];

/** One headline figure: its name (with unit), unit, meaning and how to read it from a summary. */
export interface HeadlineMetric {
  metric: string;
  unit: string | null;
  description: string;
  get: (s: RunSummary) => number | null;
}
const m = (
  metric: string,
  get: (s: RunSummary) => number | null,
  unit: string | null,
  description: string,
): HeadlineMetric => ({ metric, get, unit, description });

/** The rows of headline.csv, in order (the data dictionary lists them with their meaning). */
export const HEADLINE_METRICS: readonly HeadlineMetric[] = [
  m("replicates", (s) => s.counts.replicates, null, "Replicates simulated."),
  m("capped_replicates", (s) => s.counts.cappedReplicates, null, "Replicates stopped at the event cap."),
  m("events_total", (s) => s.counts.events.total, null, "Reaction firings over all replicates."),
  m("pulse_records", (s) => s.counts.pulses, null, "(replicate, input pulse) pairs whose window opened."),
  m("evaluable_pulses", (s) => s.counts.evaluable, null, "Pulse records not excluded."),
  m("excluded_pulses", (s) => s.counts.excluded, null, "Pulse records that started with the output above threshold."),
  m("passed_pulses", (s) => s.counts.passed, null, "Evaluable pulses passed."),
  m(
    "d50_min",
    (s) => s.d50,
    "min",
    "Duration passed half the time, from the monotone pass curve. Empty = see d50Note in summary.json.",
  ),
  m("d50_ci_low_min", (s) => (s.d50Ci ? s.d50Ci[0] : null), "min", "Lower end of the d50 95% interval."),
  m("d50_ci_high_min", (s) => (s.d50Ci ? s.d50Ci[1] : null), "min", "Upper end of the d50 95% interval."),
  m(
    "logistic_slope_per_ln_duration",
    (s) => s.logistic.slopePerLogMinute,
    null,
    "Slope of the logistic smooth per unit of ln(duration / 1 min).",
  ),
  m("false_pass_rate", (s) => s.falsePassRate, null, "Pass fraction of pulses shorter than the noise duration."),
  m("false_pass_ci_low", (s) => (s.falsePass ? s.falsePass.ci[0] : null), null, "Wilson 95% interval, lower end."),
  m("false_pass_ci_high", (s) => (s.falsePass ? s.falsePass.ci[1] : null), null, "Wilson 95% interval, upper end."),
  m(
    "median_delay_min",
    (s) => s.delay.median,
    "min",
    "Kaplan-Meier median response delay over the durations passed in most pulses (delayCoverage in summary.json says which). Empty = not reached or none.",
  ),
  m("median_delay_ci_low_min", (s) => s.delay.medianCi[0], "min", "Brookmeyer-Crowley 95% interval, lower end."),
  m("median_delay_ci_high_min", (s) => s.delay.medianCi[1], "min", "Brookmeyer-Crowley 95% interval, upper end."),
  m("delay_pooled_pulses", (s) => s.delay.evaluable, null, "Evaluable pulses in the pooled delay figure."),
  m("censored_pulses", (s) => s.delay.censored, null, "Of those, with no response in the window."),
  m("median_off_delay_min", (s) => s.offDelay.median, "min", "Kaplan-Meier median OFF delay of passed pulses."),
  m(
    "delay_cost_min_duration_min",
    (s) => (s.delayCost ? s.delayCost.minDurationMinutes : null),
    "min",
    "Pulses at least this long count as long for the delay cost.",
  ),
  m(
    "delay_cost_median_delay_min",
    (s) => (s.delayCost ? s.delayCost.medianDelay : null),
    "min",
    "Kaplan-Meier median delay of the long pulses.",
  ),
  m("median_width_min", (s) => s.widths.summary.median, "min", "Median output pulse width."),
  m("median_peak_molecules", (s) => s.pulseGeneration.peak.median, "molecules", "Median peak output in a window."),
  m("median_time_to_peak_min", (s) => s.pulseGeneration.timeToPeak.median, "min", "Median time from on to the peak."),
  m("median_fwhm_min", (s) => s.pulseGeneration.fwhm.median, "min", "Median full width at half maximum."),
  m("mean_output_molecules", (s) => s.noise.meanOutput, "molecules", "Mean output over replicates."),
  m("output_cv", (s) => s.noise.cv, null, "Coefficient of variation of the output (total variance)."),
  m("output_fano", (s) => s.noise.fano, null, "Fano factor of the output: variance / mean."),
];

export function headlineRows(s: RunSummary): HeadlineRow[] {
  return HEADLINE_METRICS.map((x) => ({ metric: x.metric, value: x.get(s), unit: x.unit, description: x.description }));
}

/** headline.csv: the headline figures as (metric, value, unit) rows; settings are in the dictionary, not here. */
export function summaryCsv(summary: RunSummary): string {
  return toCsv(HEADLINE_COLUMNS, headlineRows(summary));
}
