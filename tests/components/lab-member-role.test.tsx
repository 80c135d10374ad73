import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { MemberList } from "@/components/lab/member-list";
import { ApiError } from "@/components/data/api";
import type { LabMember, LabRole } from "@/components/data/labs";
import { renderWithProviders } from "./render";

const MEMBERS: LabMember[] = [
  {
    userId: "u-owner",
    email: "owner@example.org",
    displayName: "Demo owner",
    role: "owner",
    joinedAt: "2025-01-01T00:00:00.000Z",
  },
  {
    userId: "u-editor",
    email: "editor@example.org",
    displayName: "Demo editor",
    role: "editor",
    joinedAt: "2025-01-01T00:00:00.000Z",
  },
];
const LAST_OWNER = "A lab needs at least one owner. Make someone else an owner first.";

/** Like the Lab screen: the parent runs the change and passes the refusal back for that member. */
function Harness({ onChange }: { onChange?: (userId: string, role: LabRole) => void }) {
  const [error, setError] = React.useState<{ userId: string; error: unknown } | null>(null);
  return (
    <MemberList
      members={MEMBERS}
      myUserId="u-owner"
      canManage
      error={error}
      onChangeRole={(userId, role) => {
        onChange?.(userId, role);
        setError({ userId, error: new ApiError(409, "last_owner", LAST_OWNER) });
      }}
      onRemove={() => {}}
    />
  );
}

describe("Member role change", () => {
  test("the server's refusal appears under that member, and the role shown stays the stored one", () => {
    const onChange = jest.fn();
    renderWithProviders(<Harness onChange={onChange} />);
    // Demoting oneself as owner asks first.
    fireEvent.press(screen.getByTestId("role-owner@example.org-viewer"));
    expect(onChange).not.toHaveBeenCalled();
    expect(screen.getByText("Make yourself viewer? You will no longer manage this lab.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Make me viewer"));
    expect(onChange).toHaveBeenCalledWith("u-owner", "viewer");
    expect(screen.getByTestId("member-error-owner@example.org")).toBeTruthy();
    expect(screen.getByText(LAST_OWNER)).toBeTruthy();
    expect(screen.queryByTestId("member-error-editor@example.org")).toBeNull();
    expect(screen.getByTestId("role-owner@example.org-owner").props.accessibilityState?.checked).toBe(true);
  });

  test("changing another member's role calls through at once", () => {
    const onChange = jest.fn();
    renderWithProviders(<Harness onChange={onChange} />);
    fireEvent.press(screen.getByTestId("role-editor@example.org-owner"));
    expect(onChange).toHaveBeenCalledWith("u-editor", "owner");
  });

  test("removing a member asks first and can be backed out of", () => {
    const onRemove = jest.fn();
    renderWithProviders(
      <MemberList members={MEMBERS} myUserId="u-owner" canManage onChangeRole={() => {}} onRemove={onRemove} />,
    );
    expect(screen.queryByLabelText("Remove Demo owner")).toBeNull();
    fireEvent.press(screen.getByLabelText("Remove Demo editor"));
    expect(onRemove).not.toHaveBeenCalled();
    fireEvent.press(screen.getByLabelText("Keep"));
    fireEvent.press(screen.getByLabelText("Remove Demo editor"));
    fireEvent.press(screen.getByTestId("remove-editor@example.org-confirm"));
    expect(onRemove).toHaveBeenCalledWith("u-editor");
  });

  test("members who do not manage the lab see roles in words, with no controls", () => {
    renderWithProviders(
      <MemberList
        members={MEMBERS}
        myUserId="u-editor"
        canManage={false}
        onChangeRole={() => {}}
        onRemove={() => {}}
      />,
    );
    expect(screen.getByText("Owner: manages members and the lab, and runs studies")).toBeTruthy();
    expect(screen.queryByTestId("role-owner@example.org-viewer")).toBeNull();
    expect(screen.queryByLabelText("Remove Demo owner")).toBeNull();
  });
});
