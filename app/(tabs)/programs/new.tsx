import React from "react";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { ProgramEditor, PROGRAM_DEFAULTS } from "@/components/forms/program-editor";
import { ProgramPreview } from "@/components/charts/program-preview";
import { stripPrefix } from "@/components/forms/zod-errors";
import { useCreateProgram } from "@/components/data/programs";
import { ApiError } from "@/components/data/api";

export default function NewProgram() {
  const router = useRouter();
  const create = useCreateProgram();
  const server = create.error instanceof ApiError ? create.error : null;
  return (
    <Screen back={{ href: "/programs", label: "Inputs" }} title="New input program">
      <ProgramEditor
        initialName="Duration ladder"
        initial={PROGRAM_DEFAULTS.ladder}
        submitLabel="Create program"
        busy={create.isPending}
        serverErrors={server ? stripPrefix(server.fieldMap(), "body.") : {}}
        serverMessage={server?.message}
        renderPreview={(program, end) => <ProgramPreview program={program} endTimeMinutes={end} />}
        onSubmit={(name, body) =>
          create.mutate({ name, body }, { onSuccess: (d) => router.replace(`/programs/${d.program.id}`) })
        }
      />
    </Screen>
  );
}
