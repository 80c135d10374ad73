import React, { useEffect, useState } from "react";
import { Platform, View } from "react-native";
import { Link, useLocalSearchParams } from "expo-router";
import { MIN_TOUCH } from "@/components/theme/tokens";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { useTheme } from "@/components/theme/use-theme";
import { TERMS } from "@/components/definitions/terms";
import { NUMBER_RULES } from "@/components/definitions/number-rules";

/** The anchor asked for: the URL's #hash on the web, or the router's "#" parameter. */
function useAnchor(): [string | null, (id: string) => void] {
  const params = useLocalSearchParams<{ "#"?: string }>();
  const [hash, setHash] = useState<string | null>(() =>
    Platform.OS === "web" && typeof window !== "undefined" ? window.location.hash.slice(1) || null : null,
  );
  useEffect(() => {
    if (Platform.OS !== "web") return;
    const on = () => setHash(window.location.hash.slice(1) || null);
    window.addEventListener("hashchange", on);
    return () => window.removeEventListener("hashchange", on);
  }, []);
  // The hash from the address bar or a press on this page's index, else the router's "#" parameter.
  return [hash ?? params["#"] ?? null, setHash];
}

/** /definitions: every figure and setting Linger shows, one anchored entry each (linked from every figure). */
export default function DefinitionsScreen() {
  const t = useTheme();
  const [anchor, setAnchor] = useAnchor();
  useEffect(() => {
    if (Platform.OS !== "web" || !anchor) return;
    // The entry's nativeID is its id attribute on the web; scroll it into view once laid out.
    const id = setTimeout(() => document.getElementById(anchor)?.scrollIntoView({ block: "start" }), 50);
    return () => clearTimeout(id);
  }, [anchor]);
  return (
    <Screen title="Definitions" subtitle="What each figure means and how Linger computes it.">
      <Card testID="definitions-index">
        <Text variant="label">On this page</Text>
        <View style={{ flexDirection: "row", flexWrap: "wrap", columnGap: t.spacing.md }}>
          {TERMS.map((term) => (
            <Link
              key={term.id}
              href={`/definitions#${term.id}`}
              onPress={() => setAnchor(term.id)}
              style={{ minHeight: MIN_TOUCH, minWidth: MIN_TOUCH, paddingVertical: 12 }}
            >
              <Text tone="primary" style={{ textDecorationLine: "underline" }}>
                {term.term}
              </Text>
            </Link>
          ))}
        </View>
      </Card>
      {TERMS.map((term) => {
        const current = term.id === anchor;
        return (
          <View key={term.id} nativeID={term.id} testID={`definition-${term.id}`}>
            <Card
              style={
                current
                  ? { borderColor: t.colors.primary, borderWidth: 2, backgroundColor: t.colors.primarySoft }
                  : undefined
              }
            >
              <Text variant="heading" role="heading" aria-level={2}>
                {term.term}
              </Text>
              {term.body.map((p) => (
                <Text key={p} style={current ? { color: t.colors.text } : undefined}>
                  {p}
                </Text>
              ))}
              {term.source ? (
                <Text variant="caption" tone="muted">
                  Source: {term.source}
                </Text>
              ) : null}
            </Card>
          </View>
        );
      })}
      <View nativeID="numbers" testID="definition-numbers">
        <Card>
          <Text variant="heading" role="heading" aria-level={2}>
            How numbers are written
          </Text>
          {NUMBER_RULES.map((r) => (
            <Text key={r}>• {r}</Text>
          ))}
        </Card>
      </View>
    </Screen>
  );
}
