import React from "react";
import { screen } from "@testing-library/react-native";
import { describeAuditEvent } from "@/components/lab/audit-words";
import { AuditList } from "@/components/lab/audit-list";
import type { AuditEvent } from "@/components/data/labs";
import { renderWithProviders } from "./render";

const event = (over: Partial<AuditEvent>): AuditEvent => ({
  id: 1,
  labId: "lab_1",
  userId: "u-editor",
  userName: "Demo editor",
  action: "run.launched",
  targetType: "run",
  targetId: "run_1",
  detail: null,
  at: "2026-03-01T10:00:00.000Z",
  ...over,
});
const names = {
  user: (id: string) => ({ "u-viewer": "Demo viewer", "u-owner": "Demo owner" })[id],
  run: (id: string) => ({ run_1: "Hold sensor on Feed spikes", run_0: "Tank sensor, direct on Duration ladder" })[id],
};

describe("audit trail in plain words", () => {
  test("runs: launched (name from the event), reproduced and cancelled (names from the lab's runs)", () => {
    expect(describeAuditEvent(event({ detail: { name: "Hold sensor on Feed spikes" } }), names)).toBe(
      "Demo editor launched run “Hold sensor on Feed spikes”",
    );
    expect(describeAuditEvent(event({ action: "run.reproduced", detail: { of: "run_0" } }), names)).toBe(
      "Demo editor reproduced run “Tank sensor, direct on Duration ladder” as run “Hold sensor on Feed spikes”",
    );
    expect(describeAuditEvent(event({ action: "run.cancelled", targetId: "run_gone" }), names)).toBe(
      "Demo editor cancelled run run_gone",
    );
  });

  test("regime maps: computed (name from the event), deleted and restored", () => {
    const map = { targetType: "regime-map", targetId: "rmp_1" };
    expect(
      describeAuditEvent(event({ ...map, action: "regime-map.computed", detail: { name: "Feed rate x hold" } }), names),
    ).toBe("Demo editor computed regime map “Feed rate x hold”");
    expect(describeAuditEvent(event({ ...map, action: "regime-map.deleted" }), names)).toBe(
      "Demo editor deleted a regime map",
    );
    expect(describeAuditEvent(event({ ...map, action: "regime-map.restored" }), names)).toBe(
      "Demo editor restored a regime map",
    );
  });

  test("members: invited, role changed, removed, left; a deleted account reads as a former member", () => {
    const owner = { userId: "u-owner", userName: "Demo owner" };
    expect(
      describeAuditEvent(
        event({
          ...owner,
          action: "member.invited",
          targetType: "invitation",
          targetId: "a@example.org",
          detail: { email: "a@example.org", role: "editor" },
        }),
        names,
      ),
    ).toBe("Demo owner invited a@example.org as an editor");
    expect(
      describeAuditEvent(
        event({
          ...owner,
          action: "member.role_changed",
          targetId: "u-viewer",
          detail: { from: "viewer", to: "editor" },
        }),
        names,
      ),
    ).toBe("Demo owner changed Demo viewer’s role from viewer to editor");
    expect(
      describeAuditEvent(
        event({ ...owner, action: "member.removed", targetId: "u-gone", detail: { role: "viewer" } }),
        names,
      ),
    ).toBe("Demo owner removed a former member from the lab");
    expect(describeAuditEvent(event({ userName: null, action: "member.left", targetId: "u-x" }), names)).toBe(
      "A former member left the lab",
    );
  });

  test("a run resumed after a server stop reads as such, without a person", () => {
    expect(
      describeAuditEvent(
        event({ action: "run.resumed", userId: null, userName: null, detail: { chunksStored: 3, chunks: 30 } }),
        names,
      ),
    ).toBe("The server stopped during run “Hold sensor on Feed spikes”; it resumed with 3 of 30 chunks kept");
  });

  test("unknown actions still show their code", () => {
    expect(describeAuditEvent(event({ action: "something.new", targetId: "x1" }))).toBe(
      "Demo editor: something.new (x1)",
    );
  });

  test("the list shows each sentence with its time in UTC", () => {
    renderWithProviders(
      <AuditList events={[event({ detail: { name: "Hold sensor on Feed spikes" } })]} names={names} />,
    );
    expect(screen.getByText("Demo editor launched run “Hold sensor on Feed spikes”")).toBeTruthy();
    expect(screen.getByText(/1 Mar 2026.*10:00 UTC/)).toBeTruthy();
  });
});
