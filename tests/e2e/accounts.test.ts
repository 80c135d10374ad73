/**
 * Accounts, labs, administration and reproduction in the browser at phone size
 * (390x844), against the real server with demo data:
 *   - the demo owner opens the Lab page, invites a new address as viewer, and
 *     sees the pending invitation and the history in words; Settings, More;
 *   - a site admin (created with the admin CLI against the test database, its
 *     password set through the one-time link) reads the invitation link from the
 *     outbox through the API;
 *   - a fresh browser opens the link, creates the account, and lands on the
 *     lab's page as a viewer;
 *   - the admin page shows the outbox and backs the database up;
 *   - the demo editor reproduces a finished demo run and sees "Identical", then
 *     imports that run's bundle from the runs list.
 * axe-core runs on every new screen (no serious or critical violation, no
 * touch target under 44 px, no unlabelled control). Screenshots go to
 * test-results/screenshots/accounts-*.png.
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import type { Page } from "playwright-core";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, PHONE, type BrowserSession, assertAccessible } from "./browser";
import { signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";

const ROOT = resolve(__dirname, "..", "..");
const DEMO_OWNER = "owner@example.org";
const ADMIN = "admin@example.org";
const ADMIN_PASSWORD = "admin-password-for-tests";
const INVITED = "new.tank.tech@example.org";
const INVITED_PASSWORD = "tank-tech-password";
const LAB = "Tank Sensor Group";
const DEMO_RUN = "Tank sensor, direct on Duration ladder";

let server: TestServer;
const sessions: BrowserSession[] = [];

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer();
});
after(async () => {
  for (const s of sessions) await s.close();
  await server?.stop();
});

/** Signs in through the API; returns the session cookie. */
async function apiSignIn(email: string, password: string): Promise<string> {
  const r = await fetch(server.url + "/api/auth/sign-in", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email, password }),
  });
  assert.equal(r.status, 200, `API sign-in as ${email}`);
  return r.headers.get("set-cookie")!.split(";")[0];
}

async function apiGet<T>(path: string, cookie: string): Promise<T> {
  const r = await fetch(server.url + path, { headers: { cookie } });
  assert.equal(r.status, 200, `GET ${path}`);
  return (await r.json()) as T;
}

/** The site admin from the shell (npm run admin -- create), with its password set through the one-time link. */
async function createSiteAdmin(): Promise<string> {
  const out = execFileSync(process.execPath, ["--import", "tsx", "server/cli/admin.ts", "create", ADMIN], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: server.dbPath, LINGER_BASE_URL: server.url },
    encoding: "utf8",
  });
  const token = /reset\?token=([\w-]+)/.exec(out)?.[1];
  assert.ok(token, `the admin CLI prints a set-up link:\n${out}`);
  const r = await fetch(server.url + "/api/auth/reset-confirm", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ token, password: ADMIN_PASSWORD }),
  });
  assert.equal(r.status, 200, "setting the admin's password");
  return apiSignIn(ADMIN, ADMIN_PASSWORD);
}

async function browser(): Promise<{ page: Page; errors: string[] }> {
  const b = await launchBrowser(PHONE);
  sessions.push(b);
  const errors: string[] = [];
  b.page.on("pageerror", (e) => errors.push(e.message));
  return { page: b.page, errors };
}

async function shot(page: Page, name: string) {
  await page.waitForTimeout(300);
  await screenshot(page, `accounts-${name}`);
}

describe("accounts, labs, admin and reproduction at phone size (390x844)", { timeout: 600_000 }, () => {
  test("invite, accept by creating the account, admin outbox and backup, reproduce and import a run", async () => {
    // ---- the owner invites a new address as viewer
    const owner = await browser();
    let page = owner.page;
    try {
      await signIn(page, server.url, DEMO_OWNER, DEMO_PASSWORD);
      await page.goto(server.url + "/more");
      await page.getByRole("link", { name: "Lab", exact: true }).waitFor();
      assert.equal(
        await page.getByRole("link", { name: "Admin", exact: true }).count(),
        0,
        "Admin is hidden from a lab owner who is not a site admin",
      );
      await page.getByRole("link", { name: "Lab", exact: true }).click();
      await page.getByTestId("lab-screen").waitFor();
      await page.getByTestId("member-editor@example.org").waitFor();
      await assertAccessible(page, "lab");
      await page.getByTestId("invite-email").fill(INVITED);
      await page.getByRole("button", { name: "Send invitation" }).click();
      await page.getByTestId("invite-sent").waitFor();
      await page.getByTestId(`invitation-${INVITED}`).waitFor();
      await shot(page, "01-lab-owner");

      await page.getByTestId("open-audit").click();
      await page.getByTestId("audit-screen").waitFor();
      await page.getByText(`Demo owner invited ${INVITED} as a viewer`).first().waitFor();
      await assertAccessible(page, "lab history");
      await shot(page, "02-history");

      await page.goto(server.url + "/settings");
      await page.getByTestId("settings-screen").waitFor();
      assert.equal(
        await page.getByRole("checkbox", { name: /E-mail me when my lab's runs/ }).getAttribute("aria-checked"),
        "true",
        "run e-mails are on by default",
      );
      await assertAccessible(page, "settings");
      await shot(page, "03-settings");
      assert.deepEqual(owner.errors, [], "no uncaught page errors (owner)");
    } catch (e) {
      await screenshot(page, "accounts-failure-owner").catch(() => {});
      throw e;
    }

    // ---- a site admin reads the invitation link from the outbox (API)
    const adminCookie = await createSiteAdmin();
    const outbox = await apiGet<{ items: { to: string; subject: string; text: string }[] }>(
      `/api/admin/outbox?to=${encodeURIComponent(INVITED)}`,
      adminCookie,
    );
    const mail = outbox.items.find((m) => m.subject.includes(LAB));
    assert.ok(mail, "the invitation mail is in the outbox");
    const link = /https?:\/\/\S+\/invite\?token=\S+/.exec(mail.text)?.[0];
    assert.ok(link, `the mail holds an /invite?token= link:\n${mail.text}`);
    const linkUrl = new URL(link);
    assert.equal(linkUrl.pathname, "/invite", "the mail's link path is the web app's invitation route");
    assert.equal(linkUrl.port, String(server.port), "mail links use the port the server really listens on");

    // ---- a fresh browser accepts by creating the account
    const invited = await browser();
    page = invited.page;
    try {
      await page.goto(server.url + linkUrl.pathname + linkUrl.search);
      await page.getByTestId("invitation-lab").waitFor();
      assert.equal(await page.getByTestId("invitation-lab").innerText(), LAB);
      await page.getByText("You are invited to join as a viewer").waitFor();
      await assertAccessible(page, "invitation");
      await shot(page, "04-invitation");
      await page.getByTestId("accept-display-name").fill("Tank technician");
      await page.getByTestId("accept-password").fill(INVITED_PASSWORD);
      await page.getByTestId("accept-repeat-password").fill(INVITED_PASSWORD);
      await page.getByRole("button", { name: "Create account and join" }).click();
      await page.waitForURL(/\/lab$/);
      await page.getByTestId("lab-screen").waitFor();
      await page.getByRole("heading", { name: LAB }).first().waitFor();
      await page.getByText("Your role: viewer", { exact: true }).waitFor();
      await page.getByTestId(`member-${INVITED}`).waitFor();
      assert.equal(await page.getByTestId("invite-card").count(), 0, "a viewer cannot invite");
      await assertAccessible(page, "lab as the new viewer");
      await shot(page, "05-joined");
      assert.deepEqual(invited.errors, [], "no uncaught page errors (invited)");
    } catch (e) {
      await screenshot(page, "accounts-failure-invited").catch(() => {});
      throw e;
    }

    // ---- the admin page: outbox, accounts, backup
    const admin = await browser();
    page = admin.page;
    try {
      await signIn(page, server.url, ADMIN, ADMIN_PASSWORD);
      await page.goto(server.url + "/more");
      await page.getByRole("link", { name: "Admin", exact: true }).click();
      await page.getByTestId("admin-screen").waitFor();
      await page.getByTestId("outbox-list").getByText(`You are invited to ${LAB} on Linger`).first().waitFor();
      await page.getByTestId("user-list").getByText(INVITED).waitFor();
      await page.getByRole("button", { name: "Back up the database now" }).click();
      await page
        .getByTestId("backup-result")
        .getByText(/Backup written: linger-.+\.db/)
        .waitFor();
      await assertAccessible(page, "admin");
      await shot(page, "06-admin");
      assert.deepEqual(admin.errors, [], "no uncaught page errors (admin)");
    } catch (e) {
      await screenshot(page, "accounts-failure-admin").catch(() => {});
      throw e;
    }

    // ---- the editor reproduces a finished demo run, then imports its bundle
    const editor = await browser();
    page = editor.page;
    const bundleDir = mkdtempSync(join(tmpdir(), "linger-bundle-"));
    try {
      const cookie = await apiSignIn(DEMO_EDITOR, DEMO_PASSWORD);
      const me = await apiGet<{ labs: { id: string; name: string }[] }>("/api/me", cookie);
      const labId = me.labs.find((l) => l.name === LAB)!.id;
      let original: { id: string; status: string } | undefined;
      for (let i = 0; i < 120 && original?.status !== "finished"; i++) {
        if (i) await new Promise((r) => setTimeout(r, 2000));
        const runs = (
          await apiGet<{ items: { id: string; name: string; status: string }[] }>(`/api/labs/${labId}/runs`, cookie)
        ).items;
        original = runs.find((r) => r.name === DEMO_RUN);
      }
      assert.equal(original?.status, "finished", "the demo run finished");

      await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
      await page.goto(`${server.url}/runs/${original!.id}`);
      await page.getByTestId("run-status").getByText("Finished", { exact: true }).waitFor();
      await page.getByTestId("share-card").waitFor();
      assert.equal(await page.getByTestId("run-link").innerText(), `${server.url}/runs/${original!.id}`);
      await page.getByTestId("reproduce-run").click();
      await page.waitForURL((u) => /\/runs\/[^/]+$/.test(u.pathname) && !u.pathname.endsWith(original!.id));
      await page.getByTestId("reproduction-card").waitFor();
      await page
        .getByTestId("reproduction-verdict")
        .getByText(/^Identical: every stored statistic matches the original/)
        .waitFor({ timeout: 300_000 });
      assert.match(await page.getByTestId("reproduction-engine").innerText(), /same as the original/);
      await page.getByTestId("headline-cards").waitFor();
      await assertAccessible(page, "reproduced run");
      await shot(page, "07-reproduced");

      // Import the original's bundle from the runs list (expo-document-picker's file input).
      const bundle = await fetch(`${server.url}/api/runs/${original!.id}/export/bundle.json`, {
        headers: { cookie },
      }).then((r) => r.text());
      const file = join(bundleDir, "bundle.json");
      writeFileSync(file, bundle);
      await page.goto(server.url + "/runs");
      await page.getByTestId("import-bundle").waitFor();
      await assertAccessible(page, "runs list");
      const chooser = page.waitForEvent("filechooser");
      await page.getByTestId("import-bundle").click();
      await (await chooser).setFiles(file);
      // Importing starts a computation: it asks first.
      await page.getByTestId("import-confirm").click();
      await page.waitForURL((u) => /\/runs\/[^/]+$/.test(u.pathname) && u.pathname !== "/runs/new");
      await page.getByTestId("reproduction-card").waitFor();
      await page.getByText("Re-run of an imported bundle", { exact: false }).waitFor();
      await shot(page, "08-imported");
      assert.deepEqual(editor.errors, [], "no uncaught page errors (editor)");
    } catch (e) {
      await screenshot(page, "accounts-failure-editor").catch(() => {});
      throw e;
    } finally {
      rmSync(bundleDir, { recursive: true, force: true });
    }
  });
});
