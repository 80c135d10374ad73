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

/** The signed-in user's first lab and one circuit template (GET /api/labs, /api/templates), for launches through the API. */
export async function firstLabAndTemplate(
  page: Page,
  baseUrl: string,
  key: string,
): Promise<{ labId: string; template: { circuit: unknown; inputSignal: string } }> {
  const labs = (await (await page.request.get(`${baseUrl}/api/labs`)).json()) as { items: { id: string }[] };
  const templates = (await (await page.request.get(`${baseUrl}/api/templates`)).json()) as {
    templates: { key: string; circuit: unknown; inputSignal: string }[];
  };
  const template = templates.templates.find((x) => x.key === key);
  if (!template) throw new Error(`no template "${key}"`);
  return { labId: labs.items[0].id, template };
}
