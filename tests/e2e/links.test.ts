/**
 * The web app behaves like the web, at phone (390x844) and wide (1280x800)
 * sizes against the real server with demo data:
 *  - every navigation element (side navigation or tabs, run rows, cards,
 *    buttons that go somewhere) is a real `a[href]`; nothing has role="link"
 *    without an href;
 *  - a signed-out visit to a run's address goes to sign-in and, after signing
 *    in, back to that run; a `next` pointing at another site is refused;
 *  - the run page has a visible way back, filters for its per-pulse figures
 *    and, on a phone, no sideways scroll anywhere (axe-core clean).
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import type { Page } from "playwright-core";
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

/** Elements that claim to be links but have no address, described for the failure message. */
async function linksWithoutHref(page: Page): Promise<string[]> {
  return page.evaluate(() =>
    Array.from(document.querySelectorAll('[role="link"]:not([href]), a:not([href])')).map((el) =>
      el.outerHTML.slice(0, 160),
    ),
  );
}

/** Whether the page, or anything inside it, scrolls sideways or pokes out of the window. */
async function sidewaysOverflow(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const out: string[] = [];
    if (document.documentElement.scrollWidth > width + 1) out.push(`document ${document.documentElement.scrollWidth}`);
    document.querySelectorAll<HTMLElement>("body *").forEach((el) => {
      const r = el.getBoundingClientRect();
      if (r.width === 0 || r.height === 0) return;
      const cs = getComputedStyle(el);
      if ((cs.overflowX === "auto" || cs.overflowX === "scroll") && el.scrollWidth > el.clientWidth + 1)
        out.push(`scrolls sideways: ${el.outerHTML.slice(0, 120)}`);
      else if (r.right > width + 1 && !el.closest('[aria-hidden="true"]'))
        out.push(`past the right edge (${Math.round(r.right)} > ${width}): ${el.outerHTML.slice(0, 120)}`);
    });
    return out.slice(0, 8);
  });
}

async function signInHere(page: Page): Promise<void> {
  await page.getByLabel("Email", { exact: true }).fill(DEMO_EDITOR);
  await page.getByLabel("Password", { exact: true }).fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
}

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`links at ${vp.name} size (${vp.width}x${vp.height})`, { timeout: 420_000 }, () => {
    test("navigation is made of real links; the run page has a way back, filters and no sideways scroll", async () => {
      const b = await launchBrowser(vp);
      const page = b.page;
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(e.message));
      try {
        await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
        const nav = page.getByRole("navigation", { name: "Sections" });
        const navHrefs = await nav.locator("a[href]").evaluateAll((els) => els.map((e) => e.getAttribute("href")));
        const expected =
          vp.width < 768
            ? ["/", "/circuits", "/programs", "/runs", "/more"]
            : ["/", "/circuits", "/runs", "/sweeps", "/lab"];
        for (const h of expected) assert.ok(navHrefs.includes(h), `navigation links to ${h}: ${navHrefs.join(" ")}`);
        assert.equal(await nav.locator('[role="link"]:not([href])').count(), 0);
        assert.equal(
          await page.getByRole("link", { name: "Start a study" }).first().getAttribute("href"),
          "/runs/new",
          "the call to start a study is a link",
        );
        assert.deepEqual(await linksWithoutHref(page), [], "home: no link without an address");

        // Run rows are links; the demo control run opens from its row.
        await nav.getByRole("link", { name: "Runs", exact: true }).click();
        await page.waitForURL(/\/runs$/);
        const row = page.locator('a[href^="/runs/"]').filter({ hasText: DEMO_CONTROL_RUN }).first();
        await row.waitFor();
        const runPath = (await row.getAttribute("href"))!;
        assert.match(runPath, /^\/runs\/[^/]+$/);
        // The row says more than the name: when and by whom (two runs with one name stay apart).
        assert.match(await row.innerText(), /\d{4}, \d{2}:\d{2}/);
        assert.deepEqual(await linksWithoutHref(page), [], "runs: no link without an address");
        await row.click();
        await page.waitForURL((u) => u.pathname === runPath);

        await page.getByTestId("run-status").getByText("Finished", { exact: true }).waitFor({ timeout: 300_000 });
        const back = page.getByTestId("back-link");
        assert.equal(await back.getAttribute("href"), "/runs");
        assert.ok(await back.isVisible(), "a visible way back");
        await page.getByTestId("replicate-table").waitFor();

        // Filters instead of paging through everything.
        const countText = async () => (await page.getByTestId("pulse-count").innerText()).trim();
        const all = Number((await countText()).split(" ")[0].replace(/,/g, ""));
        await page.getByTestId("pulse-filter-passed-no").click();
        await page
          .getByTestId("pulse-count")
          .getByText(/did not pass/)
          .waitFor();
        const notPassed = Number((await countText()).split(" ")[0].replace(/,/g, ""));
        await page.getByTestId("pulse-filter-passed-yes").click();
        await page
          .getByTestId("pulse-count")
          .getByText(/that passed/)
          .waitFor();
        const passed = Number((await countText()).split(" ")[0].replace(/,/g, ""));
        assert.ok(notPassed > 0 && passed > 0, `both kinds present (${passed} passed, ${notPassed} not)`);
        assert.ok(passed + notPassed <= all, `${passed} + ${notPassed} <= ${all}`);
        if (vp.width < 768) {
          const firstCard = page.locator('[data-testid^="pulse-card-"]').first();
          await firstCard.getByText("Passed", { exact: true }).waitFor();
          await firstCard.getByRole("button", { name: /^More figures/ }).click();
          await firstCard.getByTestId("pulse-more").waitFor();
        }
        await page.getByTestId("pulse-filter-passed-all").click();
        await page.getByTestId("chart-filter-canvas").locator("canvas").first().waitFor({ timeout: 60_000 });
        await page.waitForTimeout(500);
        assert.deepEqual(await linksWithoutHref(page), [], "run: no link without an address");
        if (vp.width < 768)
          assert.deepEqual(await sidewaysOverflow(page), [], "the phone run page does not scroll sideways");
        await assertAccessible(page, "run detail");
        await screenshot(page, `links-${vp.name}-run`);
        assert.deepEqual(errors, [], "no uncaught page errors");

        // A deep link survives sign-in (a fresh browser, signed out).
        const fresh = await launchBrowser(vp);
        try {
          await fresh.page.goto(server.url + runPath);
          await fresh.page.waitForURL((u) => u.pathname === "/sign-in");
          assert.equal(new URL(fresh.page.url()).searchParams.get("next"), runPath);
          await signInHere(fresh.page);
          await fresh.page.waitForURL((u) => u.pathname === runPath && !u.search);
          await fresh.page.getByTestId("run-status").waitFor();
        } finally {
          await fresh.close();
        }
      } catch (e) {
        await screenshot(page, `links-${vp.name}-failure`).catch(() => {});
        throw e;
      } finally {
        await b.close();
      }
    });

    test("a return address on another site is refused: signing in goes home", async () => {
      const b = await launchBrowser(vp);
      try {
        for (const next of ["//evil.example/runs", "https://evil.example/", "/\\evil.example", "javascript:alert(1)"]) {
          await b.page.context().clearCookies();
          await b.page.goto(`${server.url}/sign-in?next=${encodeURIComponent(next)}`);
          await signInHere(b.page);
          await b.page.getByTestId("home-screen").waitFor();
          const u = new URL(b.page.url());
          assert.equal(u.origin, server.url.replace(/\/$/, ""), next);
          assert.equal(u.pathname, "/", next);
        }
      } finally {
        await b.close();
      }
    });
  });
}
