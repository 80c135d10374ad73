import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { InviteForm, validateInvite } from "@/components/lab/invite-form";
import { ApiError } from "@/components/data/api";
import { renderWithProviders } from "./render";

describe("InviteForm", () => {
  test("asks for an address and refuses a malformed one without submitting", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<InviteForm onSubmit={onSubmit} />);
    fireEvent.press(screen.getByLabelText("Send invitation"));
    expect(screen.getByText("Enter the e-mail address to invite.")).toBeTruthy();
    fireEvent.changeText(screen.getByLabelText("E-mail address"), "new-member-at-example.org");
    fireEvent.press(screen.getByLabelText("Send invitation"));
    expect(screen.getByText("That does not look like an e-mail address.")).toBeTruthy();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  test("submits the trimmed address with the chosen role (viewer by default)", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<InviteForm onSubmit={onSubmit} />);
    fireEvent.changeText(screen.getByLabelText("E-mail address"), "  tank.tech@example.org ");
    fireEvent.press(screen.getByLabelText("Send invitation"));
    expect(onSubmit).toHaveBeenLastCalledWith({ email: "tank.tech@example.org", role: "viewer" });
    fireEvent.press(screen.getByLabelText("Editor"));
    expect(screen.getByText("Editor: creates circuits and programs and runs studies.")).toBeTruthy();
    fireEvent.press(screen.getByLabelText("Send invitation"));
    expect(onSubmit).toHaveBeenLastCalledWith({ email: "tank.tech@example.org", role: "editor" });
  });

  test("keeps what was typed and shows the server's reason when it refuses", () => {
    function Harness() {
      const [error, setError] = React.useState<unknown>(undefined);
      return (
        <InviteForm
          onSubmit={() =>
            setError(
              new ApiError(409, "already_member", "viewer@example.org is already a member of this lab (viewer)."),
            )
          }
          error={error}
        />
      );
    }
    renderWithProviders(<Harness />);
    fireEvent.changeText(screen.getByLabelText("E-mail address"), "viewer@example.org");
    fireEvent.press(screen.getByLabelText("Owner"));
    fireEvent.press(screen.getByLabelText("Send invitation"));
    expect(screen.getByTestId("invite-error")).toBeTruthy();
    expect(screen.getByText("viewer@example.org is already a member of this lab (viewer).")).toBeTruthy();
    expect(screen.getByLabelText("E-mail address").props.value).toBe("viewer@example.org");
    expect(screen.getByLabelText("Owner").props.accessibilityState?.checked).toBe(true);
  });

  test("a server field error appears under the address field, not as a banner", () => {
    const error = new ApiError(400, "invalid", "Invalid body", [
      { path: "body.email", message: "must be an e-mail address" },
    ]);
    renderWithProviders(<InviteForm onSubmit={() => {}} error={error} />);
    expect(screen.getByText("must be an e-mail address")).toBeTruthy();
    expect(screen.queryByTestId("invite-error")).toBeNull();
  });

  test("confirms a sent invitation and empties the address", () => {
    // The parent reports the sent invitation after the server accepted it, as the Lab screen does.
    function Harness() {
      const [sentTo, setSentTo] = React.useState<{ email: string; role: "viewer" } | null>(null);
      return <InviteForm onSubmit={(v) => setSentTo({ email: v.email, role: "viewer" })} sentTo={sentTo} />;
    }
    renderWithProviders(<Harness />);
    fireEvent.changeText(screen.getByLabelText("E-mail address"), "tank.tech@example.org");
    fireEvent.press(screen.getByLabelText("Send invitation"));
    expect(screen.getByText(/Invitation sent to tank.tech@example.org as a viewer/)).toBeTruthy();
    expect(screen.getByLabelText("E-mail address").props.value).toBe("");
  });

  test("validateInvite accepts a normal address", () => {
    expect(validateInvite({ email: "owner@example.org", role: "viewer" })).toEqual({});
  });
});
