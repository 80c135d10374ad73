/**
 * Stall benchmark: a real server process (own port, temporary database), one
 * signed-in lab member sending cost estimates back to back, each either a
 * stiff circuit (a reaction at 1e4/min, answered by the stiff ODE method) or a
 * ring of repressors whose mean-field path runs out of its compute budget
 * (answered 422 after LINGER_COMPUTE_WALL_SECONDS). Meanwhile /api/health is
 * requested 10 times a second; its p95 is the figure (target: under 100 ms).
 * Before the compute thread, one such estimate held /api/health for its whole
 * duration.
 */
import { startServerProcess } from "@/scripts/lib/spawn-server";

export interface StallResult {
  seconds: number;
  computeWallSeconds: number;
  estimates: { status: number; count: number }[];
  healthRequests: number;
  healthP95Ms: number;
  healthMaxMs: number;
}

const p95 = (xs: number[]) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil(0.95 * s.length) - 1)];
};

const stiffCircuit = {
  name: "fast-turnover",
  species: [{ name: "X", initialCount: 0 }],
  signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
  reactions: [
    { name: "makeX", products: [{ species: "X" }], rate: { kind: "constant", ratePerMinute: 10 }, scaledBy: "S" },
    { name: "degX", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 1e4 } },
  ],
  outputSpecies: "X",
};

const ringCircuit = {
  name: "ring",
  species: [
    { name: "P", initialCount: 5 },
    { name: "Q", initialCount: 0 },
    { name: "R", initialCount: 0 },
  ],
  signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
  reactions: [
    ...[
      ["R", "P"],
      ["P", "Q"],
      ["Q", "R"],
    ].map(([from, to]) => ({
      name: `make${to}`,
      products: [{ species: to }],
      rate: {
        kind: "regulated",
        maxRatePerMinute: 1000,
        leakFraction: 0.001,
        regulators: [{ source: from, effect: "represses", halfMax: 10, hill: 3 }],
      },
    })),
    ...["P", "Q", "R"].map((s) => ({
      name: `deg${s}`,
      reactants: [{ species: s }],
      rate: { kind: "massAction", ratePerMinute: 10 },
    })),
  ],
  outputSpecies: "R",
};

const estimateBody = (circuit: unknown, endTimeMinutes: number) => ({
  circuit,
  program: { kind: "pulses", pulses: [{ start: 10, duration: 10 }] },
  inputSignal: "S",
  settings: {
    endTimeMinutes,
    gridStepMinutes: endTimeMinutes / 1000,
    replicates: 100,
    seed: "stall-bench",
    threshold: { value: 5, windowMinutes: 1 },
  },
});

export async function runStallBench(
  opts: { seconds?: number; computeWallSeconds?: number } = {},
): Promise<StallResult> {
  const seconds = opts.seconds ?? 20;
  const computeWallSeconds = opts.computeWallSeconds ?? 5;
  const server = await startServerProcess({
    env: {
      LINGER_SEED_DEMO: "0",
      LINGER_POOL_SIZE: "1",
      LINGER_TEST: "1",
      LINGER_COMPUTE_WALL_SECONDS: String(computeWallSeconds),
    },
  });
  try {
    const base = server.url;
    const json = { "content-type": "application/json" };
    const email = "stall@example.org";
    const password = "stall-bench-password-123";
    const up = await fetch(`${base}/api/auth/sign-up`, {
      method: "POST",
      headers: json,
      body: JSON.stringify({ email, password, displayName: "Stall" }),
    });
    if (!up.ok) throw new Error(`sign-up failed: ${up.status} ${await up.text()}`);
    const si = await fetch(`${base}/api/auth/sign-in`, {
      method: "POST",
      headers: json,
      body: JSON.stringify({ email, password }),
    });
    if (!si.ok) throw new Error(`sign-in failed: ${si.status}`);
    const cookie = (si.headers.get("set-cookie") ?? "").split(";")[0];
    const me = await (await fetch(`${base}/api/me`, { headers: { cookie } })).json();
    const labId = me.labs[0].id;

    const end = performance.now() + seconds * 1000;
    const statuses = new Map<number, number>();
    const estimates = (async () => {
      for (let i = 0; performance.now() < end; i++) {
        const b = i % 2 === 0 ? estimateBody(ringCircuit, 1e5) : estimateBody(stiffCircuit, 1e4);
        const r = await fetch(`${base}/api/labs/${labId}/runs/estimate`, {
          method: "POST",
          headers: { ...json, cookie },
          body: JSON.stringify(b),
        });
        await r.arrayBuffer();
        statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
      }
    })();
    const health: number[] = [];
    while (performance.now() < end) {
      const tick = performance.now();
      const r = await fetch(`${base}/api/health`, { headers: { cookie } });
      await r.arrayBuffer();
      health.push(performance.now() - tick);
      const wait = 100 - (performance.now() - tick);
      if (wait > 0) await new Promise((res) => setTimeout(res, wait));
    }
    await estimates;
    return {
      seconds,
      computeWallSeconds,
      estimates: [...statuses.entries()]
        .map(([status, count]) => ({ status, count }))
        .sort((a, b) => a.status - b.status),
      healthRequests: health.length,
      healthP95Ms: p95(health),
      healthMaxMs: Math.max(...health),
    };
  } finally {
    await server.stop();
  }
}

if (require.main === module) {
  runStallBench().then(
    (r) => console.log(JSON.stringify(r)),
    (e: Error) => {
      console.error(`error: ${e.message}`);
      process.exit(1);
    },
  );
}
