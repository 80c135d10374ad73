import React from "react";
import { Screen } from "../../components/ui/screen";
import { EmptyState } from "../../components/ui/states";

export default function Compare() {
  return (
    <Screen title="Compare">
      <EmptyState title="Choose runs to compare" message="Pick two to four finished runs." />
    </Screen>
  );
}
