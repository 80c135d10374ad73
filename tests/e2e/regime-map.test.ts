/**
 * The behaviour maps of a two-parameter sweep in the browser at phone
 * (390x844) and wide (1280x800) sizes, against the real server: the demo
 * editor launches (through the API, once for both sizes) a 3 x 3 sweep of the timer ring's two
 * first production rates, opens it, sees both maps (mean-field and
 * stochastic) with their legend, checks that each computed cell is a real link
 * to its point's run, taps one and lands on that run with its behaviour card.
 * axe-core runs on the sweep screen (no serious or critical violation), with
 * the 44 px touch-target and label checks. Then it states a design target
 * (pass probability at least 50% at 60 min) and sees the region that meets it
 * ringed on the map, as many points as the target API counts, and opens a
 * mean-field-only map of the same grid, refines its boundaries and sees the
 * refined points drawn on the edges (axe-core on both), deletes it and undoes the delete.
 * Screenshots: test-results/screenshots/regime-map-*.
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { startTestServer, DEMO_PASSWORD, type TestServer } from "@/tests/helpers/test-server";
import { launchBrowser, screenshot, PHONE, WIDE, type Viewport, assertAccessible } from "./browser";
import { firstLabAndTemplate, signIn, DEMO_EDITOR } from "./flows";
import { ensureWebBuild } from "@/scripts/build-web";

let server: TestServer;
/** One sweep serves both sizes (launched by the first test that needs it). */
let sharedSweepId: string | null = null;

before(async () => {
  await ensureWebBuild({ quiet: true });
  // The mean-field map below is checked for its labels, not its budget (tests/server/regime-maps.test.ts and
  // tests/sim/regimes/regime-budget.test.ts check that): a wall-time budget of 10 s can run out on a loaded machine.
  server = await startTestServer({ env: { LINGER_COMPUTE_WALL_SECONDS: "120" } });
});
after(async () => {
  await server?.stop();
});

for (const vp of [PHONE, WIDE] as Viewport[]) {
  describe(`regime map at ${vp.name} size (${vp.width}x${vp.height})`, { timeout: 600_000 }, () => {
    test("two-parameter sweep: both maps, legend, cells are links, tapping one opens its run", async () => {
      const b = await launchBrowser(vp);
      const page = b.page;
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(e.message));
      try {
        await signIn(page, server.url, DEMO_EDITOR, DEMO_PASSWORD);
        const api = (p: string) => `${server.url}/api${p}`;
        if (!sharedSweepId) {
          const { labId, template: ring } = await firstLabAndTemplate(page, server.url, "ring");
          const launched = await page.request.post(api(`/labs/${labId}/sweeps`), {
            timeout: 120_000,
            data: {
              name: "Timer ring map",
              base: {
                circuit: ring.circuit,
                program: { kind: "ladder", start: 10, durations: [5, 60], repeats: 1, gap: 60 },
                inputSignal: ring.inputSignal,
                settings: {
                  endTimeMinutes: 200,
                  gridStepMinutes: 1,
                  replicates: 8,
                  seed: "ring-map",
                  threshold: { value: 100 },
                },
              },
              axes: [
                { parameter: "rate(makeA)", grid: { from: 20, to: 200, count: 3, scale: "log" } },
                { parameter: "rate(makeB)", grid: { from: 20, to: 200, count: 3, scale: "log" } },
              ],
            },
          });
          assert.equal(launched.status(), 201, await launched.text());
          sharedSweepId = ((await launched.json()) as { id: string }).id;
        }
        const sweepId = sharedSweepId;
        await page.goto(`${server.url}/sweeps/${sweepId}`);
        await page.getByText("9 of 9 points · 8 replicates each").waitFor({ timeout: 420_000 });
        await page.getByText("Finished", { exact: true }).first().waitFor({ timeout: 10_000 });

        const maps = page.getByTestId("regime-maps");
        await maps.waitFor();
        await page.getByTestId("regime-map-deterministic").waitFor();
        await page.getByTestId("regime-map-stochastic").waitFor();
        const legend = page.getByTestId("regime-legend");
        assert.match(await legend.innerText(), /not computed yet/);
        // every label the API reports for a point appears in the legend
        const detail = (await (await page.request.get(api(`/sweeps/${sweepId}`))).json()) as {
          points: { index: number; runId: string; regime: { deterministic: string; stochastic: string } }[];
        };
        const legendText = await legend.innerText();
        for (const p of detail.points) {
          assert.ok(legendText.includes(p.regime.deterministic), `${p.regime.deterministic} in the legend`);
          assert.ok(legendText.includes(p.regime.stochastic), `${p.regime.stochastic} in the legend`);
        }
        // side by side when wide, stacked on a phone
        const d = (await page.getByTestId("regime-map-deterministic").boundingBox())!;
        const s = (await page.getByTestId("regime-map-stochastic").boundingBox())!;
        if (vp.width >= 768) assert.ok(Math.abs(d.y - s.y) < 2 && s.x > d.x, "maps side by side");
        else assert.ok(s.y >= d.y + d.height - 1, "maps stacked");

        // a cell is a real link to its point's run (row 1, column 2: index 1 * 3 + 2)
        const point = detail.points.find((p) => p.index === 5)!;
        const cell = page.getByTestId("map-stochastic-cell-1-2");
        assert.equal(await cell.evaluate((el) => el.tagName), "A");
        assert.equal(await cell.getAttribute("href"), `/runs/${point.runId}`);
        assert.match(
          (await cell.getAttribute("aria-label")) ?? "",
          new RegExp(`: ${point.regime.stochastic} \\(stochastic\\)`),
        );
        await page.waitForTimeout(300);
        await assertAccessible(page, "sweep with behaviour maps");
        await screenshot(page, `regime-map-${vp.name}-01-maps`);

        // design to a target: the region that meets it is ringed, as many points as the API counts
        const target = { pass: { minProbability: 0.5, atMinutes: 60 } };
        const expected = (await (
          await page.request.post(api(`/sweeps/${sweepId}/target`), { data: target })
        ).json()) as { meeting: number; points: { index: number; meets: boolean | null }[] };
        await page.getByTestId("target-pass-p").fill("50");
        await page.getByTestId("target-pass-at").fill("60");
        await page.getByTestId("target-submit").click();
        await page.getByTestId("target-results").waitFor({ timeout: 30_000 });
        assert.equal(
          await page.getByTestId("target-summary").innerText(),
          `${expected.meeting} of 9 points meet the target`,
        );
        for (const p of expected.points) {
          const ring = page.getByTestId(`meets-stochastic-${Math.floor(p.index / 3)}-${p.index % 3}`);
          assert.equal(await ring.count(), p.meets ? 1 : 0, `point ${p.index} ringed iff it meets the target`);
        }
        assert.match(await page.getByTestId("target-point-0").innerText(), /pass probability: (inside|outside) by/);
        await assertAccessible(page, "sweep with a design target");
        await screenshot(page, `regime-map-${vp.name}-01b-target`);

        await page.getByTestId("map-stochastic-cell-1-2").click();
        await page.waitForURL(new RegExp(`/runs/${point.runId}$`));
        const card = page.getByTestId("regime-card");
        await card.waitFor({ timeout: 30_000 });
        assert.match(
          await page.getByTestId("regime-stochastic-label").innerText(),
          new RegExp(point.regime.stochastic),
        );
        // the two verdict panels never overlap: side by side when wide, stacked (each as tall as its content) on a phone
        const panels = await Promise.all(
          ["regime-deterministic", "regime-stochastic"].map((id) =>
            page.getByTestId(id).evaluate((el) => {
              const r = el.getBoundingClientRect();
              return { x: r.x, y: r.y, w: r.width, h: r.height, overflow: el.scrollHeight - el.clientHeight };
            }),
          ),
        );
        const [pd, ps] = panels;
        for (const p of panels)
          assert.ok(p.overflow <= 1, `a verdict panel's content fits inside it (${p.overflow} px over)`);
        if (vp.width >= 768) assert.ok(ps.x >= pd.x + pd.w - 1, "verdict panels side by side");
        else assert.ok(ps.y >= pd.y + pd.h - 1, "verdict panels stacked without overlap");
        await screenshot(page, `regime-map-${vp.name}-02-point-run`);

        // a mean-field map of the same grid: computed at once, then its boundaries refined
        const labs = (await (await page.request.get(api("/labs"))).json()) as { items: { id: string }[] };
        const sweepBody = (await (await page.request.get(api(`/sweeps/${sweepId}`))).json()) as {
          baseSpec: { circuit: unknown; program: unknown; inputSignal: string };
          axes: { parameter: string; values: number[] }[];
        };
        const made = await page.request.post(api(`/labs/${labs.items[0].id}/regime-maps`), {
          timeout: 120_000,
          data: {
            name: `Timer ring mean-field ${vp.name}`,
            base: {
              circuit: sweepBody.baseSpec.circuit,
              program: sweepBody.baseSpec.program,
              inputSignal: sweepBody.baseSpec.inputSignal,
              settings: { endTimeMinutes: 200, gridStepMinutes: 1, replicates: 8, seed: "ring-map" },
            },
            axes: sweepBody.axes.map((a) => ({
              parameter: a.parameter,
              grid: { from: 20, to: 200, count: 6, scale: "log" },
            })),
          },
        });
        assert.equal(made.status(), 201, await made.text());
        const mapId = ((await made.json()) as { id: string }).id;
        await page.goto(`${server.url}/sweeps/maps/${mapId}`);
        await page.getByTestId("regime-map-deterministic").waitFor({ timeout: 30_000 });
        await page.getByTestId("map-deterministic-cell-5-5").waitFor();
        const refining = page.waitForResponse((r) => r.url().endsWith(`/regime-maps/${mapId}/refine`), {
          timeout: 120_000,
        });
        await page.getByTestId("refine-map").click();
        await refining;
        const refined = await page.request.get(api(`/regime-maps/${mapId}`));
        const after = (await refined.json()) as {
          refinedPoints: number;
          points: { index: number; refined: boolean }[];
        };
        if (after.refinedPoints > 0) {
          const first = after.points.find((p) => p.refined)!;
          await page.getByTestId(`refined-marker-${first.index}`).waitFor({ timeout: 60_000 });
          assert.match(
            (await page.getByTestId(`refined-marker-${first.index}`).getAttribute("aria-label")) ?? "",
            /^refined point /,
          );
        }
        await assertAccessible(page, "mean-field map, refined");
        await screenshot(page, `regime-map-${vp.name}-03-mean-field-map`);
        // delete with undo: the map stays on screen with its Undo while the server answers 404, then comes back
        await page.getByTestId("delete-map").click();
        await page.getByTestId("map-deleted").waitFor();
        assert.equal((await page.request.get(api(`/regime-maps/${mapId}`))).status(), 404);
        await page.getByTestId("undo-delete").click();
        await page.getByTestId("delete-map").waitFor();
        assert.equal((await page.request.get(api(`/regime-maps/${mapId}`))).status(), 200);
        assert.deepEqual(errors, []);
      } finally {
        await b.close();
      }
    });
  });
}
