/**
 * Sweeps in the browser at phone (390x844) and wide (1280x800) sizes, against
 * the real server with demo data: sign in as the demo editor, open Sweeps
 * (under More on a phone), wait for the seeded demo sweep "Hold strength scan
 * (demo)" (9 values of K(makeZ,hldB), 40 to 400 on a log grid) to finish, open
 * it, see the chart of a figure over the swept parameter (drawn by the lazy
 * chart engine), switch the figure, open one point's run (its title names the
 * point and its headline cards show), then launch a small sweep (one
 * parameter, 3 values, 40 replicates) from the launch screen, see it reach
 * "Finished", delete it and undo the delete. axe-core runs on each sweep screen (no serious or critical
 * violation), as do the 44 px touch-target and label checks. Screenshots go to
 * test-results/screenshots/ (sweeps-*).
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import type { Page } from "playwright-core";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, PHONE, WIDE, type Viewport, assertAccessible } from "./browser";
import { firstLabAndTemplate, ringSweepToCancel, signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";
import { DEMO_SWEEP_NAME } from "@/server/demo/runs";

const DEMO_PARAMETER = "K(makeZ,hldB)";
const DEMO_CIRCUIT = "Tank sensor, hold";
const DEMO_PROGRAM = "Duration ladder";
let server: TestServer;

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer();
});
after(async () => {
  await server?.stop();
});

/** The accessible name of the sweep chart (title, then the "x: y" pairs it describes). */
async function chartLabel(page: Page): Promise<string> {
  return (await page.getByTestId("sweep-chart-canvas").getAttribute("aria-label")) ?? "";
}

/** The "x: y" pairs of a chart's accessible name ("Title. x: y; x: y ..."), as the screen formats them. */
function describedPairs(label: string): { x: string; y: string }[] {
  const body = label.slice(label.indexOf(". ") + 2);
  return body.split(";").map((s) => {
    const i = s.indexOf(":");
    const x = (i < 0 ? s : s.slice(0, i)).trim();
    const y = i < 0 ? "" : s.slice(i + 1).trim();
    // x is "<parameter> <value>": the value is the last word
    return { x: (x.split(" ").pop() ?? "").replace(/,/g, ""), y: y.replace(/,/g, "") };
  });
}

const SUPERSCRIPT_DIGITS: Record<string, string> = {
  "⁻": "-",
  "⁰": "0",
  "¹": "1",
  "²": "2",
  "³": "3",
  "⁴": "4",
  "⁵": "5",
  "⁶": "6",
  "⁷": "7",
  "⁸": "8",
  "⁹": "9",
};

/** A probability as the app writes it ("1.5%", "0%", "4.8 × 10⁻⁴"), as a number; NaN for anything else. */
function probabilityOf(text: string): number {
  if (/^[\d.]+%$/.test(text)) return Number(text.slice(0, -1)) / 100;
  const sci = /^([\d.]+) × 10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)$/.exec(text);
  if (sci) return Number(sci[1]) * 10 ** Number([...sci[2]].map((c) => SUPERSCRIPT_DIGITS[c]).join(""));
  return NaN;
}

/** Waits until the chart canvas is drawn (the engine loads lazily on first use). */
async function waitForChart(page: Page) {
  await page.getByTestId("sweep-chart-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
}

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`sweeps at ${vp.name} size (${vp.width}x${vp.height})`, { timeout: 240_000 }, () => {
    test("demo sweep finished, chart over the parameter, figure switched, point opened; a small sweep launched and finished", async () => {
      const b = await launchBrowser(vp);
      const page = b.page;
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(e.message));
      const tag = vp.name;
      try {
        await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);

        // The navigation leads to the list (under More on a phone).
        if (vp.width < 768) {
          await page.getByTestId("nav-more").click();
          await page.getByRole("link", { name: "Sweeps" }).first().click();
        } else {
          await page.getByTestId("nav-sweeps").click();
        }
        await page.waitForURL(/\/sweeps$/);
        const demoCard = page.getByRole("link").filter({ hasText: DEMO_SWEEP_NAME });
        await demoCard.waitFor();
        // The list polls while a sweep is active; wait for all nine points (the demo runs may be ahead in the queue).
        await demoCard.getByText("9 of 9 points").waitFor({ timeout: 180_000 });
        await demoCard.getByText("Finished", { exact: true }).waitFor({ timeout: 10_000 });
        assert.match(
          await demoCard.innerText(),
          new RegExp(DEMO_PARAMETER.replace(/[()]/g, "\\$&")),
          "the card names the swept parameter",
        );
        await assertAccessible(page, "sweeps list");
        await screenshot(page, `sweeps-${tag}-01-list`);

        // The demo sweep: status, chart of d50 over the parameter, figure switch.
        await demoCard.click();
        await page.waitForURL(/\/sweeps\/(?!new)[^/]+$/);
        const sweepUrl = page.url();
        await page.getByText("9 of 9 points · 200 replicates each").waitFor();
        await page.getByTestId("safety-note").first().waitFor();
        await waitForChart(page);
        const d50Label = await chartLabel(page);
        assert.ok(d50Label.startsWith(`d50 (min) over ${DEMO_PARAMETER}.`), d50Label);
        // The description reads every point of the grid in order, 40 to 400 ("no value (reason)" where a point has no d50).
        const d50Pairs = describedPairs(d50Label);
        assert.equal(d50Pairs.length, 9, d50Label);
        assert.equal(d50Pairs[0].x, "40");
        assert.equal(d50Pairs[8].x, "400");
        assert.ok(d50Pairs.filter((p) => / min$/.test(p.y)).length >= 2, `at least two points with a d50: ${d50Label}`);
        // a point without a d50 says why in words, never a number
        assert.ok(
          d50Pairs.every((p) => / min$/.test(p.y) || p.y.startsWith("no value (")),
          d50Label,
        );
        assert.equal(await page.getByRole("radio", { name: "d50 (min)" }).getAttribute("aria-checked"), "true");
        await page.waitForTimeout(500);
        await assertAccessible(page, "demo sweep detail");
        await screenshot(page, `sweeps-${tag}-02-demo-d50`);

        await page.getByRole("radio", { name: "False-pass rate" }).click();
        await page.waitForFunction(
          (want) =>
            document.querySelector('[data-testid="sweep-chart-canvas"]')?.getAttribute("aria-label")?.startsWith(want),
          `False-pass rate over ${DEMO_PARAMETER}.`,
        );
        assert.equal(await page.getByRole("radio", { name: "False-pass rate" }).getAttribute("aria-checked"), "true");
        await waitForChart(page);
        const fpPairs = describedPairs(await chartLabel(page));
        assert.equal(fpPairs.length, 9);
        assert.ok(
          fpPairs.every((p) => probabilityOf(p.y) >= 0 && probabilityOf(p.y) <= 1),
          `a false-pass rate in [0, 1] at each point: ${JSON.stringify(fpPairs)}`,
        );
        await page.waitForTimeout(500);
        await screenshot(page, `sweeps-${tag}-03-demo-false-pass`);

        // Open the point at the top of the grid (K = 400): its run detail with headline cards.
        const pointRow = page.getByRole("link").filter({ hasText: `${DEMO_PARAMETER} = 400` });
        assert.match(await pointRow.innerText(), /False-pass rate: /, "the row shows the chosen figure");
        assert.match(
          (await pointRow.getAttribute("href")) ?? "",
          /^\/runs\/[^/]+$/,
          "the point row is a real link to its run",
        );
        await pointRow.click();
        await page.waitForURL(/\/runs\/[^/]+$/);
        await page.getByText(`${DEMO_SWEEP_NAME} · ${DEMO_PARAMETER}=400`, { exact: true }).first().waitFor();
        await page.getByTestId("run-status").getByText("Finished", { exact: true }).waitFor();
        await page.getByTestId("headline-cards").waitFor();
        await page.getByTestId("card-d50").waitFor();
        await screenshot(page, `sweeps-${tag}-04-point-run`);

        // Launch a small sweep from the launch screen.
        await page.goto(sweepUrl.replace(/\/sweeps\/[^/]+$/, "/sweeps"));
        await page.getByRole("link", { name: "New sweep" }).first().click();
        await page.waitForURL(/\/sweeps\/new$/);
        const newName = `Hold scan ${tag}`;
        await page.getByLabel("Sweep name", { exact: true }).fill(newName);
        await page
          .getByRole("radiogroup", { name: "Circuit" })
          .getByRole("radio", { name: DEMO_CIRCUIT, exact: true })
          .click();
        await page
          .getByRole("radiogroup", { name: "Input program" })
          .getByRole("radio", { name: DEMO_PROGRAM, exact: true })
          .click();
        const paramGroup = page.getByRole("radiogroup", { name: "Parameter" });
        await paramGroup.waitFor();
        await paramGroup.getByRole("radio", { name: /^makeZ: half-max K of hldB \(now / }).click();
        await page.getByLabel("From", { exact: true }).fill("50");
        await page.getByLabel("To", { exact: true }).fill("200");
        await page.getByLabel("Number of values", { exact: true }).fill("3");
        await page.getByLabel("Replicates per value", { exact: true }).fill("40");
        await page.waitForTimeout(300);
        // Long parameter labels wrap inside the option row rather than running past it (phone width).
        const overflowing = await page.evaluate(() =>
          Array.from(document.querySelectorAll('[role="radio"]'))
            .filter((el) => {
              const group = el.closest('[role="radiogroup"]');
              return group && el.getBoundingClientRect().right > group.getBoundingClientRect().right + 0.5;
            })
            .map((el) => el.getAttribute("aria-label")),
        );
        assert.deepEqual(overflowing, [], "options wider than their group");
        await assertAccessible(page, "new sweep");
        await screenshot(page, `sweeps-${tag}-05-new`);
        await page.getByRole("button", { name: "Launch sweep" }).click();
        await page.waitForURL(/\/sweeps\/(?!new)[^/]+$/);
        await page.getByText(newName, { exact: true }).first().waitFor();
        await page.getByText(/of 3 points · 40 replicates each/).waitFor();
        await page.getByText("3 of 3 points · 40 replicates each").waitFor({ timeout: 120_000 });
        await page.getByText("Finished", { exact: true }).first().waitFor({ timeout: 10_000 });
        // With the default threshold a figure may be missing at every point: the screen then says so instead of a blank.
        const sweepId = new URL(page.url()).pathname.split("/").pop()!;
        const detail = (await (await page.request.get(`${server.url}/api/sweeps/${sweepId}`)).json()) as {
          points: { runId: string; figures: { d50: number | null } | null }[];
        };
        assert.equal(detail.points.length, 3);
        if (detail.points.every((p) => p.figures?.d50 === null)) {
          await page
            .getByTestId("sweep-chart-empty")
            .getByText(/No point has a d50 \(min\) value\./)
            .waitFor();
          await screenshot(page, `sweeps-${tag}-06-new-no-d50`, 1);
        } else await waitForChart(page);
        await page.getByRole("radio", { name: "Median peak" }).click();
        await waitForChart(page);
        const peakPairs = describedPairs(await chartLabel(page));
        assert.deepEqual(
          peakPairs.map((p) => p.x),
          ["50", "100", "200"],
          "3 values from 50 to 200 on a log grid",
        );
        assert.ok(
          peakPairs.every((p) => / molecules$/.test(p.y) && Number(p.y.replace(/ molecules$/, "")) > 0),
          `a median peak at each point: ${JSON.stringify(peakPairs)}`,
        );
        assert.equal(
          await page
            .getByRole("link")
            .filter({ hasText: `${DEMO_PARAMETER} = ` })
            .count(),
          3,
          "one row per value",
        );
        await page.waitForTimeout(500);
        await assertAccessible(page, "new sweep detail");
        await screenshot(page, `sweeps-${tag}-07-new-finished`);
        // delete with undo: the sweep and its point runs answer 404 until Undo brings them back
        const pointRun = detail.points[0].runId;
        await page.getByTestId("delete-sweep").click();
        await page.getByTestId("sweep-deleted").waitFor();
        assert.equal((await page.request.get(`${server.url}/api/sweeps/${sweepId}`)).status(), 404);
        assert.equal((await page.request.get(`${server.url}/api/runs/${pointRun}`)).status(), 404);
        await page.getByTestId("undo-delete").click();
        await page.getByTestId("delete-sweep").waitFor();
        assert.equal((await page.request.get(`${server.url}/api/runs/${pointRun}`)).status(), 200);
        assert.deepEqual(errors, [], "no uncaught page errors");
      } catch (e) {
        await screenshot(page, `sweeps-${tag}-failure`).catch(() => {});
        throw e;
      } finally {
        await b.close();
      }
    });
  });
}

describe(`cancel and resume a sweep at ${PHONE.name} size`, { timeout: 300_000 }, () => {
  test("Cancel asks first and says what is kept; a cancelled sweep offers Resume, which queues its points again", async () => {
    const b = await launchBrowser(PHONE);
    const page = b.page;
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    const api = (p: string) => `${server.url}/api${p}`;
    let sweepId: string | null = null;
    try {
      await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
      const { labId, template: ring } = await firstLabAndTemplate(page, server.url, "ring");
      // Large enough to be still computing when the page asks to cancel it (the test cancels it at the end).
      const launched = await page.request.post(api(`/labs/${labId}/sweeps`), {
        timeout: 120_000,
        data: ringSweepToCancel(ring, "Ring scan to cancel", "cancel-me"),
      });
      assert.equal(launched.status(), 201, await launched.text());
      sweepId = ((await launched.json()) as { id: string }).id;
      const status = async () =>
        ((await (await page.request.get(api(`/sweeps/${sweepId}`))).json()) as { status: string }).status;

      await page.goto(`${server.url}/sweeps/${sweepId}`);
      await page.getByText("Ring scan to cancel", { exact: true }).first().waitFor();
      // one tap does not cancel: the question says what is kept and what Resume does
      await page.getByTestId("cancel-sweep").click();
      const question = page.getByRole("group", { name: /^Cancel Ring scan to cancel\?/ });
      await question.waitFor();
      assert.match(
        (await question.getAttribute("aria-label")) ?? "",
        /finished points and the replicates stored so far are kept; Resume sweep goes on with the other \d+ later\./,
      );
      assert.ok(["queued", "running"].includes(await status()), "still computing while the question is asked");
      // the question wraps within the phone's width instead of running past it
      const box = (await question.getByText(/^Cancel Ring scan to cancel\?/).boundingBox())!;
      assert.ok(box.x + box.width <= PHONE.width, `question ends at ${box.x + box.width} px of ${PHONE.width}`);
      await assertAccessible(page, "sweep cancel question");
      await screenshot(page, "sweeps-phone-08-cancel-question");
      await page.getByTestId("cancel-sweep-confirm").click();
      await page.getByTestId("resume-sweep").waitFor({ timeout: 60_000 });
      assert.equal(await status(), "cancelled");
      await page.getByText("Cancelled", { exact: true }).first().waitFor();
      // cancelled points are not counted as done
      await page.getByText(/^0 of 3 points finished, 3 cancelled or failed · 50,000 replicates each$/).waitFor();
      assert.equal(
        await page.getByRole("progressbar", { name: "Progress of Ring scan to cancel" }).getAttribute("aria-valuenow"),
        "0",
        "no point finished: the bar is empty, not full",
      );
      await assertAccessible(page, "cancelled sweep");
      await screenshot(page, "sweeps-phone-09-cancelled");
      // the sweep list counts the same way, and its bar is not full either
      await page.goto(`${server.url}/sweeps`);
      const card = page.locator(`a[href="/sweeps/${sweepId}"]`);
      await card.getByText(/^0 of 3 points finished, 3 cancelled or failed$/).waitFor();
      assert.equal(
        await card.getByRole("progressbar", { name: "Progress of Ring scan to cancel" }).getAttribute("aria-valuenow"),
        "0",
        "no point finished: the list's bar is empty, not full",
      );
      await assertAccessible(page, "sweep list with a cancelled sweep");
      await screenshot(page, "sweeps-phone-10-cancelled-list");
      await card.click();
      // Resume queues the unfinished points again and the screen offers Cancel once more
      await page.getByTestId("resume-sweep").click();
      await page.getByTestId("cancel-sweep").waitFor({ timeout: 60_000 });
      assert.ok(["queued", "running"].includes(await status()), "resumed");
      assert.deepEqual(errors, [], "no uncaught page errors");
    } catch (e) {
      await screenshot(page, "sweeps-phone-cancel-failure").catch(() => {});
      throw e;
    } finally {
      if (sweepId) await page.request.post(api(`/sweeps/${sweepId}/cancel`)).catch(() => {});
      await b.close();
    }
  });
});
