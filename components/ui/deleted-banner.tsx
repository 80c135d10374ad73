/**
 * What a screen shows in place of a deleted object's actions: it is deleted, when it will be purged, and an
 * Undo (restore within the undo period, API_LIMITS.undoDays), with an optional way back to the list. Runs,
 * trace sets and regime maps share it so the wording and the period cannot drift apart.
 */
import React from "react";
import { View } from "react-native";
import { useRouter, type Href } from "expo-router";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { Banner } from "@/components/ui/states";
import { useTheme } from "@/components/theme/use-theme";
import { API_LIMITS } from "@/shared/schemas/api-runs";

export function DeletedBanner(props: {
  /** "run", "trace set", "regime map". */
  what: string;
  onUndo: () => void;
  busy?: boolean;
  back?: { label: string; href: Href };
  testID?: string;
}) {
  const t = useTheme();
  const router = useRouter();
  return (
    <Banner tone="notice" testID={props.testID}>
      <View style={{ gap: t.spacing.sm }}>
        <Text style={{ color: t.colors.onNoticeSoft }}>
          This {props.what} is deleted and will be purged after {API_LIMITS.undoDays} days.
        </Text>
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
          <Button
            label="Undo delete"
            variant="secondary"
            busy={props.busy}
            onPress={props.onUndo}
            testID="undo-delete"
          />
          {props.back ? (
            <Button
              label={props.back.label}
              variant="secondary"
              icon="arrow-left"
              onPress={() => router.replace(props.back!.href)}
              testID="deleted-back"
            />
          ) : null}
        </View>
      </View>
    </Banner>
  );
}
