/*
 * The reference point of `npm run bench`: a plain C loop over the same compiled finite MDP as
 * the engine (written by export-mdp.mjs), with the same generator (xoshiro128**), the same
 * seeding of each episode's ENV and POLICY streams (src/engine/streams.ts) and the same
 * sampling (one uniform per draw, scan of a cumulative table; a guide table for the start).
 * For a given seed it must produce the engine's returns bit for bit; the bench compares a hash
 * of all returns and lengths.
 *
 * Build: cc -O2 -ffp-contract=off -o rollout rollout.c -lm (-ffp-contract=off: no fused
 * multiply-add, so the discounted sums round exactly as JavaScript's do)
 * Usage: rollout FILE SEED FIRST COUNT   prints one JSON object on stdout.
 */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <sys/resource.h>

typedef struct {
  int32_t states, actions, outcomes, starts, horizon, start;
  double discount;
  uint8_t *terminal;
  int32_t *outcome_start, *outcome_next, *start_states, *deterministic_action;
  double *outcome_cumulative, *outcome_reward, *start_cumulative, *policy_cumulative;
} Mdp;

typedef struct { uint32_t s0, s1, s2, s3; } Rng;

static uint32_t rotl(uint32_t x, int k) { return (x << k) | (x >> (32 - k)); }

static uint32_t next_u32(Rng *r) {
  uint32_t result = rotl(r->s1 * 5u, 7) * 9u;
  uint32_t t = r->s1 << 9;
  r->s2 ^= r->s0;
  r->s3 ^= r->s1;
  r->s1 ^= r->s2;
  r->s0 ^= r->s3;
  r->s2 ^= t;
  r->s3 = rotl(r->s3, 11);
  return result;
}

static double uniform(Rng *r) { return (double)next_u32(r) * 2.3283064365386963e-10; }

static uint32_t mix32(uint32_t x) {
  x ^= x >> 16;
  x *= 0x7feb352du;
  x ^= x >> 15;
  x *= 0x846ca68bu;
  x ^= x >> 16;
  return x;
}

/* streams.ts seedStream: (seed, stream, episode) packed into 128 bits, two rounds of mixing. */
static void seed_stream(Rng *r, uint64_t seed, uint32_t stream, uint64_t episode) {
  uint32_t a = (uint32_t)seed;
  uint32_t b = (uint32_t)(seed >> 32) | (stream << 24);
  uint32_t c = (uint32_t)episode;
  uint32_t d = (uint32_t)(episode >> 32) ^ 0x9e3779b9u;
  for (int round = 0; round < 2; round++) {
    b ^= mix32(a ^ 0x6a09e667u);
    c ^= mix32(b ^ 0xbb67ae85u);
    d ^= mix32(c ^ 0x3c6ef372u);
    a ^= mix32(d ^ 0xa54ff53au);
  }
  r->s0 = a; r->s1 = b; r->s2 = c; r->s3 = d;
  if ((a | b | c | d) == 0) r->s3 = 1;
}

static void *read_array(FILE *f, size_t count, size_t size) {
  void *p = malloc(count * size + 1);
  if (!p || fread(p, size, count, f) != count) { fprintf(stderr, "rollout: short read\n"); exit(2); }
  return p;
}

static Mdp load(const char *path) {
  FILE *f = fopen(path, "rb");
  if (!f) { fprintf(stderr, "rollout: cannot open %s\n", path); exit(2); }
  char magic[8];
  Mdp m;
  int32_t header[6];
  if (fread(magic, 1, 8, f) != 8 || memcmp(magic, "RKMDP01\n", 8) != 0) { fprintf(stderr, "rollout: %s is not an exported MDP\n", path); exit(2); }
  if (fread(header, 4, 6, f) != 6 || fread(&m.discount, 8, 1, f) != 1) { fprintf(stderr, "rollout: short header\n"); exit(2); }
  m.states = header[0]; m.actions = header[1]; m.outcomes = header[2];
  m.starts = header[3]; m.horizon = header[4]; m.start = header[5];
  size_t sa = (size_t)m.states * m.actions;
  m.terminal = read_array(f, m.states, 1);
  m.outcome_start = read_array(f, sa + 1, 4);
  m.outcome_next = read_array(f, m.outcomes, 4);
  m.outcome_cumulative = read_array(f, m.outcomes, 8);
  m.outcome_reward = read_array(f, m.outcomes, 8);
  m.start_states = read_array(f, m.starts, 4);
  m.start_cumulative = read_array(f, m.starts, 8);
  m.policy_cumulative = read_array(f, sa, 8);
  m.deterministic_action = read_array(f, m.states, 4);
  fclose(f);
  return m;
}

static double clock_seconds(clockid_t clock) {
  struct timespec ts;
  clock_gettime(clock, &ts);
  return ts.tv_sec + ts.tv_nsec * 1e-9;
}

int main(int argc, char **argv) {
  if (argc != 5) { fprintf(stderr, "usage: rollout FILE SEED FIRST COUNT\n"); return 2; }
  Mdp m = load(argv[1]);
  uint64_t seed = strtoull(argv[2], NULL, 10);
  uint64_t first = strtoull(argv[3], NULL, 10);
  long count = strtol(argv[4], NULL, 10);
  double *returns = malloc(sizeof(double) * (count > 0 ? count : 1));
  uint32_t *lengths = malloc(sizeof(uint32_t) * (count > 0 ? count : 1));
  const int32_t A = m.actions;
  const int32_t last_start = m.starts - 1;
  Rng env, pol;
  /* guide[j]: the first k whose running sum exceeds (j - 1)/G (finite-rollout.ts, startSupport) */
  int32_t *guide = malloc(sizeof(int32_t) * (m.starts > 0 ? m.starts : 1));
  for (int32_t j = 0, k = 0; j < m.starts; j++) {
    double below = (double)(j - 1) / m.starts;
    while (k < m.starts - 1 && m.start_cumulative[k] <= below) k++;
    guide[j] = k;
  }
  long long steps = 0;

  double t0 = clock_seconds(CLOCK_MONOTONIC), c0 = clock_seconds(CLOCK_PROCESS_CPUTIME_ID);
  for (long i = 0; i < count; i++) {
    uint64_t episode = first + (uint64_t)i;
    seed_stream(&env, seed, 0, episode);
    int policy_seeded = 0; /* the POLICY stream is seeded on first use, as the engine does */
    int32_t s = m.start;
    if (s < 0) {
      double u = uniform(&env);
      /* the engine's guide table: start the scan at the bucket's lower bound (same answer) */
      int32_t j = (int32_t)floor(u * m.starts);
      int32_t k = guide[j < m.starts - 1 ? j : m.starts - 1];
      while (k < last_start && u >= m.start_cumulative[k]) k++;
      s = m.start_states[k];
    }
    double g = 0, weight = 1;
    int32_t t = 0;
    if (!m.terminal[s]) {
      while (t < m.horizon) {
        int32_t a = m.deterministic_action[s];
        if (a < 0) {
          if (!policy_seeded) { seed_stream(&pol, seed, 1, episode); policy_seeded = 1; }
          double u = uniform(&pol);
          const double *row = m.policy_cumulative + (size_t)s * A;
          a = 0;
          while (a < A - 1 && u >= row[a]) a++;
        }
        int32_t sa = s * A + a;
        int32_t k = m.outcome_start[sa];
        int32_t last = m.outcome_start[sa + 1] - 1;
        double u = uniform(&env);
        while (k < last && u >= m.outcome_cumulative[k]) k++;
        g += weight * m.outcome_reward[k];
        weight *= m.discount;
        s = m.outcome_next[k];
        t++;
        if (m.terminal[s]) break;
      }
    }
    returns[i] = g;
    lengths[i] = (uint32_t)t;
    steps += t;
  }
  double seconds = clock_seconds(CLOCK_MONOTONIC) - t0, cpu_seconds = clock_seconds(CLOCK_PROCESS_CPUTIME_ID) - c0;

  /* Checks outside the timed loop: the sum in episode order and a hash of every return's bits. */
  double sum = 0;
  uint32_t hash = 0x811c9dc5u;
  for (long i = 0; i < count; i++) {
    uint64_t bits;
    memcpy(&bits, &returns[i], 8);
    sum += returns[i];
    hash = (hash ^ (uint32_t)bits) * 0x01000193u;
    hash = (hash ^ (uint32_t)(bits >> 32)) * 0x01000193u;
    hash = (hash ^ lengths[i]) * 0x01000193u;
  }
  struct rusage usage;
  getrusage(RUSAGE_SELF, &usage);
  printf("{\"episodes\":%ld,\"steps\":%lld,\"seconds\":%.9f,\"cpuSeconds\":%.9f,\"sum\":%.17g,\"hash\":%u,\"maxRssMb\":%.1f}\n",
         count, steps, seconds, cpu_seconds, sum, hash, usage.ru_maxrss / 1024.0);
  return 0;
}
