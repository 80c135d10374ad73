import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { DataTable, type Column } from "@/components/ui/data-table";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { formatCount, formatNumber, formatQuantity } from "@/shared/number-format";
import { useReplicates, type ReplicateQuery } from "@/components/data/runs";
import type { ReplicatePage } from "@/shared/schemas/api-runs";

export type PulseRow = ReplicatePage["rows"][number];

const fmt = (v: number | null) => (v === null ? "–" : formatNumber(v));
/** "yes", "no" or "excluded" (a pulse whose window could not be judged). */
export const passWord = (r: PulseRow) => (r.excluded ? "excluded" : r.passed ? "yes" : "no");
const delayWord = (r: PulseRow) => (r.delay === null ? "none" : `${fmt(r.delay)} min`);

export const PULSE_COLUMNS: Column<PulseRow>[] = [
  { key: "replicate", label: "Replicate", width: 96, sortable: true, render: (r) => formatCount(r.replicate) },
  { key: "pulseIndex", label: "Pulse", width: 72, sortable: true, render: (r) => formatCount(r.pulseIndex) },
  { key: "durationBin", label: "Duration (min)", width: 120, sortable: true, render: (r) => fmt(r.durationBin) },
  { key: "passed", label: "Passed", width: 80, render: passWord },
  {
    key: "delay",
    label: "Delay (min)",
    width: 104,
    sortable: true,
    render: (r) => (r.delay === null ? "none" : fmt(r.delay)),
  },
  { key: "offDelay", label: "OFF delay (min)", width: 124, sortable: true, render: (r) => fmt(r.offDelay) },
  { key: "width", label: "Width (min)", width: 104, sortable: true, render: (r) => fmt(r.width) },
  { key: "peak", label: "Peak", width: 88, sortable: true, render: (r) => fmt(r.peak) },
  { key: "fwhm", label: "FWHM (min)", width: 104, sortable: true, render: (r) => fmt(r.fwhm) },
];

type PassFilter = "all" | "yes" | "no";
const PASS_OPTIONS: { value: PassFilter; label: string }[] = [
  { value: "all", label: "All pulses" },
  { value: "yes", label: "Passed" },
  { value: "no", label: "Not passed" },
];
const PHONE_SORTS = [
  { value: "replicate", label: "Replicate" },
  { value: "delay", label: "Delay" },
  { value: "width", label: "Width" },
  { value: "durationBin", label: "Duration" },
];

/**
 * Every (replicate, input pulse) row of a run, filtered by passed / not
 * passed and by input duration. Wide: a sortable table. Phone: one card per
 * row with the figures that matter (passed, delay, width) and the rest one tap
 * away, so nothing scrolls sideways.
 */
export function PulseTable({ runId, durations }: { runId: string; durations: number[] }) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const [q, setQ] = useState<ReplicateQuery>({ sort: "replicate", dir: "asc", page: 1, pageSize: 20 });
  const rows = useReplicates(runId, q);
  const pass: PassFilter = q.passed ?? "all";
  const durationValue = q.durationBin === undefined ? "all" : String(q.durationBin);
  const durationOptions = [
    { value: "all", label: "Every duration" },
    ...durations.map((d) => ({ value: String(d), label: `${formatQuantity(d, "min")}` })),
  ];
  const pageCount = rows.data ? Math.max(1, Math.ceil(rows.data.total / q.pageSize)) : 1;
  const filters = (
    <View style={{ gap: t.spacing.md }} testID="pulse-filters">
      <Choice
        label="Show"
        value={pass}
        options={PASS_OPTIONS}
        onChange={(v) => setQ((s) => ({ ...s, passed: v === "all" ? undefined : v, page: 1 }))}
        testID="pulse-filter-passed"
      />
      {durations.length > 1 ? (
        <Choice
          label="Input duration"
          value={durationValue}
          options={durationOptions}
          onChange={(v) => setQ((s) => ({ ...s, durationBin: v === "all" ? undefined : Number(v), page: 1 }))}
          testID="pulse-filter-duration"
        />
      ) : null}
      {!isWide ? (
        <Choice
          label="Sort by"
          value={q.sort}
          options={PHONE_SORTS}
          onChange={(v) => setQ((s) => ({ ...s, sort: v, dir: "asc", page: 1 }))}
          testID="pulse-sort"
        />
      ) : null}
    </View>
  );
  let body: React.ReactNode;
  if (rows.isPending) body = <LoadingState label="Loading replicate figures" />;
  else if (rows.error) body = <ErrorState error={rows.error} onRetry={() => rows.refetch()} />;
  else if (rows.data.total === 0)
    body = (
      <Text tone="muted" testID="pulse-none">
        No pulse matches these filters.
      </Text>
    );
  else if (isWide)
    body = (
      <DataTable
        testID="replicate-table"
        caption="Per-replicate figures for each input pulse"
        columns={PULSE_COLUMNS}
        rows={rows.data.rows}
        sort={q.sort}
        dir={q.dir}
        onSort={(key) =>
          setQ((s) => ({ ...s, sort: key, dir: s.sort === key && s.dir === "asc" ? "desc" : "asc", page: 1 }))
        }
        page={q.page}
        pageCount={pageCount}
        onPage={(page) => setQ((s) => ({ ...s, page }))}
      />
    );
  else
    body = (
      <View style={{ gap: t.spacing.sm }} testID="replicate-table">
        <View role="list" aria-label="Per-replicate figures for each input pulse" style={{ gap: t.spacing.sm }}>
          {rows.data.rows.map((r) => (
            <PulseCard key={`${r.replicate}-${r.pulseIndex}`} row={r} />
          ))}
        </View>
        <View style={{ flexDirection: "row", alignItems: "center", gap: t.spacing.sm, flexWrap: "wrap" }}>
          <Button
            label="Previous"
            accessibilityLabel="Previous page"
            variant="secondary"
            compact
            icon="chevron-left"
            disabled={q.page <= 1}
            onPress={() => setQ((s) => ({ ...s, page: s.page - 1 }))}
          />
          <Text variant="caption" tone="muted">
            Page {q.page} of {pageCount}
          </Text>
          <Button
            label="Next"
            accessibilityLabel="Next page"
            variant="secondary"
            compact
            icon="chevron-right"
            disabled={q.page >= pageCount}
            onPress={() => setQ((s) => ({ ...s, page: s.page + 1 }))}
          />
        </View>
      </View>
    );
  return (
    <View style={{ gap: t.spacing.md }}>
      {filters}
      {rows.data && !rows.isPlaceholderData ? (
        // Not while the previous filter's page is still shown: its total would read as the new filter's.
        <Text variant="caption" tone="muted" testID="pulse-count" role="status">
          {formatCount(rows.data.total)} {rows.data.total === 1 ? "pulse" : "pulses"}
          {pass === "yes" ? " that passed" : pass === "no" ? " that did not pass" : ""}
          {q.durationBin !== undefined ? ` of ${formatQuantity(q.durationBin, "min")}` : ""}
        </Text>
      ) : null}
      {body}
    </View>
  );
}

/** One row on a phone: replicate and pulse, passed, delay and width; the other figures behind "More figures". */
export function PulseCard({ row: r }: { row: PulseRow }) {
  const t = useTheme();
  const [open, setOpen] = useState(false);
  const title = `Replicate ${r.replicate}, pulse ${r.pulseIndex} (${fmt(r.durationBin)} min)`;
  const passColor = r.excluded ? t.colors.textMuted : r.passed ? t.colors.primary : t.colors.danger;
  return (
    <View
      role="listitem"
      testID={`pulse-card-${r.replicate}-${r.pulseIndex}`}
      style={{
        borderWidth: 1,
        borderColor: t.colors.divider,
        borderRadius: t.radii.md,
        padding: t.spacing.md,
        gap: t.spacing.xs,
      }}
    >
      <View style={{ flexDirection: "row", justifyContent: "space-between", gap: t.spacing.sm, flexWrap: "wrap" }}>
        <Text variant="bodyStrong" style={{ flexShrink: 1 }}>
          {title}
        </Text>
        <Text variant="label" style={{ color: passColor }}>
          {r.excluded ? "Excluded" : r.passed ? "Passed" : "Not passed"}
        </Text>
      </View>
      <Text variant="caption">
        Delay {delayWord(r)} · width {r.width === null ? "–" : `${fmt(r.width)} min`}
      </Text>
      {open ? (
        <Text variant="caption" tone="muted" testID="pulse-more">
          OFF delay {r.offDelay === null ? "–" : `${fmt(r.offDelay)} min`} · peak {fmt(r.peak)} · FWHM{" "}
          {r.fwhm === null ? "–" : `${fmt(r.fwhm)} min`} · input {fmt(r.on)}–{fmt(r.off)} min
        </Text>
      ) : null}
      <Button
        label={open ? "Fewer figures" : "More figures"}
        accessibilityLabel={`${open ? "Fewer" : "More"} figures for ${title}`}
        variant="ghost"
        compact
        icon={open ? "chevron-up" : "chevron-down"}
        onPress={() => setOpen((o) => !o)}
        style={{ alignSelf: "flex-start" }}
      />
    </View>
  );
}
