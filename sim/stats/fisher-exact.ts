/**
 * Fisher's exact test for a 2x2 table (Fisher 1922, J R Stat Soc 85:87), two-sided
 * by summing the probabilities of all tables with the same margins that are no
 * more likely than the observed one (the usual definition; a relative tolerance
 * of 1e-7 treats equal probabilities as equal).
 *
 *            passed   failed
 *   run a      a        n_a - a
 *   run b      b        n_b - b
 *
 * Used for the difference in pass probability between two runs at one duration.
 *
 * @example fisherExact(0, 10, 10, 10) // about 1.08e-5
 */
export function fisherExact(passedA: number, trialsA: number, passedB: number, trialsB: number): number {
  if (trialsA === 0 || trialsB === 0) return NaN;
  const total = trialsA + trialsB;
  const passedTotal = passedA + passedB;
  const lf: number[] = [0];
  for (let i = 1; i <= total; i++) lf[i] = lf[i - 1] + Math.log(i);
  const logP = (x: number) =>
    lf[passedTotal] +
    lf[total - passedTotal] +
    lf[trialsA] +
    lf[trialsB] -
    lf[total] -
    lf[x] -
    lf[trialsA - x] -
    lf[passedTotal - x] -
    lf[trialsB - passedTotal + x];
  const lo = Math.max(0, passedTotal - trialsB);
  const hi = Math.min(trialsA, passedTotal);
  const observed = logP(passedA);
  let p = 0;
  for (let x = lo; x <= hi; x++) {
    const lp = logP(x);
    if (lp <= observed + 1e-7) p += Math.exp(lp);
  }
  return Math.min(1, p);
}
