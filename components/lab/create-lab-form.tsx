import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { serverFields, serverMessage } from "@/components/account/server-fields";

/** Create a new lab (the creator owns it). Keeps the typed name when the server refuses it. */
export function CreateLabForm({
  onSubmit,
  busy,
  error,
}: {
  onSubmit: (name: string) => void;
  busy?: boolean;
  error?: unknown;
}) {
  const t = useTheme();
  const [name, setName] = useState("");
  const [local, setLocal] = useState<string | undefined>();
  const submit = () => {
    const n = name.trim();
    if (!n) return setLocal("Enter a name for the new lab.");
    if (n.length > 80) return setLocal("Use at most 80 characters.");
    setLocal(undefined);
    onSubmit(n);
  };
  const message = serverMessage(error, ["name"], "The lab could not be created. Try again.");
  return (
    <View style={{ gap: t.spacing.md }}>
      {message ? <Banner tone="danger">{message}</Banner> : null}
      <Field
        label="New lab name"
        testID="new-lab-name"
        value={name}
        onChangeText={setName}
        error={local ?? serverFields(error).name}
        onSubmitEditing={submit}
      />
      <Button
        label="Create lab"
        variant="secondary"
        icon="plus"
        onPress={submit}
        busy={busy}
        testID="create-lab"
        style={{ alignSelf: "flex-start" }}
      />
    </View>
  );
}
