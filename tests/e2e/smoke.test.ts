/**
 * Smoke test of the served web app at phone (390x844) and wide (1280x800)
 * sizes: fonts load, the product name shows, a signed-out visitor is sent to
 * sign-in, the demo editor signs in and sees the demo lab. The server starts on
 * an empty database and seeds the demo lab itself, as a new install does (the other
 * browser tests start on a copy of a seeded one: tests/helpers/test-server.ts).
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, interLoaded, PHONE, WIDE, axeSeriousViolations, type Viewport } from "./browser";
import { signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";

let server: TestServer;

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer({ database: "fresh" });
});
after(async () => {
  await server?.stop();
});

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`smoke at ${vp.name} size (${vp.width}x${vp.height})`, () => {
    test("signed out: redirected to sign-in, fonts loaded, no serious accessibility violations", async () => {
      const b = await launchBrowser(vp);
      try {
        await b.page.goto(server.url + "/");
        await b.page.waitForURL(/\/sign-in$/);
        await b.page.getByText("Linger", { exact: true }).first().waitFor();
        assert.equal(await interLoaded(b.page), true, "Inter is loaded in document.fonts");
        await screenshot(b.page, `smoke-${vp.name}-sign-in`);
        const serious = await axeSeriousViolations(b.page);
        assert.deepEqual(serious, [], JSON.stringify(serious, null, 2));
      } finally {
        await b.close();
      }
    });

    test("the demo editor signs in and sees the demo lab", async () => {
      const b = await launchBrowser(vp);
      try {
        await signIn(b.page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
        await b.page.getByText("Tank Sensor Group").first().waitFor();
        assert.ok(await b.page.getByText("Linger", { exact: true }).first().isVisible());
        const layout = vp.width >= 768 ? "layout-wide" : "layout-phone";
        await b.page.getByTestId(layout).waitFor();
        await screenshot(b.page, `smoke-${vp.name}-home`);
        const serious = await axeSeriousViolations(b.page);
        assert.deepEqual(serious, [], JSON.stringify(serious, null, 2));
      } finally {
        await b.close();
      }
    });
  });
}
