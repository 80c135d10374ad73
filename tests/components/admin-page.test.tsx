import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { BackupCard } from "@/components/admin/backup-card";
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
    expect(screen.getByText("Backup written: linger-2026-03-01T10-00-00-000Z.db (3.0 MB).")).toBeTruthy();
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
