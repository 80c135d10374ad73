/**
 * Traces in the browser at phone (390x844) and wide (1280x800) sizes, against
 * the real server with demo data: sign in as the demo editor, open the seeded
 * synthetic set (labelled synthetic), upload a broken file through the upload
 * screen (its problems are listed by line and column), then the demo file
 * docs/examples/demo-traces.csv with the options that fit it
 * (DEMO_UPLOAD_OPTIONS), preview, save, see the headline cards and the chart,
 * match against the finished demo run "Tank sensor, hold on Duration ladder"
 * and see the distances and the overlay chart (the panel's sweep choices count
 * points as the sweep screens do, "9 of 9 points" for the demo sweep, and a
 * sweep cancelled at the start, with no finished point to match against, is
 * not offered but named as not listed); delete (at once: the API
 * answers 404 for the set) and undo (the server restores it). axe-core runs
 * on each screen (no serious or critical violation), as do the 44 px
 * touch-target and label checks. Screenshots go to test-results/screenshots/.
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import type { Page } from "playwright-core";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, PHONE, WIDE, type Viewport, assertAccessible } from "./browser";
import { signIn, firstLabAndTemplate, ringSweepToCancel, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";
import { DEMO_TRACES_NAME, DEMO_UPLOAD_OPTIONS } from "@/server/demo/traces";
import { DEMO_SWEEP_NAME } from "@/server/demo/runs";

const ROOT = resolve(__dirname, "..", "..");
const DEMO_FILE = join(ROOT, "docs", "examples", "demo-traces.csv");
const DEMO_RUN = "Tank sensor, hold on Duration ladder";
let server: TestServer;
let tmp: string;
let badFile: string;

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer();
  tmp = mkdtempSync(join(tmpdir(), "linger-traces-e2e-"));
  badFile = join(tmp, "broken-cells.csv");
  // Line 3 has a value that is not a number (column 3); line 5 goes back in time for c1 (column 2).
  writeFileSync(badFile, "cell,time,value,input\nc1,0,100,0\nc1,1,abc,0\nc1,2,104,1\nc1,1,110,1\nc1,3,120,1\n");
});
after(async () => {
  await server?.stop();
  if (tmp) rmSync(tmp, { recursive: true, force: true });
});

/** Picks a file through the screen's button: expo-document-picker opens a hidden <input type=file>; playwright fills it. */
async function pickFile(page: Page, path: string) {
  const [chooser] = await Promise.all([page.waitForEvent("filechooser"), page.getByTestId("upload-pick-file").click()]);
  await chooser.setFiles(path);
}

async function fill(page: Page, testID: string, value: string) {
  await page.getByTestId(testID).fill(value);
}

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`traces at ${vp.name} size (${vp.width}x${vp.height})`, { timeout: 480_000 }, () => {
    test("synthetic set labelled; bad file refused by line and column; demo file previewed, saved, scored and matched", async () => {
      const b = await launchBrowser(vp);
      const page = b.page;
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(e.message));
      const tag = vp.name;
      const s = DEMO_UPLOAD_OPTIONS.settings;
      assert.equal(s.scale?.mode, "entered");
      try {
        await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);

        // A sweep cancelled at once (large enough that no point finishes first), for the match panel's counts.
        const cancelledSweep = `Scan cancelled ${tag}`;
        const { labId, template: ring } = await firstLabAndTemplate(page, server.url, "ring");
        const launched = await page.request.post(`${server.url}/api/labs/${labId}/sweeps`, {
          timeout: 120_000,
          data: ringSweepToCancel(ring, cancelledSweep, `cancel-${tag}`),
        });
        assert.equal(launched.status(), 201, await launched.text());
        const sweepId = ((await launched.json()) as { id: string }).id;
        const cancelled = await page.request.post(`${server.url}/api/sweeps/${sweepId}/cancel`, { timeout: 60_000 });
        assert.equal(cancelled.status(), 200, await cancelled.text());
        assert.equal(((await cancelled.json()) as { status: string }).status, "cancelled");

        // The navigation leads to the list; the seeded set is marked synthetic.
        if (vp.width < 768) {
          await page.getByTestId("nav-more").click();
          await page.getByRole("link", { name: "Traces" }).first().click();
        } else {
          await page.getByTestId("nav-traces").click();
        }
        await page.waitForURL(/\/traces$/);
        await page.getByTestId("traces-screen").getByText(DEMO_TRACES_NAME).first().waitFor();
        assert.ok(
          (await page.locator('[data-testid^="synthetic-badge-"]').count()) >= 1,
          "the demo set carries the synthetic badge",
        );
        await assertAccessible(page, "traces list");
        await screenshot(page, `traces-${tag}-01-list`);

        await page
          .getByRole("link", {
            name: new RegExp(`^${DEMO_TRACES_NAME.replace(/[()]/g, "\\$&")}.*Synthetic, not measured`),
          })
          .click();
        await page.getByTestId("synthetic-note").waitFor();
        await page.getByTestId("headline-cards").waitFor();
        await page.getByTestId("chart-cells-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.waitForTimeout(300);
        await assertAccessible(page, "synthetic set detail");
        await screenshot(page, `traces-${tag}-02-demo-set`);

        // Upload screen: a broken file first.
        await page.goto(server.url + "/traces");
        await page.getByTestId("traces-upload").click();
        await page.waitForURL(/\/traces\/upload$/);
        await page.getByTestId("upload-layout-long").click();
        await fill(page, "upload-threshold", String(s.thresholdMolecules));
        await pickFile(page, badFile);
        await page
          .getByTestId("upload-file-name")
          .getByText(/broken-cells\.csv/)
          .waitFor();
        await page.getByTestId("upload-preview").click();
        const problems = page.getByTestId("upload-problems");
        await problems.waitFor();
        const text = await problems.innerText();
        assert.match(text, /Line 3, column 3/, text);
        assert.match(text, /Line 5, column 2/, text);
        // The form keeps what was typed.
        assert.equal(await page.getByTestId("upload-threshold").inputValue(), String(s.thresholdMolecules));
        await assertAccessible(page, "upload with problems");
        await screenshot(page, `traces-${tag}-03-upload-problems`);

        // The demo file with the options that fit it.
        const name = `Tank cells upload ${tag}`;
        await pickFile(page, DEMO_FILE);
        await page
          .getByTestId("upload-file-name")
          .getByText(/demo-traces\.csv/)
          .waitFor();
        await fill(page, "upload-name", name);
        assert.equal(DEMO_UPLOAD_OPTIONS.schedule.source, "column");
        await fill(
          page,
          "upload-schedule-column",
          DEMO_UPLOAD_OPTIONS.schedule.source === "column" ? DEMO_UPLOAD_OPTIONS.schedule.column : "input",
        );
        await page.getByTestId("upload-background-preInput").click();
        await page.getByTestId("upload-scale-entered").click();
        await fill(page, "upload-scale-value", String(s.scale?.mode === "entered" ? s.scale.unitsPerMolecule : 1));
        if (s.smoothing?.mode === "movingAverage") {
          await page.getByTestId("upload-smoothing-movingAverage").click();
          await fill(page, "upload-smoothing-width", String(s.smoothing.widthFrames));
        }
        await fill(page, "upload-window", String(s.windowMinutes));
        await fill(page, "upload-hysteresis", String(s.hysteresis));
        await page.getByTestId("upload-preview").click();
        await page.getByTestId("upload-preview-result").waitFor({ timeout: 60_000 });
        assert.equal(
          await page.getByTestId("upload-problems").count(),
          0,
          "the problem list is gone after a good preview",
        );
        assert.match(await page.getByTestId("preview-cells").innerText(), /\b40\b/);
        await page.getByTestId("chart-preview-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.waitForTimeout(300);
        await assertAccessible(page, "upload preview");
        await screenshot(page, `traces-${tag}-04-preview`);

        await page.getByTestId("upload-save").click();
        await page.waitForURL(/\/traces\/(?!upload)[^/]+$/, { timeout: 60_000 });
        await page.getByTestId("trace-detail-screen").getByText(name).first().waitFor();
        assert.equal(await page.getByTestId("synthetic-note").count(), 0, "an upload is not marked synthetic");
        await page.getByTestId("headline-cards").waitFor();
        assert.doesNotMatch(await page.getByTestId("card-d50").innerText(), /^\s*$/);
        await page.getByTestId("card-median-delay").waitFor();
        await page.getByTestId("cell-table").waitFor();
        await page.getByTestId("safety-note").first().waitFor();
        await page.getByTestId("chart-cells-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.waitForTimeout(300);
        await assertAccessible(page, "uploaded set detail");
        await screenshot(page, `traces-${tag}-05-detail`);

        // The sweep choices count points as the sweep screens do; a sweep with no finished point (the one
        // cancelled at once) is not offered, since the server refuses it (409), but named as not listed.
        const panel = page.getByTestId("match-panel");
        await panel.getByRole("radio", { name: "A sweep", exact: true }).click();
        const demoSweep = panel.getByRole("radio", { name: `${DEMO_SWEEP_NAME} (9 of 9 points)`, exact: true });
        await demoSweep.waitFor({ timeout: 360_000 });
        const unmatchable = panel.getByTestId("match-sweeps-unmatchable");
        await unmatchable.getByText(cancelledSweep, { exact: false }).waitFor();
        assert.match(await unmatchable.innerText(), /no finished point to match against/);
        assert.equal(
          await panel.getByRole("radio", { name: new RegExp(`^${cancelledSweep} `) }).count(),
          0,
          "the cancelled sweep is not among the choices",
        );
        assert.doesNotMatch(await panel.getByTestId("match-sweep").innerText(), new RegExp(cancelledSweep));
        assert.doesNotMatch(await panel.getByTestId("match-sweep").innerText(), /points done/);
        // The demo sweep, with finished points, can still be chosen.
        await demoSweep.click();
        assert.equal(await demoSweep.getAttribute("aria-checked"), "true");
        await assertAccessible(page, "match panel sweep choices");
        await panel.getByRole("radio", { name: "A finished run", exact: true }).click();

        // Match against the finished demo run (the run list refreshes while runs are active).
        const runChoice = page.getByTestId("match-panel").getByRole("radio", { name: DEMO_RUN, exact: true });
        await runChoice.waitFor({ timeout: 360_000 });
        await runChoice.click();
        await page.getByTestId("match-run-button").click();
        await page.getByTestId("match-result").waitFor({ timeout: 60_000 });
        const distances = await page.getByTestId("match-distances").innerText();
        assert.match(distances, /Kolmogorov/, distances);
        assert.match(distances, /Wasserstein/, distances);
        await page.getByTestId("chart-match-delays-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.waitForTimeout(300);
        await assertAccessible(page, "match result");
        await screenshot(page, `traces-${tag}-06-match`, 6);

        // Delete: the server deletes at once (the set answers 404); Undo restores it on the server.
        const setId = new URL(page.url()).pathname.split("/").pop()!;
        await page.getByTestId("delete-trace-set").click();
        await page.getByTestId("trace-deleted").waitFor();
        const notice = await page.getByTestId("trace-deleted").boundingBox();
        assert.ok(
          notice && notice.y >= 0 && notice.y + notice.height <= vp.height,
          `the notice with Undo is in view where Delete was pressed (${JSON.stringify(notice)})`,
        );
        assert.equal(
          (await page.request.get(`${server.url}/api/traces/${setId}`)).status(),
          404,
          "deleted on the server at once",
        );
        await assertAccessible(page, "deleted set with undo");
        await screenshot(page, `traces-${tag}-07-deleted`);
        await page.getByTestId("undo-delete").click();
        await page.getByTestId("trace-deleted").waitFor({ state: "detached" });
        assert.equal(
          (await page.request.get(`${server.url}/api/traces/${setId}`)).status(),
          200,
          "restored on the server",
        );
        await page.reload();
        await page.getByTestId("trace-detail-screen").getByText(name).first().waitFor();
        await page.getByTestId("match-panel").waitFor();

        assert.deepEqual(errors, [], "no uncaught page errors");
      } catch (e) {
        await screenshot(page, `traces-${tag}-failure`).catch(() => {});
        throw e;
      } finally {
        await b.close();
      }
    });
  });
}
