import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import type { IconName } from "@/components/ui/icon";

/**
 * A destructive action in two steps: the first press asks in words what will
 * happen, the second does it; "Keep" backs out.
 */
export function ConfirmAction({
  label,
  question,
  confirmLabel,
  onConfirm,
  busy,
  icon,
  accessibilityLabel,
  testID,
}: {
  label: string;
  /** e.g. "Remove Demo viewer from the lab?" */
  question: string;
  confirmLabel?: string;
  onConfirm: () => void;
  busy?: boolean;
  icon?: IconName;
  accessibilityLabel?: string;
  testID?: string;
}) {
  const t = useTheme();
  const [asking, setAsking] = useState(false);
  if (!asking) {
    return (
      <Button
        label={label}
        variant="secondary"
        compact
        icon={icon}
        busy={busy}
        accessibilityLabel={accessibilityLabel}
        onPress={() => setAsking(true)}
        testID={testID}
      />
    );
  }
  return (
    <View role="group" aria-label={question} style={{ gap: t.spacing.sm, flexShrink: 1, maxWidth: "100%" }}>
      <Text variant="label">{question}</Text>
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
        <Button
          label={confirmLabel ?? label}
          variant="danger"
          compact
          busy={busy}
          onPress={() => {
            setAsking(false);
            onConfirm();
          }}
          testID={testID ? `${testID}-confirm` : undefined}
        />
        <Button
          label="Keep"
          variant="secondary"
          compact
          onPress={() => setAsking(false)}
          testID={testID ? `${testID}-keep` : undefined}
        />
      </View>
    </View>
  );
}
