import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Checkbox } from "@/components/ui/checkbox";
import { Banner } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { serverFields, serverMessage } from "./server-fields";

/** Display name (what lab members see). Keeps the typed name when the server refuses it. */
export function DisplayNameForm({
  current,
  onSubmit,
  busy,
  error,
  saved,
}: {
  current: string;
  onSubmit: (displayName: string) => void;
  busy?: boolean;
  error?: unknown;
  saved?: boolean;
}) {
  const t = useTheme();
  const [name, setName] = useState(current);
  const [local, setLocal] = useState<string | undefined>();
  // A new saved name replaces the field (React's "adjust state when a prop changes": compare while rendering).
  const [shown, setShown] = useState(current);
  if (current !== shown) {
    setShown(current);
    setName(current);
  }
  const submit = () => {
    const n = name.trim();
    if (!n) return setLocal("Enter the name your lab will see.");
    if (n.length > 80) return setLocal("Use at most 80 characters.");
    setLocal(undefined);
    onSubmit(n);
  };
  const message = serverMessage(error, ["displayName"], "The name could not be saved. Try again.");
  return (
    <View style={{ gap: t.spacing.md }}>
      {message ? <Banner tone="danger">{message}</Banner> : null}
      <Field
        label="Display name"
        testID="display-name"
        value={name}
        onChangeText={setName}
        error={local ?? serverFields(error).displayName}
        autoComplete="name"
        onSubmitEditing={submit}
        hint="Shown to the members of your labs."
      />
      <View style={{ flexDirection: "row", flexWrap: "wrap", alignItems: "center", gap: t.spacing.md }}>
        <Button
          label="Save name"
          variant="secondary"
          onPress={submit}
          busy={busy}
          disabled={name.trim() === current}
          testID="save-display-name"
        />
        {saved && !error && name.trim() === current ? (
          <Text variant="caption" tone="muted" role="status">
            Saved.
          </Text>
        ) : null}
      </View>
    </View>
  );
}

/** The per-user "e-mail me when my lab's runs finish or fail" setting; saved on each change. */
export function RunMailSetting({
  value,
  onChange,
  busy,
  error,
}: {
  value: boolean;
  onChange: (v: boolean) => void;
  busy?: boolean;
  error?: unknown;
}) {
  const t = useTheme();
  return (
    <View style={{ gap: t.spacing.xs }}>
      <Checkbox
        label="E-mail me when my lab's runs and sweeps finish, stop at the event cap, or fail"
        checked={value}
        onChange={onChange}
        disabled={busy}
        testID="notify-on-run-end"
      />
      <Text variant="caption" tone="muted">
        Applies to every lab you belong to.
      </Text>
      {error ? (
        <Banner tone="danger">
          {error instanceof Error ? error.message : "The setting could not be saved. Try again."}
        </Banner>
      ) : null}
    </View>
  );
}
