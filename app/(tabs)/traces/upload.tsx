import React, { useState } from "react";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { TraceUploadForm } from "@/components/traces/upload-form";
import { PreviewSummary } from "@/components/traces/preview-summary";
import { pickTraceFile, usePreviewTraces, useUploadTraces } from "@/components/data/traces";
import { usePrograms } from "@/components/data/programs";
import { LoadMore } from "@/components/ui/load-more";
import { useCurrentLab } from "@/components/data/current-lab";

export default function UploadTracesScreen() {
  const router = useRouter();
  const { canEdit } = useCurrentLab();
  const programs = usePrograms();
  const preview = usePreviewTraces();
  const save = useUploadTraces();
  const [previewKey, setPreviewKey] = useState<string | null>(null);
  const title = "Upload traces";
  const subtitle = "Time-lapse reporter values of single cells, scored with the same figures as simulations.";
  if (!canEdit)
    return (
      <Screen back={{ href: "/traces", label: "Traces" }} title={title}>
        <EmptyState
          icon="lock"
          title="Editors upload traces"
          message="Your role in this lab is viewer; ask an owner to make you an editor."
        />
      </Screen>
    );
  if (programs.isPending)
    return (
      <Screen back={{ href: "/traces", label: "Traces" }} title={title}>
        <LoadingState label="Loading the lab's input programs" />
      </Screen>
    );
  if (programs.error)
    return (
      <Screen back={{ href: "/traces", label: "Traces" }} title={title}>
        <ErrorState error={programs.error} onRetry={() => programs.refetch()} />
      </Screen>
    );
  // The error shown is the latest action's: a save error after a preview, or the preview's.
  const error = save.error ?? preview.error;
  return (
    <Screen back={{ href: "/traces", label: "Traces" }} title={title} subtitle={subtitle} testID="trace-upload-screen">
      <TraceUploadForm
        programs={programs.data.map((p) => ({ id: p.id, name: p.name }))}
        programsMore={<LoadMore list={programs} noun="programs" testID="upload-programs-more" />}
        pickFile={pickTraceFile}
        onPreview={(req) => {
          save.reset();
          preview.mutate(req);
        }}
        onSave={(req) => save.mutate(req, { onSuccess: (d) => router.replace(`/traces/${d.id}`) })}
        onRequestKey={setPreviewKey}
        previewBusy={preview.isPending}
        saveBusy={save.isPending}
        error={error}
        renderPreview={(key) =>
          preview.data ? <PreviewSummary preview={preview.data} stale={key !== previewKey} /> : null
        }
      />
    </Screen>
  );
}
