/*
 * `npm run bench`: the compiled yardstick. A hand-written C event loop of the same models as the
 * bench cases in engine.bench.ts (same parameters, same algorithms: xoshiro128** streams, Marsaglia &
 * Tsang ziggurat exponentials and normals, a binary heap keyed on time), compiled at bench time into
 * tests/.output/ with -O2. Prints one JSON line: calls, blocked first attempts, events and the
 * seconds spent in the loop (set-up excluded), so the bench can quote JS/C ratios.
 *
 * usage: c-loop <case> <calls> <seed>
 */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

typedef struct { uint32_t a, b, c, d; } rng_t;

static uint64_t splitmix(uint64_t *x) {
  uint64_t z = (*x += 0x9e3779b97f4a7c15ULL);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

static void seed_rng(rng_t *r, uint64_t seed, uint64_t stream) {
  uint64_t x = seed;
  x = splitmix(&x) ^ stream;
  uint64_t w0 = splitmix(&x), w1 = splitmix(&x);
  r->a = (uint32_t)w0; r->b = (uint32_t)(w0 >> 32); r->c = (uint32_t)w1; r->d = (uint32_t)(w1 >> 32);
  if ((r->a | r->b | r->c | r->d) == 0) r->a = 1;
}

static inline uint32_t rotl(uint32_t x, int k) { return (x << k) | (x >> (32 - k)); }

static inline uint32_t next_u32(rng_t *r) {
  uint32_t out = rotl(r->b * 5, 7) * 9, t = r->b << 9;
  r->c ^= r->a; r->d ^= r->b; r->b ^= r->c; r->a ^= r->d; r->c ^= t; r->d = rotl(r->d, 11);
  return out;
}

static inline double uni(rng_t *r) { return next_u32(r) * 2.3283064365386963e-10 + 1.1641532182693481e-10; }

/* Ziggurat tables (Marsaglia & Tsang, J. Stat. Software 5(8), 2000). */
static double ke[256], we[256], fe[256], kn[128], wn[128], fn_[128];

static void zig_setup(void) {
  double de = 7.697117470131487, te = de, ve = 3.949659822581572e-3, m2 = 4294967296.0;
  double q = ve / exp(-de);
  ke[0] = (de / q) * m2; ke[1] = 0; we[0] = q / m2; we[255] = de / m2; fe[0] = 1; fe[255] = exp(-de);
  for (int i = 254; i >= 1; i--) {
    de = -log(ve / de + exp(-de));
    ke[i + 1] = (de / te) * m2; te = de; fe[i] = exp(-de); we[i] = de / m2;
  }
  double dn = 3.442619855899, tn = dn, vn = 9.91256303526217e-3, m1 = 2147483648.0;
  q = vn / exp(-0.5 * dn * dn);
  kn[0] = (dn / q) * m1; kn[1] = 0; wn[0] = q / m1; wn[127] = dn / m1; fn_[0] = 1; fn_[127] = exp(-0.5 * dn * dn);
  for (int i = 126; i >= 1; i--) {
    dn = sqrt(-2 * log(vn / dn + exp(-0.5 * dn * dn)));
    kn[i + 1] = (dn / tn) * m1; tn = dn; fn_[i] = exp(-0.5 * dn * dn); wn[i] = dn / m1;
  }
}

static double zexp(rng_t *r) {
  uint32_t jz = next_u32(r);
  int iz = jz & 255;
  if (jz < ke[iz]) return jz * we[iz];
  for (;;) {
    if (iz == 0) return 7.697117470131487 - log(uni(r));
    double x = jz * we[iz];
    if (fe[iz] + uni(r) * (fe[iz - 1] - fe[iz]) < exp(-x)) return x;
    jz = next_u32(r); iz = jz & 255;
    if (jz < ke[iz]) return jz * we[iz];
  }
}

static double znorm(rng_t *r) {
  int32_t hz = (int32_t)next_u32(r);
  int iz = hz & 127;
  if (fabs((double)hz) < kn[iz]) return hz * wn[iz];
  for (;;) {
    double x = hz * wn[iz];
    if (iz == 0) {
      double tx, ty;
      do { tx = -log(uni(r)) / 3.442619855899; ty = -log(uni(r)); } while (ty + ty < tx * tx);
      return hz > 0 ? 3.442619855899 + tx : -3.442619855899 - tx;
    }
    if (fn_[iz] + uni(r) * (fn_[iz - 1] - fn_[iz]) < exp(-0.5 * x * x)) return x;
    hz = (int32_t)next_u32(r); iz = hz & 127;
    if (fabs((double)hz) < kn[iz]) return hz * wn[iz];
  }
}

/* Heap keyed on time; data = payload * 4 + kind. */
static double *ht, *hd;
static int hn, hcap;

static inline void push(double time, double data) {
  if (hn == hcap) { hcap *= 2; ht = realloc(ht, hcap * sizeof(double)); hd = realloc(hd, hcap * sizeof(double)); }
  int i = hn++;
  while (i > 0) {
    int p = (i - 1) >> 1;
    if (ht[p] <= time) break;
    ht[i] = ht[p]; hd[i] = hd[p]; i = p;
  }
  ht[i] = time; hd[i] = data;
}

static inline void pop(void) {
  int n = --hn;
  if (n == 0) return;
  double time = ht[n], data = hd[n];
  int i = 0;
  for (;;) {
    int c = 2 * i + 1;
    if (c >= n) break;
    if (c + 1 < n && ht[c + 1] < ht[c]) c++;
    if (time <= ht[c]) break;
    ht[i] = ht[c]; hd[i] = hd[c]; i = c;
  }
  ht[i] = time; hd[i] = data;
}

enum { ARR_POISSON, ARR_H2, ARR_MMPP, ARR_OVERFLOW };
enum { HOLD_EXP, HOLD_LOGNORMAL };

typedef struct {
  const char *name;
  int servers, arrivals, holding;
  double rate;                 /* poisson / overflow total */
  double h2p, h2m1, h2m2;      /* H2 interarrival: branch probability and means */
  int phases; double rates[3], sw[3][3];
  int primaries; double ptraffic[2]; int pservers[2];
  double holdMean, holdCv;
  double persistence, retryMean; int maxAttempts;
  long warmup;
} model_t;

/* Keep in step with the cases of simulation.bench.ts. */
static const model_t models[] = {
  {"poisson", 30, ARR_POISSON, HOLD_EXP, 20, 0, 0, 0, 0, {0}, {{0}}, 0, {0}, {0}, 1, 0, 0, 0, 0, 0},
  {"lognormal", 30, ARR_POISSON, HOLD_LOGNORMAL, 20, 0, 0, 0, 0, {0}, {{0}}, 0, {0}, {0}, 1, 1, 0, 0, 0, 0},
  /* H2 with mean 0.05 and scv 4, balanced means (Whitt 1982): p = (1 + sqrt(3/5)) / 2. */
  {"h2", 30, ARR_H2, HOLD_EXP, 0, 0.8872983346207417, 0.02817762696129453, 0.22182237303870545, 0, {0}, {{0}}, 0, {0}, {0}, 1, 0, 0, 0, 0, 0},
  {"on-off", 30, ARR_MMPP, HOLD_EXP, 0, 0, 0, 0, 2, {40, 0}, {{0, 1}, {1, 0}}, 0, {0}, {0}, 1, 0, 0, 0, 0, 0},
  {"mmpp", 30, ARR_MMPP, HOLD_EXP, 0, 0, 0, 0, 3, {10, 20, 40}, {{0, 0.5, 0.2}, {0.4, 0, 0.4}, {0.3, 0.6, 0}}, 0, {0}, {0}, 1, 0, 0, 0, 0, 0},
  {"retrials", 30, ARR_POISSON, HOLD_EXP, 24, 0, 0, 0, 0, {0}, {{0}}, 0, {0}, {0}, 1, 0, 0.7, 0.5, 10, 0},
  {"overflow", 20, ARR_OVERFLOW, HOLD_EXP, 0, 0, 0, 0, 0, {0}, {{0}}, 2, {20, 12}, {20, 12}, 1, 0, 0, 0, 0, 0},
  {"large-n", 10000, ARR_POISSON, HOLD_EXP, 9000, 0, 0, 0, 0, {0}, {{0}}, 0, {0}, {0}, 1, 0, 0, 0, 0, 100000},
};

int main(int argc, char **argv) {
  if (argc < 4) { fprintf(stderr, "usage: c-loop <case> <calls> <seed>\n"); return 2; }
  const model_t *m = NULL;
  for (size_t i = 0; i < sizeof models / sizeof models[0]; i++) if (strcmp(models[i].name, argv[1]) == 0) m = &models[i];
  if (!m) { fprintf(stderr, "unknown case %s\n", argv[1]); return 2; }
  long target = atol(argv[2]);
  uint64_t seed = strtoull(argv[3], NULL, 10);
  zig_setup();
  rng_t ar, hr, rr;
  seed_rng(&ar, seed, 0); seed_rng(&hr, seed, 1); seed_rng(&rr, seed, 2);
  hcap = 64; ht = malloc(hcap * sizeof(double)); hd = malloc(hcap * sizeof(double)); hn = 0;
  double *occ = calloc(m->servers + 1, sizeof(double));
  int N = m->servers, busy = 0, orbit = 0, phase = 0;
  int pbusy[2] = {0, 0};
  double out[3], jump[3][3], choice[2];
  double rate = m->rate, s2 = log(1 + m->holdCv * m->holdCv), mu = log(m->holdMean) - s2 / 2, sg = sqrt(s2);
  for (int i = 0; i < m->phases; i++) {
    double o = 0, s = 0;
    for (int j = 0; j < m->phases; j++) if (j != i) o += m->sw[i][j];
    out[i] = o;
    for (int j = 0; j < m->phases; j++) { if (j != i) s += m->sw[i][j]; jump[i][j] = s / o; }
    jump[i][m->phases - 1] = 1;
  }
  if (m->arrivals == ARR_OVERFLOW) {
    rate = m->ptraffic[0] + m->ptraffic[1];
    choice[0] = m->ptraffic[0] / rate; choice[1] = 1;
  }
  double t = 0, nextPhase = INFINITY, nextArrival;
  long calls = 0, blocked = 0, events = 0, seen = 0;
  double busyIntegral = 0;
  struct timespec t0, t1;
  clock_gettime(CLOCK_MONOTONIC, &t0);
  if (m->arrivals == ARR_MMPP) {
    phase = 0;
    nextPhase = zexp(&ar) / out[0];
    nextArrival = m->rates[0] > 0 ? zexp(&ar) / m->rates[0] : INFINITY;
  } else if (m->arrivals == ARR_H2) nextArrival = (uni(&ar) < m->h2p ? m->h2m1 : m->h2m2) * zexp(&ar);
  else nextArrival = zexp(&ar) / rate;
  int measuring = m->warmup == 0;
  for (;;) {
    double next = hn > 0 ? ht[0] : INFINITY;
    int source = 0;
    if (nextPhase < next) { next = nextPhase; source = 1; }
    if (nextArrival < next) { next = nextArrival; source = 2; }
    double dt = next - t;
    occ[busy] += dt; busyIntegral += busy * dt;
    t = next;
    events++;
    if (source == 1) {
      double u = uni(&ar);
      int j = 0;
      while (u > jump[phase][j]) j++;
      phase = j;
      nextPhase = t + zexp(&ar) / out[phase];
      nextArrival = m->rates[phase] > 0 ? t + zexp(&ar) / m->rates[phase] : INFINITY;
      continue;
    }
    int tries = 0, attempt = 1, fresh = 1;
    if (source == 2) {
      if (m->arrivals == ARR_OVERFLOW) {
        int i = uni(&ar) > choice[0];
        if (pbusy[i] < m->pservers[i]) {
          pbusy[i]++;
          push(t + m->holdMean * zexp(&hr), i * 4 + 1);
          nextArrival = t + zexp(&ar) / rate;
          continue;
        }
      }
      if (!measuring && seen >= m->warmup) {
        measuring = 1; calls = blocked = 0; busyIntegral = 0;
        memset(occ, 0, (N + 1) * sizeof(double));
      }
      if (measuring && calls >= target) break;
      seen++; calls++; tries = 1;
    } else {
      double data = hd[0];
      pop();
      int k = (int)fmod(data, 4);
      double payload = (data - k) / 4;
      if (k == 0) busy--;
      else if (k == 1) pbusy[(int)payload]--;
      else { orbit--; tries = 1; attempt = (int)payload + 1; fresh = 0; }
    }
    if (tries) {
      if (busy < N) {
        busy++;
        double h = m->holding == HOLD_EXP ? m->holdMean * zexp(&hr) : exp(mu + sg * znorm(&hr));
        push(t + h, 0);
      } else {
        if (fresh) blocked++;
        if (m->persistence > 0 && attempt < m->maxAttempts && uni(&rr) < m->persistence) {
          orbit++;
          push(t + m->retryMean * zexp(&rr), attempt * 4 + 2);
        }
      }
    }
    if (source == 2) {
      if (m->arrivals == ARR_MMPP) nextArrival = m->rates[phase] > 0 ? t + zexp(&ar) / m->rates[phase] : INFINITY;
      else if (m->arrivals == ARR_H2) nextArrival = t + (uni(&ar) < m->h2p ? m->h2m1 : m->h2m2) * zexp(&ar);
      else nextArrival = t + zexp(&ar) / rate;
    }
  }
  clock_gettime(CLOCK_MONOTONIC, &t1);
  double seconds = (t1.tv_sec - t0.tv_sec) + (t1.tv_nsec - t0.tv_nsec) * 1e-9;
  printf("{\"calls\":%ld,\"blocked\":%ld,\"events\":%ld,\"seconds\":%.6f,\"carried\":%.6f}\n", calls, blocked, events, seconds, busyIntegral / t);
  free(ht); free(hd); free(occ);
  return 0;
}
