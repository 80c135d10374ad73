/** Small steps shared by the browser tests. */
import type { Page } from "playwright-core";

export const DEMO_EDITOR = "editor@example.org";

export async function signIn(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(baseUrl + "/sign-in");
  await page.getByLabel("Email", { exact: true }).fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByTestId("home-screen").waitFor();
}
