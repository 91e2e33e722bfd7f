/*
 * Vectorised C reference for `npm run bench`: the same sweep as the WebAssembly
 * kernel (shared/spectra/kernel/sweepKernel.as), no sub-steps, oscillators in the
 * inner loop so the compiler vectorises across them: the recurrence, the running
 * peaks and the cheap test for steps that may hold a peak inside, then the exact
 * test for the steps that fail it (rare, out of the vector loop). Reads record and
 * coefficients from a file written by scripts/bench.ts; prints ns per
 * oscillator-step and max|u| of the first oscillator. Built with
 * -O3 -march=native -ffp-contract=off, so its arithmetic matches the kernels'.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static double now_ns(void) {
  struct timespec t;
  clock_gettime(CLOCK_MONOTONIC, &t);
  return t.tv_sec * 1e9 + t.tv_nsec;
}

/* The exact test of one step, in the kernels' order (sweepKernel.ts preciseCandidate). */
static int precise(double u0, double v0, double f0, double f1, double invH, double eu, double ev, double ea,
                   double mu, double mv, double ma, double om, double q, double sg, double iwd, double ik,
                   double ck, double kk) {
  const double s = (f1 - f0) * invH;
  const double p = u0 + f0 * ik - s * ck;
  const double r = (v0 + s * ik + sg * p) * iwd;
  const double w = sqrt(p * p + r * r), as = fabs(s), fm = fmax(fabs(f0), fabs(f1));
  const double wv = om * w, wa = kk * w;
  return fmin(eu + q * w, fm * ik + as * ck + w) > mu || fmin(ev + q * wv, as * ik + wv) > mv ||
         fmin(ea + q * wa, fm + wa) > ma;
}

static int sweep(int n, int count, double invH, const double *rec, const double *c, double *out) {
  const double *a11 = c, *a12 = c + count, *b1 = c + 2 * count, *c1 = c + 3 * count;
  const double *a21 = c + 4 * count, *a22 = c + 5 * count, *b2 = c + 6 * count, *c2 = c + 7 * count;
  const double *cc = c + 8 * count, *kk = c + 9 * count, *om = c + 10 * count, *q = c + 11 * count;
  const double *sg = c + 12 * count, *iwd = c + 13 * count, *ik = c + 14 * count, *ck = c + 15 * count;
  const double *bu = c + 16 * count, *bv = c + 17 * count;
  double *u = calloc(count, sizeof(double)), *v = calloc(count, sizeof(double));
  double *u0 = calloc(count, sizeof(double)), *v0 = calloc(count, sizeof(double));
  double *mu = calloc(count, sizeof(double)), *mv = calloc(count, sizeof(double)), *ma = calloc(count, sizeof(double));
  double *lu = calloc(count, sizeof(double)), *lv = calloc(count, sizeof(double)), *la = calloc(count, sizeof(double));
  double *eu = calloc(count, sizeof(double)), *ev = calloc(count, sizeof(double)), *ea = calloc(count, sizeof(double));
  double *ku = calloc(count, sizeof(double)), *ka = calloc(count, sizeof(double));
  long *flag = calloc(count, sizeof(long));
  int found = 0;
  for (int i = 1; i < n; i++) {
    const double f0 = rec[i - 1], f1 = rec[i], step = i;
    long any = 0;
    for (int o = 0; o < count; o++) {
      u0[o] = u[o];
      v0[o] = v[o];
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
      eu[o] = lu[o] > au ? lu[o] : au;
      ev[o] = lv[o] > av ? lv[o] : av;
      ea[o] = la[o] > aa ? la[o] : aa;
      const double wu = mu[o] + bu[o];
      const double w = wu + (mv[o] + bv[o] + sg[o] * wu) * iwd[o];
      const double mw = q[o] * w;
      const long hit = (eu[o] + mw > mu[o]) | (ev[o] + om[o] * mw > mv[o]) | (ea[o] + kk[o] * mw > ma[o]);
      flag[o] = hit;
      any |= hit;
      lu[o] = au;
      lv[o] = av;
      la[o] = aa;
    }
    if (any) {
      for (int o = 0; o < count; o++) {
        if (flag[o] && precise(u0[o], v0[o], f0, f1, invH, eu[o], ev[o], ea[o], mu[o], mv[o], ma[o], om[o], q[o],
                               sg[o], iwd[o], ik[o], ck[o], kk[o]))
          found++;
      }
    }
  }
  for (int o = 0; o < count; o++) {
    out[o] = mu[o];
    out[count + o] = mv[o];
    out[2 * count + o] = ma[o];
    out[3 * count + o] = ku[o];
    out[4 * count + o] = ka[o];
  }
  free(u); free(v); free(u0); free(v0); free(mu); free(mv); free(ma); free(lu); free(lv); free(la);
  free(eu); free(ev); free(ea); free(ku); free(ka); free(flag);
  return found;
}


int main(int argc, char **argv) {
  if (argc != 2) return 2;
  FILE *file = fopen(argv[1], "rb");
  if (!file) return 1;
  int header[2];
  double dt;
  if (fread(header, sizeof(int), 2, file) != 2) return 1;
  if (fread(&dt, sizeof(double), 1, file) != 1) return 1;
  const int n = header[0], count = header[1];
  double *rec = malloc(n * sizeof(double)), *coeffs = malloc(18 * count * sizeof(double));
  double *out = malloc(5 * count * sizeof(double));
  if (fread(rec, sizeof(double), n, file) != (size_t)n) return 1;
  if (fread(coeffs, sizeof(double), 18 * count, file) != (size_t)(18 * count)) return 1;
  fclose(file);
  double best = 1e300;
  int found = 0;
  for (int repeat = 0; repeat < 7; repeat++) {
    const double start = now_ns();
    found = sweep(n, count, 1 / dt, rec, coeffs, out);
    const double elapsed = (now_ns() - start) / ((double)(n - 1) * count);
    if (elapsed < best) best = elapsed;
  }
  printf("%.3f %.17g %d\n", best, out[0], found);
  return 0;
}
