/**
 * Rename a trace set or change its preprocessing and threshold (PATCH; the
 * server recomputes every figure). Values stay as typed when the server
 * refuses them, with its messages under the fields.
 */
import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import { ApiError } from "@/components/data/api";
import { SettingsFields } from "./settings-fields";
import { settingsToValues, validateSettings, valuesToSettings, type SettingsValues } from "./settings-form";
import type { TraceSetDetail, TraceSetPatch } from "@/shared/schemas/api-traces";

export function EditTraceSet({
  traceSet,
  busy,
  error,
  onSave,
  onCancel,
  saved,
}: {
  traceSet: TraceSetDetail;
  busy?: boolean;
  error?: unknown;
  onSave: (patch: TraceSetPatch) => void;
  onCancel: () => void;
  saved?: boolean;
}) {
  const t = useTheme();
  const [name, setName] = useState(traceSet.name);
  const [v, setV] = useState<SettingsValues>(() => settingsToValues(traceSet.settings));
  const [showAll, setShowAll] = useState(false);
  const local = validateSettings(v);
  const server: Record<string, string> = {};
  if (error instanceof ApiError) {
    for (const f of error.fields) {
      const p = f.path.replace(/^body\./, "");
      const k = p.startsWith("settings.")
        ? p.slice("settings.".length)
        : p === "settings"
          ? "scale.unitsPerMolecule"
          : p;
      if (!(k in server)) server[k] = f.message;
    }
  }
  const errors: Record<string, string> = { ...server, ...(showAll ? local : {}) };
  const nameError = !name.trim()
    ? "Give the set a name."
    : name.trim().length > 120
      ? "At most 120 characters."
      : undefined;
  const save = () => {
    setShowAll(true);
    if (Object.keys(local).length || nameError) return;
    onSave({ name: name.trim(), settings: valuesToSettings(v) as TraceSetPatch["settings"] });
  };
  return (
    <View style={{ gap: t.spacing.md }} testID="edit-trace-set">
      <Field
        label="Name"
        value={name}
        onChangeText={setName}
        error={showAll ? nameError : server.name}
        testID="edit-trace-name"
      />
      <SettingsFields
        values={v}
        errors={errors}
        onChange={(k, x) => {
          setV((s) => ({ ...s, [k]: x }));
        }}
        testIDPrefix="edit"
      />
      {error instanceof Error ? (
        <Banner tone="danger" testID="edit-trace-error">
          {error.message}
        </Banner>
      ) : null}
      {saved ? <Banner tone="success">Saved; the figures below are recomputed with these settings.</Banner> : null}
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
        <Button label="Save and recompute" icon="refresh-cw" busy={busy} onPress={save} testID="edit-trace-save" />
        <Button label="Close without saving" variant="secondary" onPress={onCancel} />
      </View>
      <Text variant="caption" tone="muted">
        Earlier matches keep the figures they were computed with; run a match again after a change.
      </Text>
    </View>
  );
}
