import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { ChangePasswordForm, validateChangePassword } from "@/components/account/change-password-form";
import { ApiError } from "@/components/data/api";
import { renderWithProviders } from "./render";

function fill(current: string, next: string, again: string) {
  fireEvent.changeText(screen.getByLabelText("Current password"), current);
  fireEvent.changeText(screen.getByLabelText("New password"), next);
  fireEvent.changeText(screen.getByLabelText("New password again"), again);
  fireEvent.press(screen.getByLabelText("Change password"));
}

describe("ChangePasswordForm validation", () => {
  test("empty form: asks for the current password and a long enough new one", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<ChangePasswordForm onSubmit={onSubmit} />);
    fireEvent.press(screen.getByLabelText("Change password"));
    expect(screen.getByText("Enter your current password.")).toBeTruthy();
    // 8 characters: the server's PASSWORD_MIN_LENGTH (server/services/auth.service.ts).
    expect(screen.getByText("Use at least 8 characters.")).toBeTruthy();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  test("a new password equal to the current one, or typed differently twice, is refused", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<ChangePasswordForm onSubmit={onSubmit} />);
    fill("tank-sensor-1", "tank-sensor-1", "tank-sensor-1");
    expect(screen.getByText("Choose a password different from the current one.")).toBeTruthy();
    fill("tank-sensor-1", "tank-sensor-2", "tank-sensor-3");
    expect(screen.getByText("The two new passwords differ.")).toBeTruthy();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  test("7 characters is too short, 8 is enough; a valid form submits both passwords", () => {
    expect(
      validateChangePassword({ currentPassword: "old-one", newPassword: "1234567", repeatPassword: "1234567" })
        .newPassword,
    ).toBe("Use at least 8 characters.");
    expect(
      validateChangePassword({ currentPassword: "old-one", newPassword: "12345678", repeatPassword: "12345678" }),
    ).toEqual({});
    const onSubmit = jest.fn();
    renderWithProviders(<ChangePasswordForm onSubmit={onSubmit} />);
    fill("old-password", "a-new-password", "a-new-password");
    expect(onSubmit).toHaveBeenCalledWith({ currentPassword: "old-password", newPassword: "a-new-password" });
  });

  test("a wrong current password shows under that field and keeps what was typed", () => {
    function Harness() {
      const [error, setError] = React.useState<unknown>(undefined);
      return (
        <ChangePasswordForm
          error={error}
          onSubmit={() =>
            setError(
              new ApiError(400, "wrong_password", "The current password is not right.", [
                { path: "currentPassword", message: "Not right." },
              ]),
            )
          }
        />
      );
    }
    renderWithProviders(<Harness />);
    fill("not-my-password", "a-new-password", "a-new-password");
    expect(screen.getByText("That is not your current password.")).toBeTruthy();
    expect(screen.queryByTestId("change-password-error")).toBeNull();
    expect(screen.getByLabelText("Current password").props.value).toBe("not-my-password");
    expect(screen.getByLabelText("New password").props.value).toBe("a-new-password");
  });

  test("after the server accepts, the fields empty and a confirmation shows", () => {
    function Harness() {
      const [done, setDone] = React.useState(false);
      return <ChangePasswordForm onSubmit={() => setDone(true)} done={done} />;
    }
    renderWithProviders(<Harness />);
    fill("old-password", "a-new-password", "a-new-password");
    expect(screen.getByTestId("change-password-done")).toBeTruthy();
    expect(screen.getByLabelText("Current password").props.value).toBe("");
  });
});
