import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Icon } from "@/components/ui/icon";
import { TRACE_LIMITS, type TraceParseError } from "@/shared/schemas/api-traces";

/** "Line 4, column 3" (column 0 is the whole line). */
export function placeOf(p: TraceParseError): string {
  return p.column > 0 ? `Line ${p.line}, column ${p.column}` : `Line ${p.line}`;
}

/** The problems the server found in a file, each with its line and column, as a list announced to screen readers. */
export function UploadProblems({
  problems,
  testID = "upload-problems",
}: {
  problems: TraceParseError[];
  testID?: string;
}) {
  const t = useTheme();
  if (!problems.length) return null;
  const capped = problems.length >= TRACE_LIMITS.maxErrors;
  return (
    <View
      role="alert"
      testID={testID}
      style={{
        gap: t.spacing.sm,
        padding: t.spacing.lg,
        backgroundColor: t.colors.dangerSoft,
        borderRadius: t.radii.md,
      }}
    >
      <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
        <Icon name="alert-triangle" color={t.colors.onDangerSoft} />
        <Text variant="bodyStrong" style={{ color: t.colors.onDangerSoft, flexShrink: 1 }}>
          The file was not accepted: {problems.length}
          {capped ? " or more" : ""} problem{problems.length === 1 ? "" : "s"}
        </Text>
      </View>
      <Text variant="caption" style={{ color: t.colors.onDangerSoft }}>
        Nothing was stored. Line numbers count from the header (line 1), as in the file; fix these and preview again.
      </Text>
      <View role="list" aria-label="Problems in the file" style={{ gap: t.spacing.xs }}>
        {problems.map((p, i) => (
          <View
            key={i}
            role="listitem"
            testID={`${testID}-item`}
            style={{ flexDirection: "row", gap: t.spacing.sm, flexWrap: "wrap" }}
          >
            <Text variant="label" style={{ color: t.colors.onDangerSoft, fontFamily: t.fonts.semibold }}>
              {placeOf(p)}:
            </Text>
            <Text variant="label" style={{ color: t.colors.onDangerSoft, flexShrink: 1 }}>
              {p.message}
            </Text>
          </View>
        ))}
      </View>
      {capped ? (
        <Text variant="caption" style={{ color: t.colors.onDangerSoft }}>
          Only the first {TRACE_LIMITS.maxErrors} problems are listed.
        </Text>
      ) : null}
    </View>
  );
}
