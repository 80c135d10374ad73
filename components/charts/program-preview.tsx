import React from "react";
import { useProgramPreview } from "@/components/data/programs";
import { useTheme } from "@/components/theme/use-theme";
import { LazyChart } from "./lazy-chart";
import { programPreviewSpec } from "./specs";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import type { InputProgramInput } from "@/shared/schemas/input-program";

/** Live preview plot of an input program's signal. */
export function ProgramPreview({ program, endTimeMinutes }: { program: InputProgramInput; endTimeMinutes: number }) {
  const t = useTheme();
  const q = useProgramPreview(program, endTimeMinutes);
  if (q.isPending) return <LoadingState label="Drawing preview" />;
  if (q.error) return <ErrorState title="Preview not available" error={q.error} />;
  return (
    <>
      <LazyChart spec={programPreviewSpec(q.data, t.colors)} testID="program-preview" />
      <Text variant="caption" tone="muted">
        {q.data.pulses.length} pulses before {endTimeMinutes} min{q.data.note ? ` · ${q.data.note}` : ""}
      </Text>
    </>
  );
}
