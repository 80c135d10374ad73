import React from "react";
import { View } from "react-native";
import type { Href } from "expo-router";
import { useTheme } from "@/components/theme/use-theme";
import { formatCount, formatProbability, formatQuantity } from "@/shared/number-format";
import type { RunStatusName } from "@/components/theme/tokens";
import { Card } from "./card";
import { Text } from "./text";
import { StatusBadge } from "./status-badge";
import { ProgressBar } from "./progress-bar";

export type RunRowData = {
  id: string;
  name: string;
  status: string;
  replicates: number;
  replicatesDone?: number;
  circuitName?: string | null;
  programName?: string | null;
  /** ISO time the run was created. */
  createdAt?: string | null;
  /** Display name of who started it. */
  createdBy?: string | null;
  seed?: string | null;
  headline?: {
    d50: number | null;
    falsePassRate: number | null;
    medianDelay: number | null;
  } | null;
};

/** "2 Dec 2026, 14:05" in UTC-independent local time, or "" for a missing or bad date. */
export function runDateLabel(iso: string | null | undefined): string {
  if (!iso) return "";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return "";
  const day = d.toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" });
  const time = d.toLocaleTimeString("en-GB", { hour: "2-digit", minute: "2-digit" });
  return `${day}, ${time}`;
}

/** The headline figures a list shows for a finished run, in words with units. */
export function runHeadlineLabel(h: RunRowData["headline"]): string {
  if (!h) return "";
  const parts: string[] = [];
  if (h.d50 !== null) parts.push(`d50 ${formatQuantity(h.d50, "min")}`);
  if (h.falsePassRate !== null) parts.push(`false pass ${formatProbability(h.falsePassRate)}`);
  if (h.medianDelay !== null) parts.push(`median delay ${formatQuantity(h.medianDelay, "min")}`);
  return parts.join(" · ");
}

/**
 * One run in a list: the whole name (wrapped, never cut), circuit and
 * program, when and by whom, the headline figures, status and progress; so
 * two runs with similar names can be told apart. The row is a link to the run
 * named by its visible text.
 */
export function RunRow({ run, href }: { run: RunRowData; href: Href }) {
  const t = useTheme();
  const done = run.replicatesDone ?? 0;
  const fraction = run.status === "finished" ? 1 : run.replicates > 0 ? done / run.replicates : 0;
  const color = t.colors.status[run.status as RunStatusName] ?? t.colors.primary;
  const detail = [run.circuitName, run.programName].filter(Boolean).join(" · ");
  const when = [
    runDateLabel(run.createdAt),
    run.createdBy ? `by ${run.createdBy}` : "",
    run.seed ? `seed ${run.seed}` : "",
  ]
    .filter(Boolean)
    .join(" · ");
  const figures = runHeadlineLabel(run.headline);
  return (
    <Card href={href} testID={`run-row-${run.id}`}>
      <View
        style={{ flexDirection: "row", justifyContent: "space-between", alignItems: "flex-start", gap: t.spacing.sm }}
      >
        <View style={{ flex: 1, gap: 2 }}>
          <Text variant="bodyStrong">{run.name}</Text>
          {detail ? (
            <Text variant="caption" tone="muted">
              {detail}
            </Text>
          ) : null}
          {when ? (
            <Text variant="caption" tone="muted" testID={`run-row-when-${run.id}`}>
              {when}
            </Text>
          ) : null}
          {figures ? (
            <Text variant="caption" testID={`run-row-figures-${run.id}`}>
              {figures}
            </Text>
          ) : null}
        </View>
        <StatusBadge status={run.status} />
      </View>
      <ProgressBar value={fraction} color={color} label={`Progress of ${run.name}`} />
      <Text variant="caption" tone="muted">
        {formatCount(done)} of {formatCount(run.replicates)} replicates
      </Text>
    </Card>
  );
}
