/**
 * The JS twin of direct-benchmark.c (the reference when no C compiler is
 * present): the same hand-written direct method for the benchmark circuit, line
 * for line, with the generator inline and every value in a local.
 */
export function directBenchmarkJs(
  states: Float64Array,
  switchTimes: Float64Array,
  tEnd: number,
  step: number,
): { events: number; checksum: number } {
  const nRep = states.length / 4;
  const nSw = switchTimes.length;
  const ng = Math.floor(tEnd / step + 1e-9) + 1;
  const gb = new Float64Array(3 * ng);
  let events = 0;
  let checksum = 0;
  for (let rep = 0; rep < nRep; rep++) {
    let s0 = states[4 * rep],
      s1 = states[4 * rep + 1],
      s2 = states[4 * rep + 2],
      c = states[4 * rep + 3],
      tt = 0;
    let X = 0,
      Y = 0,
      Z = 0,
      S = 0,
      t = 0;
    let si = 0,
      gi = 0;
    let tSw = nSw > 0 ? switchTimes[0] : Infinity,
      tG = 0;
    let q1 = 0,
      q2 = 0;
    let a0 = 10 * S,
      a1 = 0.1 * X,
      a2 = 0,
      a3 = 0.05 * Y,
      a4 = 0,
      a5 = 0.1 * Z;
    for (;;) {
      const atot = a0 + a1 + a2 + a3 + a4 + a5;
      tt = 2091639 * s0 + c * 2.3283064365386963e-10;
      s0 = s1;
      s1 = s2;
      c = tt | 0;
      s2 = tt - c;
      const tNext = atot > 0 ? t - Math.log(1 - s2) / atot : Infinity;
      if (tSw <= tNext && tSw < tEnd) {
        while (tG < tSw) {
          gb[gi] = X;
          gb[gi + ng] = Y;
          gb[gi + 2 * ng] = Z;
          gi++;
          tG = gi < ng ? gi * step : Infinity;
        }
        t = tSw;
        S = si & 1 ? 0 : 1;
        a0 = 10 * S;
        si++;
        tSw = si < nSw ? switchTimes[si] : Infinity;
        continue;
      }
      if (tNext > tEnd) {
        while (tG <= tEnd) {
          gb[gi] = X;
          gb[gi + ng] = Y;
          gb[gi + 2 * ng] = Z;
          gi++;
          tG = gi < ng ? gi * step : Infinity;
        }
        break;
      }
      while (tG < tNext) {
        gb[gi] = X;
        gb[gi + ng] = Y;
        gb[gi + 2 * ng] = Z;
        gi++;
        tG = gi < ng ? gi * step : Infinity;
      }
      t = tNext;
      tt = 2091639 * s0 + c * 2.3283064365386963e-10;
      s0 = s1;
      s1 = s2;
      c = tt | 0;
      s2 = tt - c;
      const r = s2 * atot;
      let cum = a0;
      if (r < cum) {
        X += 1;
        q1 = X * X;
        a1 = 0.1 * X;
        a2 = 10 * (q1 / (2500 + q1));
        a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2)));
      } else if (r < (cum += a1)) {
        X -= 1;
        q1 = X * X;
        a1 = 0.1 * X;
        a2 = 10 * (q1 / (2500 + q1));
        a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2)));
      } else if (r < (cum += a2)) {
        Y += 1;
        q2 = Y * Y;
        a3 = 0.05 * Y;
        a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2)));
      } else if (r < (cum += a3)) {
        Y -= 1;
        q2 = Y * Y;
        a3 = 0.05 * Y;
        a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2)));
      } else if (r < (cum += a4)) {
        Z += 1;
        a5 = 0.1 * Z;
      } else {
        Z -= 1;
        a5 = 0.1 * Z;
      }
      events++;
    }
    checksum += gb[3 * ng - 1];
  }
  return { events, checksum };
}
