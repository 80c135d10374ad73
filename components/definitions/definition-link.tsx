import React from "react";
import { Link } from "expo-router";
import { Text } from "@/components/ui/text";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { TERMS } from "./terms";

/**
 * A real link (an <a href> on the web) to a figure's entry on the definitions page: "/definitions#d50".
 * Unknown terms render nothing, so a typo cannot produce a dead link (tests/components check every id used).
 */
export function DefinitionLink({ term, label }: { term: string; label?: string }) {
  const entry = TERMS.find((t) => t.id === term);
  if (!entry) return null;
  return (
    <Link
      href={`/definitions#${term}`}
      accessibilityLabel={`Definition of ${label ?? entry.term}`}
      testID={`define-${term}`}
      style={{
        minHeight: MIN_TOUCH,
        minWidth: MIN_TOUCH,
        paddingVertical: 12,
        paddingHorizontal: 4,
        alignSelf: "flex-start",
      }}
    >
      <Text variant="caption" tone="primary" style={{ textDecorationLine: "underline" }}>
        definition
      </Text>
    </Link>
  );
}
