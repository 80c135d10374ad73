/**
 * SBML import in the browser at phone (390x844) and wide (1280x800) sizes,
 * against the real server with the demo accounts: from the circuits screen
 * open "Import SBML", read a model with parts Linger refuses (the report names
 * each by line, element and id), then pick tests/fixtures/sbml/tank-sensor.xml,
 * see the species, reactions and parameters it gives, save it under a name and
 * land on the new circuit, whose page offers the SBML download; then read the
 * file again and keep it as version 2 of that circuit. axe-core runs
 * on each step (no serious or critical violation), as do the 44 px touch-target
 * and label checks. Screenshots go to test-results/screenshots/.
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, PHONE, WIDE, type Viewport, assertAccessible } from "./browser";
import { signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";

const FIXTURES = resolve(__dirname, "..", "fixtures", "sbml");
const GOOD = join(FIXTURES, "tank-sensor.xml");
const REFUSED_TEXT = readFileSync(join(FIXTURES, "tank-sensor-refused.xml"), "utf8");
let server: TestServer;

before(async () => {
  await ensureWebBuild({ quiet: true });
  server = await startTestServer();
});
after(async () => {
  await server?.stop();
});

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`SBML import at ${vp.name} size (${vp.width}x${vp.height})`, { timeout: 240_000 }, () => {
    test("a refused model lists its parts by line; a good file is previewed, saved and opened", async () => {
      const b = await launchBrowser(vp);
      const page = b.page;
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(e.message));
      const tag = vp.name;
      try {
        await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
        await page.goto(server.url + "/circuits");
        await page.getByTestId("import-sbml").click();
        await page.waitForURL(/\/circuits\/import$/);
        await page.getByTestId("sbml-import-screen").waitFor();
        await assertAccessible(page, "SBML import, empty");

        // Pasted text with a rate rule and a delayed event: refused, each part named by line.
        await page.getByTestId("sbml-paste").fill(REFUSED_TEXT);
        await page.getByTestId("sbml-read").click();
        const report = page.getByTestId("sbml-refusals");
        await report.waitFor();
        const text = await report.innerText();
        // Lines counted in tests/fixtures/sbml/tank-sensor-refused.xml.
        assert.match(text, /Line 15: rateRule "qsaA"/, text);
        assert.match(text, /rate rules are not supported/, text);
        assert.match(text, /Line 28: event "feed_spike"/, text);
        assert.equal(await page.getByTestId("sbml-save").count(), 0, "a refused model cannot be saved");
        await assertAccessible(page, "SBML import, refused");
        await screenshot(page, `sbml-${tag}-01-refused`);

        // The good file through the file picker.
        const [chooser] = await Promise.all([
          page.waitForEvent("filechooser"),
          page.getByTestId("sbml-pick-file").click(),
        ]);
        await chooser.setFiles(GOOD);
        await page.getByTestId("sbml-file-name").getByText("tank-sensor.xml").waitFor();
        await page.getByTestId("sbml-read").click();
        const preview = page.getByTestId("sbml-preview");
        await preview.waitFor();
        assert.equal(await report.count(), 0, "the old report is gone");
        assert.deepEqual(await page.getByTestId("sbml-species").allInnerTexts(), ["qsaA: 5", "rptC: 0"]);
        const reactions = await page.getByTestId("sbml-reaction").allInnerTexts();
        assert.equal(reactions.length, 4);
        assert.match(reactions[0], /make_qsaA: nothing -> qsaA/);
        assert.match(reactions[2], /expression: .*vRpt/);
        assert.deepEqual(await page.getByTestId("sbml-parameter").allInnerTexts(), ["vRpt = 4", "Khalf = 10"]);
        await assertAccessible(page, "SBML import, preview");
        await screenshot(page, `sbml-${tag}-02-preview`);

        const name = `Imported sensor ${tag}`;
        await page.getByTestId("sbml-name").fill(name);
        await page.getByTestId("sbml-save").click();
        await page.waitForURL(/\/circuits\/cir_[^/]+$/);
        await page.getByRole("heading", { name }).first().waitFor();
        await page.getByTestId("sbml-export").waitFor();
        await assertAccessible(page, "imported circuit");
        await screenshot(page, `sbml-${tag}-03-saved`);

        // The same file again, kept as a new version of the circuit just made.
        const id = new URL(page.url()).pathname.split("/").pop()!;
        await page.goto(server.url + "/circuits/import");
        const [again] = await Promise.all([
          page.waitForEvent("filechooser"),
          page.getByTestId("sbml-pick-file").click(),
        ]);
        await again.setFiles(GOOD);
        await page.getByTestId("sbml-read").click();
        await page.getByTestId("sbml-preview").waitFor();
        await page.getByTestId("sbml-save-as-version").click();
        await page.getByTestId(`sbml-target-${id}`).click();
        await assertAccessible(page, "SBML import, as a new version");
        await page.getByTestId("sbml-save-version").click();
        await page.waitForURL(new RegExp(`/circuits/${id}$`));
        await page.getByText("Version 2 (current)").waitFor();
        assert.deepEqual(errors, []);
      } finally {
        await b.close();
      }
    });
  });
}
