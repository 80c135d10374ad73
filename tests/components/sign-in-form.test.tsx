import React from "react";
import { fireEvent, screen } from "@testing-library/react-native";
import { SignInForm, validateSignIn } from "@/components/forms/sign-in-form";
import { ApiError } from "@/components/data/api";
import { renderWithProviders } from "./render";

describe("SignInForm", () => {
  test("shows inline messages and does not submit when fields are empty or malformed", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<SignInForm onSubmit={onSubmit} />);
    fireEvent.press(screen.getByLabelText("Sign in"));
    expect(screen.getByText("Enter your email address.")).toBeTruthy();
    expect(screen.getByText("Enter your password.")).toBeTruthy();
    fireEvent.changeText(screen.getByLabelText("Email"), "editor-at-example.org");
    fireEvent.press(screen.getByLabelText("Sign in"));
    expect(screen.getByText("That does not look like an email address.")).toBeTruthy();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  test("submits trimmed values when valid", () => {
    const onSubmit = jest.fn();
    renderWithProviders(<SignInForm onSubmit={onSubmit} />);
    fireEvent.changeText(screen.getByLabelText("Email"), "  editor@example.org ");
    fireEvent.changeText(screen.getByLabelText("Password"), "secret-words");
    fireEvent.press(screen.getByLabelText("Sign in"));
    expect(onSubmit).toHaveBeenCalledWith({ email: "editor@example.org", password: "secret-words" });
    expect(screen.queryByText("Enter your password.")).toBeNull();
  });

  test("keeps what was typed and explains a rejected sign-in", () => {
    // The parent passes the server's 401 back after the submit, as the sign-in screen does.
    function Harness() {
      const [error, setError] = React.useState<unknown>(undefined);
      return (
        <SignInForm onSubmit={() => setError(new ApiError(401, "unauthorized", "bad credentials"))} error={error} />
      );
    }
    renderWithProviders(<Harness />);
    fireEvent.changeText(screen.getByLabelText("Email"), "editor@example.org");
    fireEvent.changeText(screen.getByLabelText("Password"), "wrong");
    fireEvent.press(screen.getByLabelText("Sign in"));
    expect(screen.getByText("That email and password do not match an account.")).toBeTruthy();
    expect(screen.getByLabelText("Email").props.value).toBe("editor@example.org");
    expect(screen.getByLabelText("Password").props.value).toBe("wrong");
  });

  test("validateSignIn accepts a normal address", () => {
    expect(validateSignIn({ email: "owner@example.org", password: "x" })).toEqual({});
  });
});
