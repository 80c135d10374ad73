import React from "react";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { EmptyState } from "@/components/ui/states";
import { SbmlImport } from "@/components/circuits/sbml-import";
import { pickSbmlFile, useReadSbml, useSaveSbml } from "@/components/data/sbml";
import { useCurrentLab } from "@/components/data/current-lab";
import { useCircuits } from "@/components/data/circuits";

export default function ImportSbmlScreen() {
  const router = useRouter();
  const { canEdit } = useCurrentLab();
  const read = useReadSbml();
  const save = useSaveSbml();
  const circuits = useCircuits();
  const back = { href: "/circuits" as const, label: "Circuits" };
  const title = "Import SBML";
  if (!canEdit)
    return (
      <Screen back={back} title={title}>
        <EmptyState
          icon="lock"
          title="Editors import models"
          message="Your role in this lab is viewer; ask an owner to make you an editor."
        />
      </Screen>
    );
  return (
    <Screen
      back={back}
      title={title}
      subtitle="Bring a model written in SBML, the open exchange format for biochemical models, into the lab as a circuit."
      testID="sbml-import-screen"
    >
      <SbmlImport
        pickFile={pickSbmlFile}
        onRead={(sbml) => {
          save.reset();
          read.mutate(sbml);
        }}
        onSave={(req) => save.mutate(req, { onSuccess: (d) => router.replace(`/circuits/${d.circuit.id}`) })}
        circuits={(circuits.data ?? []).map((c) => ({ id: c.id, name: c.name }))}
        reading={read.data}
        readBusy={read.isPending}
        saveBusy={save.isPending}
        error={save.error ?? read.error}
      />
    </Screen>
  );
}
