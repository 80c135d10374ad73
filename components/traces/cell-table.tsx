/** Per-cell figures of a trace set, sorted and paged on the client (the detail already holds every cell). */
import React, { useMemo, useState } from "react";
import { DataTable, type Column } from "@/components/ui/data-table";
import { formatCount, formatNumber } from "@/shared/number-format";
import { median } from "./median";
import type { CellMetrics } from "@/shared/schemas/api-traces";

export type CellRow = {
  cell: string;
  points: number;
  firstMinute: number;
  lastMinute: number;
  gaps: number;
  background: number;
  thresholdTraceUnits: number;
  scored: number;
  passed: number;
  medianDelay: number | null;
  notCovered: number;
  gapDropped: number;
};

/** One row per cell: coverage, background and threshold, pulses scored and passed, median delay of passed pulses. */
export function cellRows(cells: CellMetrics[]): CellRow[] {
  return cells.map((c) => {
    const evaluable = c.pulses.filter((p) => !p.excluded);
    return {
      cell: c.cell,
      points: c.points,
      firstMinute: c.firstMinute,
      lastMinute: c.lastMinute,
      gaps: c.gaps,
      background: c.background,
      thresholdTraceUnits: c.thresholdTraceUnits,
      scored: evaluable.length,
      passed: evaluable.filter((p) => p.passed).length,
      medianDelay: median(evaluable.filter((p) => p.passed && p.delay !== null).map((p) => p.delay as number)),
      notCovered: c.skipped.filter((s) => s.reason === "notCovered").length,
      gapDropped: c.skipped.filter((s) => s.reason === "gap").length,
    };
  });
}

const fmt = (v: number | null) => (v === null ? "–" : formatNumber(v));
const COLUMNS: Column<CellRow>[] = [
  { key: "cell", label: "Cell", width: 110, sortable: true, render: (r) => r.cell },
  { key: "points", label: "Frames", width: 84, sortable: true, render: (r) => formatCount(r.points) },
  { key: "firstMinute", label: "From (min)", width: 96, sortable: true, render: (r) => fmt(r.firstMinute) },
  { key: "lastMinute", label: "To (min)", width: 88, sortable: true, render: (r) => fmt(r.lastMinute) },
  { key: "gaps", label: "Gaps", width: 72, sortable: true, render: (r) => formatCount(r.gaps) },
  { key: "background", label: "Background", width: 108, sortable: true, render: (r) => fmt(r.background) },
  {
    key: "thresholdTraceUnits",
    label: "Threshold (units)",
    width: 132,
    sortable: true,
    render: (r) => fmt(r.thresholdTraceUnits),
  },
  { key: "passed", label: "Passed", width: 96, sortable: true, render: (r) => `${r.passed} of ${r.scored}` },
  { key: "medianDelay", label: "Median delay (min)", width: 144, sortable: true, render: (r) => fmt(r.medianDelay) },
  {
    key: "notCovered",
    label: "Not watched",
    width: 104,
    sortable: true,
    render: (r) => formatCount(r.notCovered + r.gapDropped),
  },
];

const PAGE = 15;

export function CellTable({ cells }: { cells: CellMetrics[] }) {
  const rows = useMemo(() => cellRows(cells), [cells]);
  const [q, setQ] = useState<{ sort: keyof CellRow; dir: "asc" | "desc"; page: number }>({
    sort: "cell",
    dir: "asc",
    page: 1,
  });
  const sorted = useMemo(() => {
    const k = q.sort;
    const sign = q.dir === "asc" ? 1 : -1;
    return [...rows].sort((a, b) => {
      const x = a[k],
        y = b[k];
      if (x === null) return 1;
      if (y === null) return -1;
      return (
        (typeof x === "string" ? x.localeCompare(String(y), "en", { numeric: true }) : (x as number) - (y as number)) *
        sign
      );
    });
  }, [rows, q.sort, q.dir]);
  const pageCount = Math.max(1, Math.ceil(sorted.length / PAGE));
  const page = Math.min(q.page, pageCount);
  return (
    <DataTable
      testID="cell-table"
      caption="Per-cell figures"
      columns={COLUMNS}
      rows={sorted.slice((page - 1) * PAGE, page * PAGE)}
      sort={q.sort}
      dir={q.dir}
      onSort={(key) =>
        setQ((s) => ({ sort: key as keyof CellRow, dir: s.sort === key && s.dir === "asc" ? "desc" : "asc", page: 1 }))
      }
      page={page}
      pageCount={pageCount}
      onPage={(p) => setQ((s) => ({ ...s, page: p }))}
    />
  );
}
