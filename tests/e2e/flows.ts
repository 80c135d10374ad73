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

/**
 * A sweep of the ring template too large to finish before a test cancels it (3 points of 50,000 replicates over
 * 2,000 min): the body to POST to /api/labs/:labId/sweeps.
 */
export function ringSweepToCancel(ring: { circuit: unknown; inputSignal: string }, name: string, seed: string) {
  return {
    name,
    base: {
      circuit: ring.circuit,
      program: { kind: "ladder", start: 10, durations: [5, 60], repeats: 1, gap: 60 },
      inputSignal: ring.inputSignal,
      settings: { endTimeMinutes: 2000, gridStepMinutes: 1, replicates: 50_000, seed, threshold: { value: 100 } },
    },
    axes: [{ parameter: "rate(makeA)", grid: { from: 20, to: 200, count: 3, scale: "log" } }],
  };
}
