/**
 * The main path at phone (390x844) and wide (1280x800) sizes, against the real
 * server with demo data: sign in as the demo editor, create a circuit from the
 * C1-FFL AND template, create a duration-ladder program, launch a small run,
 * wait for it to finish, see the filter-curve chart and the headline cards,
 * then compare with the demo control run (simple regulation on the same
 * ladder). axe-core runs on each screen; no serious or critical violation is
 * allowed, nor a touch target under 44 px, nor an unlabelled control.
 * Screenshots go to test-results/screenshots/.
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, PHONE, WIDE, type Viewport, assertAccessible } from "./browser";
import { signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";

const DEMO_CONTROL_RUN = "Tank sensor, direct on Duration ladder";
let server: TestServer;

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer();
});
after(async () => {
  await server?.stop();
});

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`main path at ${vp.name} size (${vp.width}x${vp.height})`, { timeout: 420_000 }, () => {
    test("template circuit, ladder program, run, results, comparison with the control", async () => {
      const b = await launchBrowser(vp);
      const page = b.page;
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(e.message));
      const tag = `${vp.name}`;
      try {
        await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
        await page.getByText("Tank Sensor Group").first().waitFor();
        await assertAccessible(page, "home");
        await screenshot(page, `main-${tag}-01-home`);

        // Circuit from the C1-FFL AND template.
        await page.goto(server.url + "/circuits/new");
        await page.getByTestId("template-c1ffl-and").click();
        const circuitName = `Hold sensor ${tag}`;
        await page.getByTestId("new-circuit-name").fill(circuitName);
        await assertAccessible(page, "new circuit");
        await screenshot(page, `main-${tag}-02-template`);
        await page.getByTestId("create-from-template").click();
        await page.waitForURL(/\/circuits\/[^/]+$/);
        await page.getByTestId("feed-forward-badge").waitFor();
        assert.match(await page.getByTestId("feed-forward-badge").innerText(), /coherent type 1/i);
        await assertAccessible(page, "circuit detail");
        await screenshot(page, `main-${tag}-03-circuit`);
        const circuitUrl = page.url();

        // Duration-ladder program (the form's default kind).
        await page.goto(server.url + "/programs/new");
        const programName = `Ladder ${tag}`;
        await page.getByTestId("program-name").fill(programName);
        await page.getByTestId("program-durations").fill("2, 5, 10, 20, 40");
        await page.getByTestId("program-preview-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await assertAccessible(page, "new program");
        await screenshot(page, `main-${tag}-04-program`);
        await page.getByTestId("program-save").click();
        await page.waitForURL(/\/programs\/[^/]+$/);

        // New run from the circuit, small and quick.
        await page.goto(circuitUrl);
        await page.getByRole("link", { name: "Start a study" }).first().click();
        await page.waitForURL(/\/runs\/new/);
        await page.getByRole("radio", { name: programName }).click();
        await page.getByTestId("run-replicates").fill("40");
        await page
          .getByTestId("run-estimate")
          .getByText(/of compute/)
          .waitFor({ timeout: 30_000 });
        assert.ok((await page.getByTestId("run-seed").inputValue()).length > 0, "a seed is shown");
        await assertAccessible(page, "new run");
        await screenshot(page, `main-${tag}-05-new-run`);
        await page.getByTestId("launch-run").click();
        await page.waitForURL(/\/runs\/(?!new)[^/]+$/);

        // Wait for the run (the demo runs may be ahead of it in the queue).
        await page.getByTestId("run-status").getByText("Finished", { exact: true }).waitFor({ timeout: 300_000 });
        await page.getByTestId("headline-cards").waitFor();
        await page.getByTestId("card-d50").waitFor();
        await page.getByTestId("chart-filter-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.getByTestId("safety-note").first().waitFor();
        await page.getByTestId("replicate-table").waitFor();
        await page.waitForTimeout(500);
        await assertAccessible(page, "run detail");
        await screenshot(page, `main-${tag}-06-run`);

        // Comparison with the demo control run.
        await page.getByTestId("compare-run").click();
        await page.waitForURL(/\/compare/);
        await page.getByRole("checkbox", { name: new RegExp(`^${DEMO_CONTROL_RUN}`) }).click({ timeout: 300_000 });
        await page.getByTestId("comparison-tests").waitFor({ timeout: 60_000 });
        await page.getByTestId("chart-compare-filter-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.waitForTimeout(500);
        await assertAccessible(page, "compare");
        await screenshot(page, `main-${tag}-07-compare`);
        assert.deepEqual(errors, [], "no uncaught page errors");
      } catch (e) {
        await screenshot(page, `main-${tag}-failure`).catch(() => {});
        throw e;
      } finally {
        await b.close();
      }
    });
  });
}
