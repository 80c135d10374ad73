/*
 * Reference for npm run bench (never shipped in the app): a tight hand-written
 * exact direct method (Gillespie 1977) for the benchmark circuit of
 * docs/examples/benchmark.json, compiled at benchmark time with cc -O2.
 * Same generator as Linger (Alea stepped inline; the initial state of each
 * replicate's stream is read from stdin, computed by Linger's own seeding), the
 * same waiting time -log(1 - u)/a0, the same selection order, the same exact
 * input switches and grid recording (every species at every grid time); no
 * crossing detection. `events` counts reaction firings only.
 *
 * stdin: nRep nSwitch tEnd gridStep, then nSwitch times, then nRep lines of s0 s1 s2 c.
 * stdout: events seconds checksum
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

int main(void) {
  int nRep, nSw;
  double tEnd, step;
  if (scanf("%d %d %lf %lf", &nRep, &nSw, &tEnd, &step) != 4) return 1;
  double *sw = malloc(sizeof(double) * (nSw + 1));
  for (int i = 0; i < nSw; i++)
    if (scanf("%lf", &sw[i]) != 1) return 1;
  double *st = malloc(sizeof(double) * 4 * nRep);
  for (int i = 0; i < 4 * nRep; i++)
    if (scanf("%lf", &st[i]) != 1) return 1;
  int ng = (int)floor(tEnd / step + 1e-9) + 1;
  double *gb = malloc(sizeof(double) * 3 * ng);
  long long events = 0;
  double checksum = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  for (int rep = 0; rep < nRep; rep++) {
    double s0 = st[4 * rep], s1 = st[4 * rep + 1], s2 = st[4 * rep + 2], c = st[4 * rep + 3], tt;
    double X = 0, Y = 0, Z = 0, S = 0, t = 0;
    int si = 0, gi = 0;
    double tSw = nSw > 0 ? sw[0] : INFINITY, tG = 0;
    double q1 = 0, q2 = 0;
    double a0 = 10 * S, a1 = 0.1 * X, a2 = 0, a3 = 0.05 * Y, a4 = 0, a5 = 0.1 * Z;
    for (;;) {
      double atot = a0 + a1 + a2 + a3 + a4 + a5;
      tt = 2091639 * s0 + c * 2.3283064365386963e-10; s0 = s1; s1 = s2; c = (double)(int)tt; s2 = tt - c;
      double tNext = atot > 0 ? t - log(1 - s2) / atot : INFINITY;
      if (tSw <= tNext && tSw < tEnd) {
        while (tG < tSw) { gb[gi] = X; gb[gi + ng] = Y; gb[gi + 2 * ng] = Z; gi++; tG = gi < ng ? gi * step : INFINITY; }
        t = tSw;
        S = (si & 1) ? 0 : 1;
        a0 = 10 * S;
        si++;
        tSw = si < nSw ? sw[si] : INFINITY;
        continue;
      }
      if (tNext > tEnd) {
        while (tG <= tEnd) { gb[gi] = X; gb[gi + ng] = Y; gb[gi + 2 * ng] = Z; gi++; tG = gi < ng ? gi * step : INFINITY; }
        break;
      }
      while (tG < tNext) { gb[gi] = X; gb[gi + ng] = Y; gb[gi + 2 * ng] = Z; gi++; tG = gi < ng ? gi * step : INFINITY; }
      t = tNext;
      tt = 2091639 * s0 + c * 2.3283064365386963e-10; s0 = s1; s1 = s2; c = (double)(int)tt; s2 = tt - c;
      double r = s2 * atot, cum;
      if (r < (cum = a0)) { X += 1; q1 = X * X; a1 = 0.1 * X; a2 = 10 * (q1 / (2500 + q1)); a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2))); }
      else if (r < (cum += a1)) { X -= 1; q1 = X * X; a1 = 0.1 * X; a2 = 10 * (q1 / (2500 + q1)); a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2))); }
      else if (r < (cum += a2)) { Y += 1; q2 = Y * Y; a3 = 0.05 * Y; a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2))); }
      else if (r < (cum += a3)) { Y -= 1; q2 = Y * Y; a3 = 0.05 * Y; a4 = 20 * ((q1 / (2500 + q1)) * (q2 / (10000 + q2))); }
      else if (r < (cum += a4)) { Z += 1; a5 = 0.1 * Z; }
      else { Z -= 1; a5 = 0.1 * Z; }
      events++;
    }
    checksum += gb[3 * ng - 1];
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  printf("%lld %.6f %.17g\n", events, (t1.tv_sec - t0.tv_sec) + (t1.tv_nsec - t0.tv_nsec) * 1e-9, checksum);
  return 0;
}
