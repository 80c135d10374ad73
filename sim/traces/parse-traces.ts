/**
 * Parses an uploaded CSV/TSV of single-cell reporter traces (docs/traces.md).
 *
 * Two layouts:
 * - long: one row per (cell, time): columns `cell`, `time`, `value`, and an
 *   optional `channel` (header names matched case-insensitively, a few aliases);
 * - wide: a `time` column (or the first column) and one column per cell.
 * An optional input column (named by the caller) gives the input level per time.
 *
 * Rules: blank lines and lines starting with `#` (comments) are skipped; a
 * header line is required; times are converted to minutes; an empty
 * value, `NA` or `NaN` is a missing frame (simply absent); any other text is an
 * error. Within a cell, time must strictly increase in file order (equal = a
 * duplicate cell and time; smaller = time going backwards). A cell needs
 * `TRACE_LIMITS.minPointsPerCell` values. The first `TRACE_LIMITS.maxErrors`
 * problems are returned with 1-based line (header = line 1) and column.
 *
 * Pure: takes text, returns data or errors. CSV reading by papaparse (RFC 4180
 * quoting).
 *
 * @example parseTraces("cell,time,value\na,0,1\na,1,2\na,2,3", { timeUnit: "min" })
 */
import Papa from "papaparse";
import {
  TRACE_LIMITS,
  type Delimiter,
  type TimeUnit,
  type TraceLayout,
  type TraceParseError,
  type TracePulse,
} from "@/shared/schemas/api-traces";

export interface ParseTraceOptions {
  layout?: "auto" | TraceLayout;
  delimiter?: "auto" | Delimiter;
  timeUnit: TimeUnit;
  /** Long layout with a channel column: the channel to keep. */
  channel?: string;
  /** Name of a column holding the input level (the schedule); levels above onAbove are ON. */
  scheduleColumn?: string;
  onAbove?: number;
  /** Override limits (tests). */
  limits?: Partial<Record<"maxRows" | "maxCells" | "minPointsPerCell" | "maxErrors", number>>;
}

export interface ParsedCell {
  cell: string;
  /** Minutes, strictly increasing. */
  times: Float64Array;
  values: Float64Array;
}

export interface ParsedTraces {
  ok: true;
  layout: TraceLayout;
  delimiter: Delimiter;
  rows: number;
  cells: ParsedCell[];
  /** Pulses from the schedule column (minutes), or null without one. */
  schedule: TracePulse[] | null;
  warnings: string[];
}

export interface ParseFailure {
  ok: false;
  errors: TraceParseError[];
}

const MINUTES_PER: Record<TimeUnit, number> = { s: 1 / 60, min: 1, h: 60 };
const DELIMS: Record<Delimiter, string> = { comma: ",", tab: "\t", semicolon: ";" };
const MISSING = new Set(["", "na", "nan", "n/a", "null"]);

const ALIASES = {
  cell: ["cell", "cell_id", "cellid", "cell id", "id", "track", "lineage"],
  time: ["time", "t", "minute", "minutes", "time_min", "time_s", "time_h", "frame_time"],
  value: ["value", "signal", "intensity", "fluorescence", "reporter", "y"],
  channel: ["channel", "ch"],
};

class ErrorList {
  readonly list: TraceParseError[] = [];
  constructor(readonly max: number) {}
  add(line: number, column: number, message: string) {
    if (this.list.length < this.max) this.list.push({ line, column, message });
  }
  get full() {
    return this.list.length >= this.max;
  }
}

/** Detects the delimiter from the header line: tab, then semicolon (without commas), else comma. */
export function detectDelimiter(text: string): Delimiter {
  const first = text.slice(0, text.search(/\r?\n|$/));
  if (first.includes("\t")) return "tab";
  if (first.includes(";") && !first.includes(",")) return "semicolon";
  return "comma";
}

function findColumn(header: string[], names: string[]): number {
  const norm = header.map((h) => h.trim().toLowerCase());
  for (const n of names) {
    const i = norm.indexOf(n);
    if (i >= 0) return i;
  }
  return -1;
}

/** Parses a number; undefined for a missing frame, NaN for bad text. */
function readNumber(raw: string | undefined): number | undefined {
  const s = (raw ?? "").trim();
  if (MISSING.has(s.toLowerCase())) return undefined;
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(s)) return NaN;
  return Number(s);
}

interface Row {
  line: number;
  fields: string[];
}

/** Splits text into rows with their 1-based line numbers (blank lines dropped). */
function readRows(
  text: string,
  delimiter: string,
  maxRows: number,
  errors: ErrorList,
): { rows: Row[]; tooMany: boolean } {
  const rows: Row[] = [];
  let line = 1;
  let prevCursor = 0;
  let tooMany = false;
  Papa.parse<string[]>(text, {
    delimiter,
    skipEmptyLines: false,
    step: (r, parser) => {
      const cursor = r.meta.cursor;
      const startLine = line;
      for (let i = prevCursor; i < cursor && i < text.length; i++) if (text.charCodeAt(i) === 10) line++;
      prevCursor = cursor;
      const fields = r.data as string[];
      if (fields.length === 1 && fields[0].trim() === "") return;
      // comment line
      if (fields[0].trimStart().startsWith("#")) return;
      for (const e of r.errors) errors.add(startLine, 0, `unreadable line: ${e.message}`);
      rows.push({ line: startLine, fields });
      // header + maxRows data rows
      if (rows.length > maxRows + 1) {
        tooMany = true;
        parser.abort();
      }
      if (errors.full) parser.abort();
    },
  });
  return { rows, tooMany };
}

/** Turns a sorted (time, level) list into ON pulses [on, off): on at the first sample above onAbove, off at the next sample not above. */
export function pulsesFromLevels(times: ArrayLike<number>, levels: ArrayLike<number>, onAbove = 0): TracePulse[] {
  const out: TracePulse[] = [];
  let onAt: number | null = null;
  for (let i = 0; i < times.length; i++) {
    const on = levels[i] > onAbove;
    if (on && onAt === null) onAt = times[i];
    else if (!on && onAt !== null) {
      out.push({ on: onAt, off: times[i] });
      onAt = null;
    }
  }
  if (onAt !== null && times.length > 0) {
    // still on at the last sample: the pulse lasts at least until then
    const last = times[times.length - 1];
    if (last > onAt) out.push({ on: onAt, off: last });
  }
  return out;
}

export function parseTraces(text: string, options: ParseTraceOptions): ParsedTraces | ParseFailure {
  const limits: Record<"maxRows" | "maxCells" | "minPointsPerCell" | "maxErrors", number> = {
    ...TRACE_LIMITS,
    ...options.limits,
  };
  const errors = new ErrorList(limits.maxErrors);
  const warnings: string[] = [];
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const delimiter: Delimiter =
    !options.delimiter || options.delimiter === "auto" ? detectDelimiter(text) : options.delimiter;
  const { rows, tooMany } = readRows(text, DELIMS[delimiter], limits.maxRows, errors);
  if (rows.length === 0) return { ok: false, errors: [{ line: 1, column: 0, message: "the file is empty" }] };
  if (tooMany) {
    errors.add(rows[rows.length - 1].line, 0, `too many rows: at most ${limits.maxRows} data rows`);
    return { ok: false, errors: errors.list };
  }
  const header = rows[0].fields.map((h) => h.trim());
  const unit = MINUTES_PER[options.timeUnit];

  let scheduleCol = -1;
  if (options.scheduleColumn) {
    scheduleCol = header.findIndex((h) => h.toLowerCase() === options.scheduleColumn!.trim().toLowerCase());
    if (scheduleCol < 0) errors.add(1, 0, `no column named "${options.scheduleColumn}" for the input schedule`);
  }

  const iCell = findColumn(header, ALIASES.cell);
  const iTime = findColumn(header, ALIASES.time);
  const iValue = findColumn(header, ALIASES.value);
  const looksLong = iCell >= 0 && iTime >= 0 && iValue >= 0;
  let layout: TraceLayout;
  if (!options.layout || options.layout === "auto") layout = looksLong ? "long" : "wide";
  else layout = options.layout;
  if (layout === "long" && !looksLong) {
    const missing = [iCell < 0 && "cell", iTime < 0 && "time", iValue < 0 && "value"].filter(Boolean).join(", ");
    errors.add(1, 0, `long layout needs columns cell, time and value; missing: ${missing}`);
  }
  if (layout === "wide" && header.length < 2)
    errors.add(1, 0, "wide layout needs a time column and at least one cell column");
  const dupHeader = header.findIndex((h, i) => h !== "" && header.indexOf(h) !== i);
  if (dupHeader >= 0) errors.add(1, dupHeader + 1, `column name "${header[dupHeader]}" appears twice`);
  if (errors.list.length) return { ok: false, errors: errors.list };

  // Per-cell accumulation
  interface Acc {
    cell: string;
    times: number[];
    values: number[];
    lastTime: number;
    firstLine: number;
    column: number;
  }
  const cells = new Map<string, Acc>();
  const schedule = new Map<number, { level: number; line: number }>();
  const addScheduleLevel = (row: Row, t: number) => {
    if (scheduleCol < 0) return;
    const lv = readNumber(row.fields[scheduleCol]);
    if (lv === undefined) return;
    if (Number.isNaN(lv)) {
      errors.add(row.line, scheduleCol + 1, `input level "${row.fields[scheduleCol]}" is not a number`);
      return;
    }
    const prev = schedule.get(t);
    if (prev && prev.level !== lv)
      errors.add(
        row.line,
        scheduleCol + 1,
        `input level ${lv} at time ${row.fields[iTimeUsed]} disagrees with ${prev.level} on line ${prev.line}`,
      );
    else if (!prev) schedule.set(t, { level: lv, line: row.line });
  };
  const pushValue = (acc: Acc, row: Row, col: number, t: number, raw: string | undefined, timeCol: number) => {
    const v = readNumber(raw);
    if (v !== undefined && Number.isNaN(v)) {
      errors.add(row.line, col + 1, `value "${(raw ?? "").trim()}" is not a number`);
      return;
    }
    if (acc.times.length > 0 || Number.isFinite(acc.lastTime)) {
      if (t === acc.lastTime) {
        errors.add(
          row.line,
          timeCol + 1,
          `duplicate cell and time: cell "${acc.cell}" already has time ${row.fields[timeCol].trim()}`,
        );
        return;
      }
      if (t < acc.lastTime) {
        errors.add(
          row.line,
          timeCol + 1,
          `time goes backwards within cell "${acc.cell}" (${row.fields[timeCol].trim()} after ${+(acc.lastTime / unit).toPrecision(12)})`,
        );
        return;
      }
    }
    acc.lastTime = t;
    if (v === undefined) return; // missing frame
    acc.times.push(t);
    acc.values.push(v);
  };

  let iTimeUsed = iTime;
  const dataRows = rows.length - 1;
  if (layout === "long") {
    const iChannel = findColumn(header, ALIASES.channel);
    let channel = options.channel;
    if (iChannel >= 0 && !channel) {
      const seen = new Set<string>();
      for (let r = 1; r < rows.length && seen.size < 50; r++) seen.add((rows[r].fields[iChannel] ?? "").trim());
      if (seen.size > 1) {
        errors.add(
          1,
          iChannel + 1,
          `the file has several channels (${[...seen].slice(0, 5).join(", ")}): choose the reporter channel`,
        );
        return { ok: false, errors: errors.list };
      }
    }
    if (channel && iChannel < 0) warnings.push(`channel "${channel}" was chosen but the file has no channel column`);
    channel = channel?.trim();
    for (let r = 1; r < rows.length && !errors.full; r++) {
      const row = rows[r];
      if (row.fields.length < header.length) {
        errors.add(
          row.line,
          row.fields.length + 1,
          `line has ${row.fields.length} fields, the header has ${header.length}`,
        );
        continue;
      }
      if (channel && iChannel >= 0 && row.fields[iChannel].trim() !== channel) continue;
      const cellName = row.fields[iCell].trim();
      if (cellName === "") {
        errors.add(row.line, iCell + 1, "cell name is empty");
        continue;
      }
      const tRaw = readNumber(row.fields[iTime]);
      if (tRaw === undefined || Number.isNaN(tRaw)) {
        errors.add(row.line, iTime + 1, `time "${row.fields[iTime].trim()}" is not a number`);
        continue;
      }
      const t = tRaw * unit;
      let acc = cells.get(cellName);
      if (!acc) {
        if (cells.size >= limits.maxCells) {
          errors.add(row.line, iCell + 1, `too many cells: at most ${limits.maxCells}`);
          break;
        }
        acc = { cell: cellName, times: [], values: [], lastTime: -Infinity, firstLine: row.line, column: iValue + 1 };
        cells.set(cellName, acc);
      }
      pushValue(acc, row, iValue, t, row.fields[iValue], iTime);
      addScheduleLevel(row, t);
    }
  } else {
    const timeCol = iTime >= 0 ? iTime : 0;
    iTimeUsed = timeCol;
    const cellCols: number[] = [];
    for (let c = 0; c < header.length; c++) {
      if (c === timeCol || c === scheduleCol) continue;
      if (header[c] === "") {
        errors.add(1, c + 1, "cell column has no name");
        continue;
      }
      cellCols.push(c);
    }
    if (cellCols.length > limits.maxCells) {
      errors.add(1, 0, `too many cells: ${cellCols.length} columns, at most ${limits.maxCells}`);
      return { ok: false, errors: errors.list };
    }
    if (cellCols.length === 0) errors.add(1, 0, "wide layout needs at least one cell column");
    const accs = cellCols.map((c) => ({
      cell: header[c],
      times: [] as number[],
      values: [] as number[],
      lastTime: -Infinity,
      firstLine: 1,
      column: c + 1,
    }));
    for (const a of accs) cells.set(a.cell, a);
    let lastTime = -Infinity;
    for (let r = 1; r < rows.length && !errors.full; r++) {
      const row = rows[r];
      if (row.fields.length < header.length) {
        errors.add(
          row.line,
          row.fields.length + 1,
          `line has ${row.fields.length} fields, the header has ${header.length}`,
        );
        continue;
      }
      const tRaw = readNumber(row.fields[timeCol]);
      if (tRaw === undefined || Number.isNaN(tRaw)) {
        errors.add(row.line, timeCol + 1, `time "${row.fields[timeCol].trim()}" is not a number`);
        continue;
      }
      const t = tRaw * unit;
      // One time column for every cell: report its order problems once, not per cell.
      if (t === lastTime) {
        errors.add(
          row.line,
          timeCol + 1,
          `duplicate time ${row.fields[timeCol].trim()} (every cell would have it twice)`,
        );
        continue;
      }
      if (t < lastTime) {
        errors.add(
          row.line,
          timeCol + 1,
          `time goes backwards (${row.fields[timeCol].trim()} after ${+(lastTime / unit).toPrecision(12)})`,
        );
        continue;
      }
      lastTime = t;
      for (let k = 0; k < cellCols.length; k++)
        pushValue(accs[k], row, cellCols[k], t, row.fields[cellCols[k]], timeCol);
      addScheduleLevel(row, t);
    }
  }

  if (!errors.full) {
    for (const acc of cells.values()) {
      if (acc.times.length < limits.minPointsPerCell) {
        errors.add(
          acc.firstLine,
          acc.column,
          `cell "${acc.cell}" has ${acc.times.length} value${acc.times.length === 1 ? "" : "s"}; at least ${limits.minPointsPerCell} are needed`,
        );
      }
    }
  }
  if (cells.size === 0 && !errors.list.length) errors.add(1, 0, "the file has no data rows");
  if (errors.list.length) return { ok: false, errors: errors.list };

  let pulses: TracePulse[] | null = null;
  if (scheduleCol >= 0) {
    const ts = [...schedule.keys()].sort((a, b) => a - b);
    pulses = pulsesFromLevels(
      ts,
      ts.map((t) => schedule.get(t)!.level),
      options.onAbove ?? 0,
    );
    if (pulses.length === 0) warnings.push("the input column never switches on: no pulses to analyse");
  }

  return {
    ok: true,
    layout,
    delimiter,
    rows: dataRows,
    cells: [...cells.values()].map((a) => ({
      cell: a.cell,
      times: Float64Array.from(a.times),
      values: Float64Array.from(a.values),
    })),
    schedule: pulses,
    warnings,
  };
}
