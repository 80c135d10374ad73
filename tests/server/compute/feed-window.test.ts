/**
 * The run queue's feeding rule (server/compute/feed-window.ts): per-lab
 * fairness of the chunks out at once, whatever the number of workers. The
 * bound checked is the documented one (no lab above ceil(W / L) of a window of
 * W chunks while L labs wait, after one window turnover); it is our own design
 * rule, so the expected values are derived from it, not from a publication.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { newFeedState, pickNextChunk, type FeedRun } from "@/server/compute/feed-window";

const run = (id: string, labId: string, chunks: number, group = id, order = 0): FeedRun => ({
  id,
  labId,
  group,
  order,
  pending: Array.from({ length: chunks }, (_, i) => i),
  inFlight: 0,
  stopped: false,
});

/** Simulates a window of W slots: fill, then complete the oldest chunk and refill, `steps` times. */
function simulate(runs: FeedRun[], W: number, steps: number, arrive?: { at: number; runs: FeedRun[] }) {
  const state = newFeedState();
  const out: { run: FeedRun; chunk: number }[] = [];
  const fill = () => {
    while (out.length < W) {
      const n = pickNextChunk(runs, state);
      if (!n) break;
      n.run.inFlight++;
      out.push({ run: n.run, chunk: n.chunkIndex });
    }
  };
  const heldByLab = () => {
    const m = new Map<string, number>();
    for (const o of out) m.set(o.run.labId, (m.get(o.run.labId) ?? 0) + 1);
    return m;
  };
  const history: Map<string, number>[] = [];
  fill();
  for (let s = 0; s < steps; s++) {
    if (arrive && s === arrive.at) runs.push(...arrive.runs);
    const done = out.shift()!;
    done.run.inFlight--;
    fill();
    history.push(heldByLab());
  }
  return history;
}

test("one lab alone may use the whole window", () => {
  const h = simulate([run("a1", "A", 100)], 8, 5);
  assert.equal(h.at(-1)!.get("A"), 8);
});

test("a lab arriving while another fills the window gets its share within one window turnover", () => {
  const W = 8;
  const runs = [run("a1", "A", 200), run("a2", "A", 200), run("a3", "A", 200)];
  const h = simulate(runs, W, 40, { at: 10, runs: [run("b1", "B", 50)] });
  // From one turnover (W completions) after B arrived, neither lab holds more than ceil(8 / 2) = 4.
  for (const m of h.slice(10 + W)) {
    assert.ok((m.get("A") ?? 0) <= 4, `A holds ${m.get("A")}`);
    assert.ok((m.get("B") ?? 0) <= 4, `B holds ${m.get("B")}`);
  }
});

test("three labs share a window of 10 as 4/3/3 at most (ceil(10 / 3) = 4)", () => {
  const runs = [run("a", "A", 500), run("b", "B", 500), run("c1", "C", 500), run("c2", "C", 500)];
  const h = simulate(runs, 10, 60);
  for (const m of h.slice(10))
    for (const lab of ["A", "B", "C"]) assert.ok((m.get(lab) ?? 0) <= 4, `${lab}: ${m.get(lab)}`);
});

test("a lab with many runs gets no more than a lab with one (fairness is per lab, not per run)", () => {
  const many = Array.from({ length: 6 }, (_, i) => run(`a${i}`, "A", 100));
  const h = simulate([...many, run("b", "B", 100)], 6, 30);
  for (const m of h.slice(6)) assert.equal(m.get("A"), 3);
});

test("inside a lab: round-robin over runs, a sweep counts once and its points go in order", () => {
  const state = newFeedState();
  const sweep = [run("p1", "A", 2, "sweep", 1), run("p0", "A", 2, "sweep", 0)];
  const solo = run("solo", "A", 2);
  const picks: string[] = [];
  for (let i = 0; i < 6; i++) {
    const n = pickNextChunk([...sweep, solo], state)!;
    picks.push(`${n.run.id}:${n.chunkIndex}`);
  }
  assert.deepEqual(picks, ["p0:0", "solo:0", "p0:1", "solo:1", "p1:0", "p1:1"]);
});

test("stopped runs and runs with nothing pending are skipped; nothing waiting gives null", () => {
  const state = newFeedState();
  const stopped = { ...run("x", "A", 3), stopped: true };
  assert.equal(pickNextChunk([stopped, run("y", "A", 0)], state), null);
});
