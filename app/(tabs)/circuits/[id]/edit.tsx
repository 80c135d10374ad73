import React, { useEffect, useState } from "react";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { ErrorState, LoadingState } from "@/components/ui/states";
import { Text } from "@/components/ui/text";
import { CircuitEditor } from "@/components/forms/circuit-editor";
import { FeedForwardBadge } from "@/components/circuits/circuit-view";
import { stripPrefix } from "@/components/forms/zod-errors";
import { useCircuit, useCircuitCheck, useUpdateCircuit } from "@/components/data/circuits";
import { ApiError } from "@/components/data/api";
import type { CircuitInput } from "@/shared/schemas/circuit";

export default function EditCircuit() {
  const router = useRouter();
  const { id } = useLocalSearchParams<{ id: string }>();
  const q = useCircuit(id);
  const update = useUpdateCircuit(id);
  const [draft, setDraft] = useState<CircuitInput | null>(null);
  const [debounced, setDebounced] = useState<CircuitInput | null>(null);
  useEffect(() => {
    const h = setTimeout(() => setDebounced(draft), 500);
    return () => clearTimeout(h);
  }, [draft]);
  const check = useCircuitCheck(debounced ?? q.data?.body, !!(debounced ?? q.data));
  if (q.isPending)
    return (
      <Screen back={{ href: `/circuits/${id}`, label: "Circuit" }} title="Edit circuit">
        <LoadingState label="Loading circuit" />
      </Screen>
    );
  if (q.error)
    return (
      <Screen back={{ href: `/circuits/${id}`, label: "Circuit" }} title="Edit circuit">
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      </Screen>
    );
  const server = update.error instanceof ApiError ? update.error : null;
  const ff = check.data ? check.data.feedForward : q.data.feedForward;
  return (
    <Screen
      back={{ href: `/circuits/${id}`, label: "Circuit" }}
      title={`Edit ${q.data.circuit.name}`}
      subtitle={`Saving makes version ${q.data.circuit.currentVersion + 1}.`}
    >
      <CircuitEditor
        initial={q.data.body}
        submitLabel="Save new version"
        busy={update.isPending}
        onChange={setDraft}
        header={
          ff ? (
            <FeedForwardBadge ff={ff} />
          ) : (
            <Text variant="caption" tone="muted">
              No feed-forward loop in this wiring.
            </Text>
          )
        }
        serverErrors={server ? stripPrefix(server.fieldMap(), "body.") : {}}
        serverMessage={
          server
            ? server.status === 409
              ? "Someone saved a newer version while you were editing. Your changes are kept here; reload to see theirs."
              : server.message
            : undefined
        }
        onSubmit={(body) =>
          update.mutate(
            { body, baseVersion: q.data.circuit.currentVersion, name: String(body.name) },
            { onSuccess: () => router.replace(`/circuits/${id}`) },
          )
        }
      />
    </Screen>
  );
}
