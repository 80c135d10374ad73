import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { BackupCard } from "@/components/admin/backup-card";
import { ComputeCard } from "@/components/admin/compute-card";
import { OutboxList } from "@/components/admin/outbox-list";
import { UserList } from "@/components/admin/user-list";
import { navItemsFor } from "@/components/ui/nav-items";
import { renderWithProviders } from "./render";

describe("admin page parts", () => {
  test("the Admin section is listed for site admins only", () => {
    expect(navItemsFor().map((i) => i.label)).not.toContain("Admin");
    expect(navItemsFor({ isSiteAdmin: false }).map((i) => i.label)).not.toContain("Admin");
    expect(navItemsFor({ isSiteAdmin: true }).map((i) => i.label)).toContain("Admin");
    expect(navItemsFor().map((i) => i.label)).toEqual(expect.arrayContaining(["Lab", "Settings"]));
  });

  test("backup: the button calls through, and the written file name is shown", () => {
    const onBackup = jest.fn();
    renderWithProviders(
      <BackupCard
        onBackup={onBackup}
        result={{ file: "linger-2026-03-01T10-00-00-000Z.db", bytes: 3 * 1024 * 1024 }}
      />,
    );
    fireEvent.press(screen.getByLabelText("Back up the database now"));
    expect(onBackup).toHaveBeenCalledTimes(1);
    expect(screen.getByText("Backup written: linger-2026-03-01T10-00-00-000Z.db (3 MB).")).toBeTruthy();
  });

  test("outbox shows subject, recipient and text; users show their lab count", () => {
    renderWithProviders(
      <>
        <OutboxList
          messages={[
            {
              id: 7,
              to: "a@example.org",
              from: "linger@localhost",
              subject: "You are invited to Tank Sensor Group on Linger",
              text: "Hello,\n\nopen this link",
              receivedAt: "2026-03-01T10:00:00.000Z",
            },
          ]}
        />
        <UserList
          users={[
            {
              id: "u1",
              email: "a@example.org",
              displayName: "Tank technician",
              isSiteAdmin: true,
              createdAt: "2026-03-01T10:00:00.000Z",
              labCount: 2,
            },
          ]}
        />
      </>,
    );
    expect(screen.getByText("You are invited to Tank Sensor Group on Linger")).toBeTruthy();
    expect(screen.getByText(/^to a@example.org · /)).toBeTruthy();
    expect(screen.getByText("Hello,\n\nopen this link")).toBeTruthy();
    expect(screen.getByText("Tank technician · site admin")).toBeTruthy();
    expect(screen.getByText(/a@example.org · 2 labs · joined/)).toBeTruthy();
  });
});

describe("compute card", () => {
  const now = Date.parse("2026-03-01T10:00:30.000Z");
  const base = { window: 8, inFlight: 5, chunksPerSecond: 3.5, queueDepth: 4 };

  test("embedded: says chunks run on the server's own threads", () => {
    renderWithProviders(
      <ComputeCard
        now={now}
        status={{ ...base, mode: "embedded", redis: null, queueDepth: 0, workerCount: 0, workers: [] }}
      />,
    );
    expect(
      screen.getByText(/^Chunks run on this server's own threads \(no Redis configured\)\. 5 running · 3\.5 chunks\/s/),
    ).toBeTruthy();
  });

  test("Redis: worker count, queue depth, window, rate and each worker's last heartbeat", () => {
    renderWithProviders(
      <ComputeCard
        now={now}
        status={{
          ...base,
          mode: "redis",
          redis: "connected",
          workerCount: 1,
          workers: [
            {
              id: "tank-node-2-4711",
              host: "tank-node-2",
              pid: 4711,
              threads: 4,
              engineVersion: "linger-engine 1.0.0",
              busy: 3,
              chunksDone: 120,
              startedAt: "2026-03-01T09:00:00.000Z",
              lastHeartbeat: "2026-03-01T10:00:26.000Z",
            },
          ],
        }}
      />,
    );
    expect(
      screen.getByText("1 worker · 4 chunks queued · 5 out of a window of 8 · 3.5 chunks/s over the last minute"),
    ).toBeTruthy();
    expect(screen.getByText("tank-node-2-4711")).toBeTruthy();
    expect(
      screen.getByText(/4 threads · 3 busy · 120 chunks done · linger-engine 1\.0\.0 · last heartbeat 4 s ago$/),
    ).toBeTruthy();
  });

  test("Redis down or no worker: says so", () => {
    renderWithProviders(
      <ComputeCard now={now} status={{ ...base, mode: "redis", redis: "disconnected", workerCount: 0, workers: [] }} />,
    );
    expect(screen.getByText("Redis is unreachable: queued chunks wait until it is back.")).toBeTruthy();
    expect(screen.getByText(/No worker has sent a heartbeat: start one with npm run worker/)).toBeTruthy();
  });
});
