import React from "react";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { EmptyState } from "@/components/ui/states";

export default function NotFound() {
  const router = useRouter();
  return (
    <Screen title="Not found">
      <EmptyState
        icon="compass"
        title="There is no page at this address"
        message="It may have moved, or the link may be incomplete."
        actionLabel="Go to Home"
        onAction={() => router.replace("/")}
      />
    </Screen>
  );
}
