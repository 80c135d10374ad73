/**
 * Download a circuit as an SBML file, optionally with one of the lab's input
 * programs written in as events on the signal it drives.
 */
import React, { useState } from "react";
import { Linking } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { usePrograms } from "@/components/data/programs";
import { sbmlExportUrl } from "@/components/data/sbml";
import type { Circuit } from "@/shared/schemas/circuit";

const NONE = "none";

export function SbmlExportCard({ circuitId, body }: { circuitId: string; body: Circuit }) {
  const programs = usePrograms();
  const [programId, setProgramId] = useState<string>(NONE);
  const [signal, setSignal] = useState<string>(body.signals[0]?.name ?? "");
  const canDrive = body.signals.length > 0;
  const list = programs.data ?? [];
  const url = sbmlExportUrl(
    circuitId,
    programId !== NONE ? { programId, signal: body.signals.length > 1 ? signal : undefined } : null,
  );
  return (
    <Card testID="sbml-export">
      <Text variant="heading">SBML file</Text>
      <Text variant="caption" tone="muted">
        The current version as SBML Level 3 Version 2, for other tools and model collections.
        {canDrive ? " An input program, if you pick one, is written in as timed changes of its signal." : ""}
      </Text>
      {canDrive && list.length > 0 ? (
        <Choice
          label="Input program in the file"
          value={programId}
          options={[{ value: NONE, label: "None" }, ...list.map((p) => ({ value: p.id, label: p.name }))]}
          onChange={setProgramId}
          testID="sbml-export-program"
        />
      ) : null}
      {canDrive && programId !== NONE && body.signals.length > 1 ? (
        <Choice
          label="Signal the program drives"
          value={signal}
          options={body.signals.map((s) => ({ value: s.name, label: s.name }))}
          onChange={setSignal}
        />
      ) : null}
      <Button
        label="Download SBML file"
        variant="secondary"
        icon="download"
        compact
        onPress={() => Linking.openURL(url)}
        style={{ alignSelf: "flex-start" }}
        testID="sbml-export-download"
      />
    </Card>
  );
}
