/*
 * host_common.h — what every example host shares: the failure counter and
 * CHECK macro, must() for calls that have to succeed, the code units the
 * hosts use (pc, Msun, km/s), a counter-based hash for placing gas and
 * stars the same way on every rank, and the descriptors of the columns of
 * an array of structs.
 *
 * Include after <stdio.h>, <stdlib.h> and "ejecta.h". MPI hosts include
 * mpi_common.h instead, which includes this file and makes must() abort
 * every rank.
 */
#ifndef EJECTA_HOST_COMMON_H
#define EJECTA_HOST_COMMON_H

#include <stdint.h>
#include <string.h>

/* Checks that failed so far; a host prints "result pass" only at 0. */
static int failures = 0;

/* CHECK counts and reports a failed check without stopping the host. */
#define CHECK(cond, ...)                                   \
  do {                                                     \
    if (!(cond)) {                                         \
      fprintf(stderr, "FAIL %s:%d: ", __FILE__, __LINE__); \
      fprintf(stderr, __VA_ARGS__);                        \
      fprintf(stderr, "\n");                               \
      failures++;                                          \
    }                                                      \
  } while (0)

#ifndef HOST_ABORT
/* How a host stops on a call that had to succeed. */
#define HOST_ABORT() exit(2)
#endif

/* must stops the host when a call that has to succeed fails, with the
 * context's message (ctx may be 0 for calls without a context). */
static inline void must(ejecta_context ctx, int code, const char *what) {
  if (code == EJECTA_OK) return;
  char msg[512] = "";
  if (ctx) ejecta_last_error(ctx, msg, sizeof msg, NULL);
  fprintf(stderr, "FAIL %s: code %d: %s\n", what, code, msg);
  HOST_ABORT();
}

/* The hosts' code units: pc, Msun (IAU 2015 nominal solar mass parameter
 * over CODATA 2018 G), km/s; code time is 0.9778 Myr. */
#define PARSEC_CM 3.0856775814913673e18
#define MSUN_G 1.988409870698051e33
#define KM_S_CM 1e5
/* 1e51 erg in Msun (km/s)^2. */
#define FOE_CODE (1e51 / (MSUN_G * KM_S_CM * KM_S_CM))
/* Code time per Myr. */
#define CODE_TIME_PER_MYR (1.0 / 0.97779222)

static inline void use_host_units(ejecta_config *cfg) {
  cfg->length_cm = PARSEC_CM;
  cfg->mass_g = MSUN_G;
  cfg->velocity_cm_per_s = KM_S_CM;
}

/* A counter-based hash in [0, 1) (splitmix64 of (i, k)): the same value
 * for the same (i, k) on every rank; bench_test.go has its twin. */
static inline double unit_hash(uint64_t i, uint64_t k) {
  uint64_t z = i * 0x9E3779B97F4A7C15ull + k * 0xBF58476D1CE4E5B9ull + 0x94D049BB133111EBull;
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
  z ^= z >> 31;
  return (double)(z >> 11) / 9007199254740992.0;
}

/* The descriptor of the column at p of an array of structs of the given
 * size. */
static inline ejecta_field strided(void *p, size_t size, int32_t type) {
  ejecta_field f = {p, (int64_t)size, type, 0};
  return f;
}

/* DESCRIBE_GAS clears the ejecta_gas d and describes in it the columns
 * every example host's gas has, read from the array of structs g of n
 * elements: the members pos[3] (of element type pos_type), vel[3], mass,
 * density, energy (double) and id (int64_t). The host adds its species. */
#define DESCRIBE_GAS(d, g, n, pos_type)                                      \
  do {                                                                       \
    size_t size_ = sizeof (g)[0];                                            \
    memset(&(d), 0, sizeof(d));                                              \
    (d).count = (n);                                                         \
    for (int a_ = 0; a_ < 3; a_++) {                                         \
      (d).position[a_] = strided(&(g)[0].pos[a_], size_, (pos_type));        \
      (d).velocity[a_] = strided(&(g)[0].vel[a_], size_, EJECTA_FLOAT64);    \
    }                                                                        \
    (d).mass = strided(&(g)[0].mass, size_, EJECTA_FLOAT64);                 \
    (d).density = strided(&(g)[0].density, size_, EJECTA_FLOAT64);           \
    (d).internal_energy = strided(&(g)[0].energy, size_, EJECTA_FLOAT64);    \
    (d).id = strided(&(g)[0].id, size_, EJECTA_INT64);                       \
  } while (0)

/* The host's verdict: "result pass" and 0 when every check held. */
static inline int verdict(void) {
  if (failures) {
    printf("result fail (%d checks)\n", failures);
    return 1;
  }
  printf("result pass\n");
  return 0;
}

#endif
