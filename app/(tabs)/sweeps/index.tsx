import React from "react";
import { Screen } from "../../../components/ui/screen";
import { EmptyState } from "../../../components/ui/states";

export default function SweepsScreen() {
  return (
    <Screen title="Sweeps">
      <EmptyState title="Nothing here yet" message="Parameter sweeps will appear here." />
    </Screen>
  );
}
