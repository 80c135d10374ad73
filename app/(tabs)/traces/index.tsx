import React from "react";
import { Screen } from "../../../components/ui/screen";
import { EmptyState } from "../../../components/ui/states";

export default function TracesScreen() {
  return (
    <Screen title="Traces">
      <EmptyState title="Nothing here yet" message="Uploaded single-cell traces will appear here." />
    </Screen>
  );
}
