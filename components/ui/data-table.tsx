import React from "react";
import { Pressable, ScrollView, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Text } from "./text";
import { Button } from "./button";

export type Column<R> = { key: string; label: string; width: number; sortable?: boolean; render: (row: R) => string };

/** A table with sortable column headers and paging; scrolls sideways on a phone. */
export function DataTable<R>({
  columns,
  rows,
  sort,
  dir,
  onSort,
  page,
  pageCount,
  onPage,
  caption,
  testID,
}: {
  columns: Column<R>[];
  rows: R[];
  sort: string;
  dir: "asc" | "desc";
  onSort: (key: string) => void;
  page: number;
  pageCount: number;
  onPage: (page: number) => void;
  caption: string;
  testID?: string;
}) {
  const t = useTheme();
  return (
    <View style={{ gap: t.spacing.sm }} testID={testID}>
      <ScrollView horizontal>
        <View role="table" aria-label={caption}>
          <View role="row" style={{ flexDirection: "row", borderBottomWidth: 1.5, borderBottomColor: t.colors.border }}>
            {columns.map((c) => {
              const active = sort === c.key;
              const label = `${c.label}${active ? (dir === "asc" ? " ▲" : " ▼") : ""}`;
              return c.sortable ? (
                <Pressable
                  key={c.key}
                  role="columnheader"
                  aria-sort={active ? (dir === "asc" ? "ascending" : "descending") : "none"}
                  accessibilityLabel={`Sort by ${c.label}`}
                  onPress={() => onSort(c.key)}
                  style={{
                    width: c.width,
                    minHeight: MIN_TOUCH,
                    justifyContent: "center",
                    paddingHorizontal: t.spacing.sm,
                  }}
                >
                  <Text variant="label" tone={active ? "primary" : "default"}>
                    {label}
                  </Text>
                </Pressable>
              ) : (
                <View
                  key={c.key}
                  role="columnheader"
                  style={{
                    width: c.width,
                    minHeight: MIN_TOUCH,
                    justifyContent: "center",
                    paddingHorizontal: t.spacing.sm,
                  }}
                >
                  <Text variant="label">{c.label}</Text>
                </View>
              );
            })}
          </View>
          {rows.map((r, i) => (
            <View
              key={i}
              role="row"
              style={{
                flexDirection: "row",
                borderBottomWidth: 1,
                borderBottomColor: t.colors.divider,
                backgroundColor: i % 2 ? t.colors.surface : t.colors.background,
              }}
            >
              {columns.map((c) => (
                <View
                  key={c.key}
                  role="cell"
                  style={{ width: c.width, paddingHorizontal: t.spacing.sm, paddingVertical: t.spacing.xs }}
                >
                  <Text variant="caption">{c.render(r)}</Text>
                </View>
              ))}
            </View>
          ))}
        </View>
      </ScrollView>
      <View style={{ flexDirection: "row", alignItems: "center", gap: t.spacing.sm, flexWrap: "wrap" }}>
        <Button
          label="Previous page"
          variant="secondary"
          compact
          icon="chevron-left"
          disabled={page <= 1}
          onPress={() => onPage(page - 1)}
        />
        <Text variant="caption" tone="muted">
          Page {page} of {Math.max(1, pageCount)}
        </Text>
        <Button
          label="Next page"
          variant="secondary"
          compact
          icon="chevron-right"
          disabled={page >= pageCount}
          onPress={() => onPage(page + 1)}
        />
      </View>
    </View>
  );
}
