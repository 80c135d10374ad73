/**
 * No request can stall the server: the ODE work behind estimate and launch
 * runs in the compute thread under a budget for the whole call (422 naming the
 * fastest reaction past it), stiff circuits get an answer, and /api/health
 * answers while such a request computes. Ordering is asserted, never a wall-clock limit.
 */
import { test, describe, before, after } from "node:test";
import assert from "node:assert/strict";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { assertCloseTo } from "@/tests/helpers/close-to";
import type { CircuitInput } from "@/shared/schemas/circuit";
import { ringCircuit } from "@/tests/helpers/stiff-circuits";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import compute from "@/server/compute/compute-worker";

const body = (circuit: CircuitInput, settings: Record<string, unknown>) => ({
  circuit,
  program: { kind: "pulses", pulses: [{ start: 10, duration: 10 }] },
  inputSignal: "S",
  settings: { gridStepMinutes: 10, replicates: 1, seed: "stall", ...settings },
});

/** makeX at 10/min while S is on, degX at 1e4/min: stiff (relaxation in 1e-4 min, run of 1000 min). */
const stiffCircuit: CircuitInput = {
  name: "fast-turnover",
  species: [{ name: "X", initialCount: 0 }],
  signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
  reactions: [
    { name: "makeX", products: [{ species: "X" }], rate: { kind: "constant", ratePerMinute: 10 }, scaledBy: "S" },
    { name: "degX", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 1e4 } },
  ],
  outputSpecies: "X",
};

describe("request-time ODE work off the event loop", () => {
  let t: TestApp;
  before(async () => {
    t = await makeTestContext({ env: { LINGER_COMPUTE_WALL_SECONDS: "1.5" } });
  });
  after(() => t.close());

  test("a viewer's stiff estimate gets an answer: events = 2 x 10/min x 10 min ON per replicate (every X made is removed; closed form)", async () => {
    const viewer = await signIn(t.app, "viewer@example.org");
    const r = await viewer
      .post(`/api/labs/${t.demoLab!.id}/runs/estimate`)
      .send(body(stiffCircuit, { endTimeMinutes: 1000, replicates: 3 }));
    assert.equal(r.status, 200, JSON.stringify(r.body));
    // threshold rule: ON steady state 10/1e4 = 0.001 > 0, so the default threshold resolves
    assertCloseTo(r.body.estimatedEvents, 3 * 2 * 10 * 10, { rel: 1e-3 });
  });

  test("/api/health answers while an estimate computes; past its budget the estimate is a 422 naming the reaction", async () => {
    const viewer = await signIn(t.app, "viewer@example.org");
    const order: string[] = [];
    const estimate = viewer
      .post(`/api/labs/${t.demoLab!.id}/runs/estimate`)
      .send(body(ringCircuit, { endTimeMinutes: 1e5, threshold: { value: 5, windowMinutes: 1 } }))
      .then((r) => {
        order.push("estimate");
        return r;
      });
    // let the estimate reach the compute thread first
    await new Promise((r) => setTimeout(r, 200));
    const health = await viewer.get("/api/health").then((r) => {
      order.push("health");
      return r;
    });
    const est = await estimate;
    assert.equal(health.status, 200);
    assert.deepEqual(order, ["health", "estimate"], "health did not wait for the estimate");
    assert.equal(est.status, 422, JSON.stringify(est.body));
    assert.equal(est.body.error.code, "too_stiff");
    assert.match(est.body.error.message, /^Stiff or too fast: reaction "(make|deg)[PQR]" at [0-9.e]+\/min/);
    assert.match(est.body.error.message, /more than 1\.5 s of computing/);
  });

  test("launch with the budget exceeded by the default threshold's ODE is a 422, and nothing is stored", async () => {
    const editor = await signIn(t.app, "editor@example.org");
    // no threshold value: the rule needs the ON steady state of the ring, which does not settle
    const r = await editor
      .post(`/api/labs/${t.demoLab!.id}/runs`)
      .send({ name: "ring", ...body(ringCircuit, { endTimeMinutes: 100, threshold: { windowMinutes: 1 } }) });
    assert.equal(r.status, 422, JSON.stringify(r.body));
    assert.match(
      r.body.error.message,
      /^Stiff or too fast: reaction "\w+" at [0-9.e]+\/min needs about .* of the search for a steady state/,
    );
    const list = await editor.get(`/api/labs/${t.demoLab!.id}/runs`);
    assert.equal((list.body.items ?? list.body).filter((x: { name: string }) => x.name === "ring").length, 0);
  });
});

const specOf = (circuit: CircuitInput, settings: Record<string, unknown>) => {
  const { settings: flat, ...rest } = body(circuit, settings);
  return RunSpecSchema.parse({ ...rest, ...flat });
};

describe("launch checks", () => {
  test("with threshold.value given, the check solves no ODE: a one-step budget is enough even for the ring", () => {
    const spec = specOf(ringCircuit, { endTimeMinutes: 1e5, threshold: { value: 5, windowMinutes: 1 } });
    const answer = compute({ job: { kind: "threshold", specs: [spec] }, wallMs: 60_000, maxSteps: 1 });
    assert.deepEqual(answer, { ok: true, value: null });
  });

  test("without it, the same one-step budget is a 422 (the default threshold needs the mean-field levels)", () => {
    const spec = specOf(ringCircuit, { endTimeMinutes: 100, threshold: { windowMinutes: 1 } });
    const answer = compute({ job: { kind: "threshold", specs: [spec] }, wallMs: 60_000, maxSteps: 1 });
    assert.equal(answer.ok, false, JSON.stringify(answer));
    assert.equal(!answer.ok && answer.status, 422, JSON.stringify(answer));
  });
});
