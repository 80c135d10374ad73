import { regimeMapLayout } from "@/components/sweeps/regime-map-layout";
import type { SweepDetail } from "@/shared/schemas/api-runs";
import type { RegimeLabelValue } from "@/shared/schemas/regime";

type Pt = SweepDetail["points"][number];
const point = (index: number, d: RegimeLabelValue | null, s: RegimeLabelValue | null): Pt => ({
  index,
  runId: `run_${index}`,
  status: "finished",
  values: {},
  replicatesDone: 10,
  regime: { deterministic: d, stochastic: s },
  figures: null,
});
// 2 x 3: rows a = 1, 2; columns n = 2, 3, 4; the deterministic map switches at n = 4 in row 0 and n = 3 in row 1
const sweep = {
  axes: [
    { parameter: "a", values: [1, 2] },
    { parameter: "n", values: [2, 3, 4] },
  ],
  points: [
    point(0, "damped oscillation", "damped oscillation"),
    point(1, "damped oscillation", "damped oscillation"),
    point(2, "sustained oscillation", "sustained oscillation"),
    point(3, "damped oscillation", "damped oscillation"),
    point(4, "sustained oscillation", "damped oscillation"),
    point(5, "sustained oscillation", null),
  ],
};

describe("regime map layout", () => {
  test("rows are the first axis, columns the second, index i * columns + j; boundaries where neighbours differ", () => {
    const l = regimeMapLayout(sweep, "deterministic");
    expect(l.cells.length).toBe(2);
    expect(l.cells[1][2].runId).toBe("run_5");
    expect(l.cells[1][2].values).toEqual({ a: 2, n: 4 });
    // row 0: d d | s ; row 1: d | s s ; column 1 changes between rows
    expect(l.cells[0].map((c) => c.boundaryRight)).toEqual([false, true, false]);
    expect(l.cells[1].map((c) => c.boundaryRight)).toEqual([true, false, false]);
    expect(l.cells[0].map((c) => c.boundaryBelow)).toEqual([false, true, false]);
    expect(l.boundaries).toBe(3);
    expect(l.labels).toEqual(["damped oscillation", "sustained oscillation"]);
  });

  test("a point not computed yet has no label and draws no boundary; one axis is one row", () => {
    const l = regimeMapLayout(sweep, "stochastic");
    expect(l.cells[1][2].label).toBeNull();
    expect(l.cells[1][1].boundaryRight).toBe(false);
    const one = regimeMapLayout({ axes: [sweep.axes[1]], points: sweep.points.slice(0, 3) }, "stochastic");
    expect(one.cells.length).toBe(1);
    expect(one.rowAxis).toBeNull();
    expect(one.cells[0][2].values).toEqual({ n: 4 });
  });
});

// The maps themselves (links, legend, both models, phone and wide) are checked in the browser: tests/e2e/regime-map.test.ts.

describe("refined points and a design target on the map", () => {
  test("a refined point lies on the edge between the two cells it splits; the target's verdicts reach the cells", () => {
    const src = {
      axes: [
        { parameter: "a", values: [1, 10] },
        { parameter: "b", values: [0, 1, 2] },
      ],
      points: [
        ...[0, 1, 2, 3, 4, 5].map((index) => ({
          index,
          runId: null,
          values: { a: [1, 10][Math.floor(index / 3)], b: index % 3 },
          regime: { deterministic: (index % 3 === 2 ? "memory" : "steady") as "memory" | "steady", stochastic: null },
        })),
        // between (0,1) and (0,2): b = 1.5 on row a = 1
        {
          index: 6,
          runId: null,
          refined: true,
          values: { a: 1, b: 1.5 },
          regime: { deterministic: "memory" as const, stochastic: null },
        },
        // between rows at b = 0: a = sqrt(10)
        {
          index: 7,
          runId: null,
          refined: true,
          values: { a: Math.sqrt(10), b: 0 },
          regime: { deterministic: "steady" as const, stochastic: null },
        },
      ],
    };
    const l = regimeMapLayout(
      src,
      "deterministic",
      new Map([
        [2, true],
        [0, false],
      ]),
    );
    expect(l.refined.map((r) => r.index)).toEqual([6, 7]);
    expect(l.cells[0][1].refinedRight?.index).toBe(6);
    expect(l.cells[0][0].refinedBelow?.index).toBe(7);
    expect(l.cells[0][2].meets).toBe(true);
    expect(l.cells[0][0].meets).toBe(false);
    expect(l.cells[1][1].meets).toBeNull();
    // refined points never take a grid cell's place
    expect(l.cells.flat().length).toBe(6);
    expect(regimeMapLayout(src, "deterministic").cells[0][2].meets).toBeUndefined();
  });
});
