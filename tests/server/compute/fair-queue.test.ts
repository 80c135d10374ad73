/** The per-lab round-robin queue in front of the compute and finalising threads: ordering, not timing. */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { createFairQueue } from "@/server/compute/fair-queue";

/** Tasks that finish only when the test says so. */
function controlled() {
  const started: string[] = [];
  const finish = new Map<string, () => void>();
  const q = createFairQueue(
    (name: string) =>
      new Promise<string>((resolve) => {
        started.push(name);
        finish.set(name, () => resolve(name));
      }),
    { concurrency: 1 },
  );
  const settle = () => new Promise((r) => setImmediate(r));
  return { q, started, finish, settle };
}

describe("fair queue", () => {
  test("lab B's one task starts right after lab A's running one, not behind A's backlog", async () => {
    const { q, started, finish, settle } = controlled();
    const done = ["a1", "a2", "a3", "a4"].map((n) => q.submit("labA", n));
    done.push(q.submit("labB", "b1"));
    await settle();
    assert.deepEqual(started, ["a1"]);
    assert.equal(q.waiting("labA"), 3);
    assert.equal(q.waiting(), 4);
    for (const n of ["a1", "b1", "a2", "a3"]) {
      finish.get(n)!();
      await settle();
    }
    finish.get("a4")!();
    assert.deepEqual(await Promise.all(done), ["a1", "a2", "a3", "a4", "b1"]);
    // first-come-first-served would have been a1, a2, a3, a4, b1
    assert.deepEqual(started, ["a1", "b1", "a2", "a3", "a4"]);
  });

  test("three labs take turns; within a lab, submission order", async () => {
    const { q, started, finish, settle } = controlled();
    const all = [
      ["A", "a1"],
      ["A", "a2"],
      ["B", "b1"],
      ["B", "b2"],
      ["C", "c1"],
    ].map(([k, n]) => q.submit(k, n));
    for (let i = 0; i < 5; i++) {
      await settle();
      finish.get(started[started.length - 1])!();
    }
    await Promise.all(all);
    assert.deepEqual(started, ["a1", "b1", "c1", "a2", "b2"]);
  });

  test("a failing task rejects its own promise and the queue goes on", async () => {
    const q = createFairQueue(
      async (n: number) => {
        if (n === 1) throw new Error("boom");
        return n;
      },
      { concurrency: 1 },
    );
    await assert.rejects(q.submit("A", 1), /boom/);
    assert.equal(await q.submit("A", 2), 2);
    await new Promise((r) => setImmediate(r));
    assert.equal(q.running(), 0);
  });
});
