import React, { useState } from "react";
import { View } from "react-native";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Banner, ErrorState, LoadingState } from "@/components/ui/states";
import { CircuitEditor } from "@/components/forms/circuit-editor";
import { stripPrefix } from "@/components/forms/zod-errors";
import { useCreateCircuit, useTemplates } from "@/components/data/circuits";
import { ApiError } from "@/components/data/api";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import type { CircuitInput } from "@/shared/schemas/circuit";
import type { TemplateKey } from "@/shared/schemas/api-circuits";

const BLANK: CircuitInput = {
  name: "New circuit",
  description: "",
  species: [{ name: "Z", initialCount: 0 }],
  signals: [{ name: "inducer", offLevel: 0, onLevel: 1 }],
  reactions: [
    {
      name: "makeZ",
      reactants: [],
      products: [{ species: "Z", count: 1 }],
      modifiers: [],
      rate: { kind: "constant", ratePerMinute: 1 },
      scaledBy: "inducer",
    },
    {
      name: "loseZ",
      reactants: [{ species: "Z", count: 1 }],
      products: [],
      modifiers: [],
      rate: { kind: "massAction", ratePerMinute: 0.1 },
    },
  ],
  outputSpecies: "Z",
};

export default function NewCircuit() {
  const t = useTheme();
  const router = useRouter();
  const { isWide } = useBreakpoints();
  const templates = useTemplates();
  const create = useCreateCircuit();
  const [mode, setMode] = useState<"template" | "scratch">("template");
  const [chosen, setChosen] = useState<TemplateKey | null>(null);
  const [name, setName] = useState("");
  const [nameError, setNameError] = useState<string | undefined>();
  const server = create.error instanceof ApiError ? create.error : null;

  const createFromTemplate = () => {
    if (!chosen) return;
    if (!name.trim()) return setNameError("Give the circuit a name.");
    setNameError(undefined);
    create.mutate(
      { name: name.trim(), template: chosen },
      { onSuccess: (d) => router.replace(`/circuits/${d.circuit.id}`) },
    );
  };

  if (mode === "scratch") {
    return (
      <Screen
        back={{ href: "/circuits", label: "Circuits" }}
        title="New circuit"
        subtitle="From scratch"
        actions={<Button label="Use a template instead" variant="secondary" onPress={() => setMode("template")} />}
      >
        <CircuitEditor
          initial={BLANK}
          submitLabel="Create circuit"
          busy={create.isPending}
          serverErrors={server ? stripPrefix(server.fieldMap(), "body.") : {}}
          serverMessage={server ? server.message : undefined}
          onSubmit={(body) =>
            create.mutate(
              { name: String(body.name), body },
              { onSuccess: (d) => router.replace(`/circuits/${d.circuit.id}`) },
            )
          }
        />
      </Screen>
    );
  }

  return (
    <Screen
      back={{ href: "/circuits", label: "Circuits" }}
      title="New circuit"
      subtitle="Start from a template, then edit anything."
    >
      {templates.isPending ? (
        <LoadingState label="Loading templates" />
      ) : templates.error ? (
        <ErrorState title="Templates could not be loaded" error={templates.error} onRetry={() => templates.refetch()} />
      ) : (
        <View
          role="radiogroup"
          aria-label="Templates"
          style={isWide ? { flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md } : { gap: t.spacing.md }}
        >
          {templates.data.map((tp) => {
            const selected = chosen === tp.key;
            return (
              <View key={tp.key} style={isWide ? { width: "48%", flexGrow: 1 } : undefined}>
                <Card
                  onPress={() => {
                    setChosen(tp.key);
                    if (!name) setName(tp.title);
                  }}
                  checked={selected}
                  accessibilityLabel={tp.title}
                  testID={`template-${tp.key}`}
                  style={
                    selected
                      ? { borderColor: t.colors.primary, borderWidth: 2, backgroundColor: t.colors.primarySoft }
                      : undefined
                  }
                >
                  <Text variant="bodyStrong" style={selected ? { color: t.colors.onPrimarySoft } : undefined}>
                    {tp.title}
                  </Text>
                  <Text variant="caption" style={{ color: selected ? t.colors.onPrimarySoft : t.colors.textMuted }}>
                    {tp.description}
                  </Text>
                  {tp.feedForward ? (
                    <Text variant="caption" style={{ color: selected ? t.colors.onPrimarySoft : t.colors.primary }}>
                      Feed-forward: {tp.feedForward.label}
                      {tp.feedForward.logic ? `, ${tp.feedForward.logic.toUpperCase()} logic` : ""}
                    </Text>
                  ) : null}
                </Card>
              </View>
            );
          })}
        </View>
      )}
      {chosen ? (
        <Card>
          <Field
            label="Name of the new circuit"
            value={name}
            onChangeText={setName}
            error={nameError ?? server?.fieldMap().name}
            testID="new-circuit-name"
          />
          {server && !server.fields.length ? <Banner tone="danger">{server.message}</Banner> : null}
          <Button
            label="Create from template"
            icon="check"
            onPress={createFromTemplate}
            busy={create.isPending}
            testID="create-from-template"
          />
        </Card>
      ) : null}
      <Button
        label="Start from scratch"
        variant="secondary"
        icon="edit-3"
        onPress={() => setMode("scratch")}
        style={{ alignSelf: "flex-start" }}
      />
    </Screen>
  );
}
