/*
 * Vectorised C reference for `npm run bench`: the same sweep as the WebAssembly
 * kernel (shared/spectra/kernel/sweepKernel.as), no sub-steps, oscillators in the
 * inner loop so the compiler vectorises across them. Reads record and
 * coefficients from a file written by scripts/bench.ts; prints ns per
 * oscillator-step and max|u| of the first oscillator. Built with
 * -O3 -march=native -ffp-contract=off, so its arithmetic matches the kernels'.
 */
#include <stdio.h>
#include <stdlib.h>
#include <math.h>
#include <time.h>

static double now_ns(void) {
  struct timespec ts;
  clock_gettime(CLOCK_MONOTONIC, &ts);
  return ts.tv_sec * 1e9 + ts.tv_nsec;
}

static void sweep(int n, int count, const double *rec, const double *c, double *out) {
  const double *a11 = c, *a12 = c + count, *b1 = c + 2 * count, *c1 = c + 3 * count;
  const double *a21 = c + 4 * count, *a22 = c + 5 * count, *b2 = c + 6 * count, *c2 = c + 7 * count;
  const double *cc = c + 8 * count, *kk = c + 9 * count;
  double *u = calloc(count, sizeof(double)), *v = calloc(count, sizeof(double));
  double *mu = calloc(count, sizeof(double)), *mv = calloc(count, sizeof(double)), *ma = calloc(count, sizeof(double));
  double *ku = calloc(count, sizeof(double)), *ka = calloc(count, sizeof(double));
  for (int i = 1; i < n; i++) {
    const double f0 = rec[i - 1], f1 = rec[i], step = i;
    for (int o = 0; o < count; o++) {
      const double nu = a11[o] * u[o] + a12[o] * v[o] + b1[o] * f0 + c1[o] * f1;
      const double nv = a21[o] * u[o] + a22[o] * v[o] + b2[o] * f0 + c2[o] * f1;
      u[o] = nu;
      v[o] = nv;
      const double au = fabs(nu), av = fabs(nv), aa = fabs(cc[o] * nv + kk[o] * nu);
      ku[o] = au > mu[o] ? step : ku[o];
      mu[o] = au > mu[o] ? au : mu[o];
      mv[o] = av > mv[o] ? av : mv[o];
      ka[o] = aa > ma[o] ? step : ka[o];
      ma[o] = aa > ma[o] ? aa : ma[o];
    }
  }
  for (int o = 0; o < count; o++) {
    out[o] = mu[o];
    out[count + o] = mv[o];
    out[2 * count + o] = ma[o];
    out[3 * count + o] = ku[o];
    out[4 * count + o] = ka[o];
  }
  free(u); free(v); free(mu); free(mv); free(ma); free(ku); free(ka);
}

int main(int argc, char **argv) {
  if (argc != 2) return 2;
  FILE *file = fopen(argv[1], "rb");
  if (!file) return 1;
  int header[2];
  if (fread(header, sizeof(int), 2, file) != 2) return 1;
  const int n = header[0], count = header[1];
  double *rec = malloc(n * sizeof(double)), *coeffs = malloc(10 * count * sizeof(double));
  double *out = malloc(5 * count * sizeof(double));
  if (fread(rec, sizeof(double), n, file) != (size_t)n) return 1;
  if (fread(coeffs, sizeof(double), 10 * count, file) != (size_t)(10 * count)) return 1;
  fclose(file);
  double best = 1e300;
  for (int repeat = 0; repeat < 7; repeat++) {
    const double start = now_ns();
    sweep(n, count, rec, coeffs, out);
    const double elapsed = (now_ns() - start) / ((double)(n - 1) * count);
    if (elapsed < best) best = elapsed;
  }
  printf("%.3f %.17g\n", best, out[0]);
  return 0;
}
