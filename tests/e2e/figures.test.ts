/**
 * Figures in the browser, against the real server with demo data (wide size):
 * the run page's settings block and method label; a definition link that
 * opens its entry on /definitions; a chart saved as SVG and as PNG (download
 * events; the SVG carries title, axis labels, legend and the run's name and
 * seed; the PNG is a real PNG at twice the SVG's size); and the compare page's
 * warning when the runs were not measured the same way (a demo run, 500
 * replicates, against a point of the demo sweep, 200 replicates).
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, WIDE, PHONE, SCREENSHOT_DIR, assertAccessible } from "./browser";
import { join } from "node:path";
import { signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";
import { DEMO_SWEEP_NAME } from "@/server/demo/runs";
import type { Page } from "playwright-core";

const DEMO_RUN = "Tank sensor, hold on Duration ladder";
let server: TestServer;

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer();
});
after(async () => {
  await server?.stop();
});

/** GET from the API with the page's session cookie. */
async function apiGet<T>(page: Page, path: string): Promise<T> {
  const r = await page.request.get(server.url + path);
  assert.equal(r.status(), 200, `${path}: ${r.status()}`);
  return (await r.json()) as T;
}

type RunItem = { id: string; name: string; status: string; seed?: string };

/** Every item of a paged list ({ items, nextCursor }; a plain array is accepted too). */
async function listAll<T>(page: Page, path: string): Promise<T[]> {
  const out: T[] = [];
  let cursor: string | null = null;
  for (let i = 0; i < 50; i++) {
    const body: T[] | { items: T[]; nextCursor: string | null } = await apiGet(
      page,
      path + (cursor ? `?cursor=${encodeURIComponent(cursor)}` : ""),
    );
    if (Array.isArray(body)) return body;
    out.push(...body.items);
    cursor = body.nextCursor;
    if (!cursor) break;
  }
  return out;
}

/** Waits (polling the API) until the named demo run has finished. */
async function finishedRun(page: Page, labId: string, name: string): Promise<RunItem> {
  for (let i = 0; i < 240; i++) {
    const runs = await listAll<RunItem>(page, `/api/labs/${labId}/runs`);
    const r = runs.find((x) => x.name === name);
    if (r && (r.status === "finished" || r.status === "capped")) return r;
    await page.waitForTimeout(1000);
  }
  throw new Error(`${name} did not finish`);
}

describe("figures: settings, definitions, chart images, compare warnings", { timeout: 420_000 }, () => {
  test("wide size", async () => {
    const b = await launchBrowser(WIDE);
    const page = b.page;
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    try {
      await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
      const me = await apiGet<{ labs: { id: string; name: string }[] }>(page, "/api/me");
      const labId = me.labs.find((l) => l.name === "Tank Sensor Group")!.id;
      const run = await finishedRun(page, labId, DEMO_RUN);

      // Settings block and method label on the run page.
      await page.goto(`${server.url}/runs/${run.id}`);
      const settings = page.getByTestId("run-settings");
      await settings.waitFor({ timeout: 60_000 });
      assert.match(await page.getByTestId("run-method").innerText(), /^Exact: direct method/);
      const text = await settings.innerText();
      for (const want of [
        /Threshold/,
        /molecules up/,
        /Hysteresis band/,
        /20%/,
        /Response window/,
        /30 min/,
        /End time/,
        /1,100 min/,
        /Grid step/,
        /Seed/,
        /tank-demo-2026/,
        /Replicates/,
        /500/,
      ])
        assert.match(text, want);

      // A chart saved as SVG and as PNG.
      await page.getByTestId("chart-filter-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
      await assertAccessible(page, "run with settings");
      await screenshot(page, "figures-wide-01-run");
      const [svgDownload] = await Promise.all([
        page.waitForEvent("download"),
        page.getByTestId("chart-filter-save-svg").click(),
      ]);
      assert.match(svgDownload.suggestedFilename(), /^filter-curve_tank-sensor-hold-on-duration-ladder\.svg$/);
      const svg = readFileSync(await svgDownload.path(), "utf8");
      assert.match(svg, /^<\?xml/);
      assert.match(svg, /<svg xmlns="http:\/\/www.w3.org\/2000\/svg" width="(\d+)" height="([\d.]+)"/);
      for (const want of [
        "Filter curve",
        "Input pulse duration (min, log scale)",
        "Pass probability",
        "Wilson 95% interval",
        DEMO_RUN.replace(",", ","),
        "seed tank-demo-2026",
      ])
        assert.ok(svg.includes(want), `the SVG holds "${want}"`);
      const svgWidth = Number(svg.match(/<svg[^>]* width="(\d+)"/)![1]);
      const [pngDownload] = await Promise.all([
        page.waitForEvent("download"),
        page.getByTestId("chart-filter-save-png").click(),
      ]);
      assert.match(pngDownload.suggestedFilename(), /\.png$/);
      const png = readFileSync(await pngDownload.path());
      assert.deepEqual([...png.subarray(0, 8)], [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a], "PNG signature");
      assert.equal(png.readUInt32BE(16), svgWidth * 2, "PNG is the SVG at twice its size");
      assert.ok(png.length > 5000, "the PNG has a drawing in it");

      // A definition link opens its entry.
      const link = page.getByTestId("define-d50").first();
      assert.match((await link.getAttribute("href")) ?? "", /^\/definitions#d50$/);
      await link.click();
      await page.waitForURL(/\/definitions#d50$/);
      const entry = page.getByTestId("definition-d50");
      await entry.waitFor();
      assert.match(await entry.innerText(), /duration passed half the time/);
      await page.waitForFunction(() => {
        const el = document.getElementById("d50");
        if (!el) return false;
        const r = el.getBoundingClientRect();
        return r.top >= -1 && r.top < window.innerHeight;
      });
      await assertAccessible(page, "definitions");
      await screenshot(page, "figures-wide-02-definitions");

      // Compare a demo run with a sweep point measured with fewer replicates: the page says so.
      const sweepList = await listAll<{ id: string; name: string }>(page, `/api/labs/${labId}/sweeps`);
      const sweepId = sweepList.find((s) => s.name === DEMO_SWEEP_NAME)!.id;
      let point: { runId: string; status: string } | undefined;
      for (let i = 0; i < 240 && !point; i++) {
        const sw = await apiGet<{ points: { runId: string; status: string }[] }>(page, `/api/sweeps/${sweepId}`);
        point = sw.points.find((p) => p.status === "finished");
        if (!point) await page.waitForTimeout(1000);
      }
      assert.ok(point, "a sweep point finished");
      await page.goto(`${server.url}/compare?ids=${run.id},${point.runId}`);
      const warning = page.getByTestId("compare-settings-warning");
      await warning.waitFor({ timeout: 60_000 });
      assert.match(
        await warning.innerText(),
        /different replicate counts \(Tank sensor, hold on Duration ladder: 500; .*: 200\)/,
      );
      // The tests' list is printed once.
      const pairs = await page.getByTestId("comparison-pair").count();
      assert.equal(pairs, 1);
      const sentences = await page.getByTestId("comparison-tests").innerText();
      const lines = sentences.split("\n").filter((l) => l.startsWith("•"));
      assert.equal(new Set(lines).size, lines.length, "no sentence twice");
      await page.getByTestId("chart-compare-filter-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
      await assertAccessible(page, "compare with warning");
      await screenshot(page, "figures-wide-03-compare");
      assert.deepEqual(errors, []);
    } finally {
      await b.close();
    }
  });

  test("phone size: Definitions from the More page; the filter curve drawn with every tick of its image", async () => {
    const b = await launchBrowser(PHONE);
    const page = b.page;
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    try {
      await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
      await page.getByRole("link", { name: "More" }).click();
      await page.waitForURL(/\/more$/);
      const link = page.getByRole("link", { name: "Definitions" });
      assert.equal(await link.getAttribute("href"), "/definitions");
      await link.click();
      await page.waitForURL(/\/definitions$/);
      await page.locator("#d50").waitFor({ timeout: 30_000 });
      await assertAccessible(page, "definitions from More");

      // The on-screen chart (canvas) is checked by eye on this screenshot: the y axis of the filter curve
      // should read 0, 0.2, 0.4, 0.6, 0.8, 1 like the SVG image's ticks.
      const me = await apiGet<{ labs: { id: string; name: string }[] }>(page, "/api/me");
      const labId = me.labs.find((l) => l.name === "Tank Sensor Group")!.id;
      const run = await finishedRun(page, labId, DEMO_RUN);
      await page.goto(`${server.url}/runs/${run.id}`);
      const canvas = page.getByTestId("chart-filter-canvas").locator("canvas").first();
      await canvas.waitFor({ timeout: 60_000 });
      await canvas.scrollIntoViewIfNeeded();
      await page.waitForTimeout(500);
      await screenshot(page, "figures-phone-01-run");
      await page
        .getByTestId("chart-filter")
        .screenshot({ path: join(SCREENSHOT_DIR, "figures-phone-02-filter-curve.png") });
      assert.deepEqual(errors, []);
    } finally {
      await b.close();
    }
  });
});
