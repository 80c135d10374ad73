import React from "react";
import { View } from "react-native";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Button } from "@/components/ui/button";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { AuditList } from "@/components/lab/audit-list";
import { useCurrentLab } from "@/components/data/current-lab";
import { useAudit, useLab } from "@/components/data/labs";
import { runIdsOf, useRunsByIds } from "@/components/data/runs";

/** The lab's audit trail (owners), newest first, paged back. */
export default function AuditScreen() {
  const { lab } = useCurrentLab();
  const labId = lab?.id ?? "";
  const isOwner = lab?.role === "owner";
  const audit = useAudit(labId, isOwner);
  const detail = useLab(labId);
  const runs = useRunsByIds(runIdsOf(audit.data));
  const title = "Lab history";
  if (!lab || !isOwner) {
    return (
      <Screen back={{ href: "/lab", label: "Lab" }} title={title}>
        <EmptyState
          icon="lock"
          title="Only lab owners read the history"
          message="Ask an owner of this lab if you need to know who did what."
        />
      </Screen>
    );
  }
  if (audit.isPending)
    return (
      <Screen back={{ href: "/lab", label: "Lab" }} title={title} subtitle={lab.name}>
        <LoadingState label="Loading the history" />
      </Screen>
    );
  if (audit.error)
    return (
      <Screen back={{ href: "/lab", label: "Lab" }} title={title} subtitle={lab.name}>
        <ErrorState title="The history could not be loaded" error={audit.error} onRetry={() => audit.refetch()} />
      </Screen>
    );
  const events = audit.data;
  const names = {
    user: (id: string) => detail.data?.lab.members.find((m) => m.userId === id)?.displayName,
    run: (id: string) => runs.byId.get(id)?.name,
  };
  return (
    <Screen back={{ href: "/lab", label: "Lab" }} title={title} subtitle={lab.name} testID="audit-screen">
      {events.length === 0 ? (
        <EmptyState icon="clock" title="Nothing has happened in this lab yet" />
      ) : (
        <Card>
          <AuditList events={events} names={names} />
          {audit.hasMore ? (
            <View style={{ flexDirection: "row" }}>
              <Button
                label="Show older events"
                variant="secondary"
                busy={audit.loadingMore}
                onPress={audit.loadMore}
                testID="audit-older"
              />
            </View>
          ) : null}
        </Card>
      )}
    </Screen>
  );
}
