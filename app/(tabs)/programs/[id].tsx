import React, { useState } from "react";
import { View } from "react-native";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Banner, ErrorState, LoadingState } from "@/components/ui/states";
import { ProgramEditor, suggestedEndTime } from "@/components/forms/program-editor";
import { ProgramPreview } from "@/components/charts/program-preview";
import { stripPrefix } from "@/components/forms/zod-errors";
import { useArchiveProgram, useDuplicateProgram, useProgram, useUpdateProgram } from "@/components/data/programs";
import { useCurrentLab } from "@/components/data/current-lab";
import { ApiError } from "@/components/data/api";
import { useTheme } from "@/components/theme/use-theme";

export default function ProgramDetail() {
  const t = useTheme();
  const router = useRouter();
  const { id } = useLocalSearchParams<{ id: string }>();
  const { canEdit } = useCurrentLab();
  const q = useProgram(id);
  const update = useUpdateProgram(id);
  const duplicate = useDuplicateProgram();
  const archive = useArchiveProgram();
  const [editing, setEditing] = useState(false);
  if (q.isPending)
    return (
      <Screen back={{ href: "/programs", label: "Inputs" }} title="Input program">
        <LoadingState />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: "/programs", label: "Inputs" }} title="Input program">
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const { program, body } = q.data;
  const server = update.error instanceof ApiError ? update.error : null;
  if (editing) {
    return (
      <Screen
        back={{ href: "/programs", label: "Inputs" }}
        title={`Edit ${program.name}`}
        actions={<Button label="Stop editing" variant="secondary" onPress={() => setEditing(false)} />}
      >
        <ProgramEditor
          initialName={program.name}
          initial={body}
          submitLabel="Save program"
          busy={update.isPending}
          serverErrors={server ? stripPrefix(server.fieldMap(), "body.") : {}}
          serverMessage={server?.message}
          renderPreview={(p, end) => <ProgramPreview program={p} endTimeMinutes={end} />}
          onSubmit={(name, b) => update.mutate({ name, body: b }, { onSuccess: () => setEditing(false) })}
        />
      </Screen>
    );
  }
  return (
    <Screen
      back={{ href: "/programs", label: "Inputs" }}
      title={program.name}
      subtitle={program.description}
      actions={
        canEdit ? (
          <>
            <Button label="Edit" icon="edit-2" onPress={() => setEditing(true)} />
            <Button label="Start a study" variant="secondary" icon="play" href={`/runs/new?programId=${program.id}`} />
          </>
        ) : null
      }
    >
      {program.archivedAt ? <Banner tone="notice">This program is archived.</Banner> : null}
      <Card>
        <Text variant="heading">Signal</Text>
        <ProgramPreview program={body} endTimeMinutes={suggestedEndTime(body)} />
      </Card>
      <Text variant="caption" tone="muted">
        Programs are not versioned: each run stores the whole program it used.
      </Text>
      {canEdit ? (
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
          <Button
            label="Duplicate"
            variant="secondary"
            icon="copy"
            busy={duplicate.isPending}
            onPress={() => duplicate.mutate({ id: program.id }, { onSuccess: () => router.push("/programs") })}
          />
          <Button
            label={program.archivedAt ? "Restore from archive" : "Archive"}
            variant="secondary"
            icon="archive"
            busy={archive.isPending}
            onPress={() => archive.mutate({ id: program.id, archived: !program.archivedAt })}
          />
        </View>
      ) : null}
    </Screen>
  );
}
