/*
 * population_host.c — a C host that hands ejecta only its star particles:
 * ejecta works out what they release from a stellar population (built-in,
 * or the yields table named on the command line), draws their supernovae,
 * couples every channel and the host applies the records, takes each
 * star's mass loss off it and passes its carried energy back. Every step's
 * ledger must balance and the gas must gain exactly what the stars lost.
 * Bad input through the ABI must give error codes, never a crash. Prints
 * key=value lines and "result pass" on success; exits non-zero otherwise.
 *
 *   population_host [yields_table.csv]
 *
 * Code units: pc, Msun, km/s (code time 0.9778 Myr).
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ejecta.h"
#include "host_common.h"

#define SIDE 8             /* gas lattice side: SIDE^3 elements */
#define N_GAS (SIDE * SIDE * SIDE)
#define BOX 16.0           /* periodic box side, pc */
#define N_STARS 3
#define N_STEPS 6

typedef struct gas_element {
  double pos[3];
  double vel[3];
  double mass;
  double density;
  double energy;  /* specific internal energy, (km/s)^2 */
  double metals;  /* metal mass fraction */
  int64_t id;
} gas_element;

static ejecta_field field(void *p, int32_t type) { return strided(p, sizeof(gas_element), type); }

static double gas_mass(const gas_element *g) {
  double m = 0;
  for (int i = 0; i < N_GAS; i++) m += g[i].mass;
  return m;
}

/* Bad input to the population calls: each must return its documented
 * code and leave a message. */
static void bad_input(ejecta_context ctx, const ejecta_star_particle *good) {
  char msg[512];
  ejecta_population_config pc;
  CHECK(ejecta_population_defaults(NULL) == EJECTA_ERR_NULL_POINTER, "defaults(NULL)");
  CHECK(ejecta_enable_population(ctx, NULL) == EJECTA_ERR_NULL_POINTER, "enable(NULL)");
  ejecta_population_defaults(&pc);
  snprintf(pc.imf, sizeof pc.imf, "%s", "bottom-light");
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_UNKNOWN_NAME, "unknown IMF");
  ejecta_last_error(ctx, msg, sizeof msg, NULL);
  printf("imf_error=%s\n", msg);
  ejecta_population_defaults(&pc);
  pc.lightest_star_mass = NAN;
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_INVALID_ARGUMENT, "NaN IMF mass");
  ejecta_population_defaults(&pc);
  CHECK(pc.lightest_star_mass == 0.1 && pc.heaviest_star_mass == 100 && pc.max_supernovae_per_step == 10 &&
            strcmp(pc.imf, "kroupa") == 0 && pc.winds == 1 && pc.radiation_pressure == 1 && pc.photoionization == 1 &&
            pc.photoelectric_heating == 1 && pc.delayed_cooling == 0 && pc.yields_table == NULL,
        "population defaults as ejecta.h states them");
  pc.max_supernovae_per_step = 0; /* 0 means 0, which has no meaning: refused */
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_INVALID_ARGUMENT, "zero supernovae per step");
  ejecta_population_defaults(&pc);
  pc.lightest_star_mass = 0;
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_INVALID_ARGUMENT, "zero lightest star");
  ejecta_population_defaults(&pc);
  pc.imf[0] = 0;
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_UNKNOWN_NAME, "empty IMF");
  ejecta_population_defaults(&pc);
  pc.winds = 5;
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_INVALID_ARGUMENT, "switch 5");
  ejecta_population_defaults(&pc);
  pc.yields_table = "/nonexistent/yields.csv";
  CHECK(ejecta_enable_population(ctx, &pc) == EJECTA_ERR_YIELDS_TABLE, "missing table");
  ejecta_last_error(ctx, msg, sizeof msg, NULL);
  printf("table_error=%s\n", msg);

  ejecta_star_particle s = *good;
  CHECK(ejecta_step_population(ctx, NULL, 1, 1.0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_NULL_POINTER, "NULL stars");
  CHECK(ejecta_step_population(ctx, &s, 0, 1.0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "zero stars");
  CHECK(ejecta_step_population(ctx, &s, 1, NAN, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_BAD_VALUE, "NaN dt");
  CHECK(ejecta_step_population(ctx, &s, 1, -1.0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_BAD_VALUE, "negative dt");
  CHECK(ejecta_step_population(ctx, &s, 1, 1.0, -4, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "negative step index");
  CHECK(ejecta_step_population(ctx, &s, 1, 1.0, 0, 3, NULL, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "unknown mode");
  s.formed_mass = -1;
  CHECK(ejecta_step_population(ctx, &s, 1, 1.0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_BAD_VALUE, "negative formed mass");
  s = *good;
  s.age = NAN;
  CHECK(ejecta_step_population(ctx, &s, 1, 1.0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_BAD_VALUE, "NaN age");
  ejecta_last_error(ctx, msg, sizeof msg, NULL);
  printf("star_error=%s\n", msg);

  int64_t written = -1;
  double dt = -1;
  ejecta_ledger led;
  CHECK(ejecta_copy_star_results(ctx, NULL, 0, NULL) == EJECTA_ERR_NULL_POINTER, "results written NULL");
  CHECK(ejecta_copy_star_results(ctx, NULL, -1, &written) == EJECTA_ERR_INVALID_ARGUMENT, "results negative capacity");
  CHECK(ejecta_suggested_step(ctx, NULL) == EJECTA_ERR_NULL_POINTER, "suggested NULL");
  CHECK(ejecta_get_channel_ledger(ctx, EJECTA_NUM_STEP_CHANNELS, &led) == EJECTA_ERR_INVALID_ARGUMENT, "channel out of range");
  CHECK(ejecta_suggested_step(0, &dt) == EJECTA_ERR_INVALID_CONTEXT, "zero handle");

  /* A context without a population. */
  ejecta_config cfg;
  ejecta_config_defaults(&cfg);
  ejecta_context bare = 0;
  must(0, ejecta_create(&cfg, &bare, msg, sizeof msg), "create bare");
  CHECK(ejecta_step_population(bare, good, 1, 1.0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_NO_POPULATION, "no population");
  ejecta_destroy(&bare);
}

int main(int argc, char **argv) {
  const char *table = argc > 1 ? argv[1] : NULL;
  gas_element *gas = calloc(N_GAS, sizeof *gas);
  /* Gas: a lattice in a periodic box, n_H ~ 100 cm^-3 (3.45 Msun/pc^3,
   * 1.4 m_p n_H), ~1e4 K. */
  double h = BOX / SIDE;
  for (int i = 0; i < N_GAS; i++) {
    int ix = i % SIDE, iy = (i / SIDE) % SIDE, iz = i / (SIDE * SIDE);
    gas[i].pos[0] = (ix + 0.5) * h;
    gas[i].pos[1] = (iy + 0.5) * h;
    gas[i].pos[2] = (iz + 0.5) * h;
    gas[i].vel[0] = 0.1 * (ix - SIDE / 2);
    gas[i].density = 3.45;
    gas[i].mass = gas[i].density * h * h * h;
    gas[i].energy = 100.0;
    gas[i].metals = 0.0134;
    gas[i].id = 1 + 2 * (int64_t)i;
  }

  ejecta_config cfg;
  must(0, ejecta_config_defaults(&cfg), "defaults");
  use_host_units(&cfg);
  cfg.seed = 12345;
  cfg.worker_threads = 2;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = BOX;
  char err[256];
  ejecta_context ctx = 0;
  if (ejecta_create(&cfg, &ctx, err, sizeof err) != EJECTA_OK) {
    fprintf(stderr, "FAIL create: %s\n", err);
    return 2;
  }
  ejecta_gas desc;
  DESCRIBE_GAS(desc, gas, N_GAS, EJECTA_FLOAT64);
  int32_t species[1] = {EJECTA_SPECIES_METALS};
  ejecta_field fractions[1] = {field(&gas[0].metals, EJECTA_FLOAT64)};
  desc.n_species = 1;
  desc.species = species;
  desc.species_fraction = fractions;
  must(ctx, ejecta_bind_gas(ctx, &desc), "bind");

  ejecta_population_config pc;
  must(0, ejecta_population_defaults(&pc), "population defaults");
  pc.yields_table = table; /* NULL: the built-in Kroupa population */
  pc.delayed_cooling = 1;
  must(ctx, ejecta_enable_population(ctx, &pc), "enable population");

  /* Three clusters of different ages, 2e3-1e4 Msun formed. */
  const double myr = CODE_TIME_PER_MYR;
  ejecta_star_particle stars[N_STARS];
  memset(stars, 0, sizeof stars);
  double where[N_STARS][3] = {{8.1, 7.9, 8.3}, {0.4, 15.6, 4.0}, {12.0, 3.3, 9.9}};
  double formed[N_STARS] = {1e4, 5e3, 2e3};
  double age_myr[N_STARS] = {0.0, 3.0, 20.0};
  for (int s = 0; s < N_STARS; s++) {
    stars[s].id = 900 + s;
    for (int a = 0; a < 3; a++) stars[s].position[a] = where[s][a];
    stars[s].velocity[1] = 2.0 * s;
    stars[s].formed_mass = stars[s].mass = formed[s];
    stars[s].metallicity = 0.0134;
    stars[s].age = age_myr[s] * myr;
  }

  double dt = 1.5 * myr, lost = 0, m0 = gas_mass(gas);
  int64_t sn_cc = 0, sn_ia = 0, n_records = 0;
  double max_suggested = 0;
  for (int64_t k = 0; k < N_STEPS; k++) {
    int code = ejecta_step_population(ctx, stars, N_STARS, dt, k, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL);
    must(ctx, code, "population step");
    ejecta_ledger led;
    must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
    char imb[256];
    code = ejecta_ledger_balanced(&led, 1e-12, imb, sizeof imb);
    CHECK(code == EJECTA_OK, "step %lld ledger: %s", (long long)k, imb);
    CHECK(led.stars == N_STARS * EJECTA_NUM_STEP_CHANNELS, "ledger stars %lld", (long long)led.stars);
    double channel_mass = 0;
    for (int32_t c = 0; c < EJECTA_NUM_STEP_CHANNELS; c++) {
      ejecta_ledger cl;
      must(ctx, ejecta_get_channel_ledger(ctx, c, &cl), "channel ledger");
      channel_mass += cl.released.mass;
    }
    CHECK(fabs(channel_mass - led.released.mass) <= 1e-12 * led.released.mass, "channel ledgers add up");

    ejecta_star_result res[N_STARS];
    int64_t written = 0;
    CHECK(ejecta_copy_star_results(ctx, res, 1, &written) == EJECTA_ERR_BUFFER_TOO_SMALL && written == N_STARS, "short results buffer");
    must(ctx, ejecta_copy_star_results(ctx, res, N_STARS, &written), "results");
    CHECK(written == N_STARS, "results written %lld", (long long)written);
    double step_loss = 0;
    for (int s = 0; s < N_STARS; s++) {
      CHECK(res[s].id == stars[s].id, "result %d names star %lld", s, (long long)res[s].id);
      CHECK(res[s].mass_loss >= 0 && res[s].carried_energy >= 0, "result %d non-negative", s);
      step_loss += res[s].mass_loss;
      sn_cc += res[s].supernovae_cc;
      sn_ia += res[s].supernovae_ia;
    }
    CHECK(fabs(step_loss - led.deposited.mass) <= 1e-12 * step_loss, "step %lld: mass loss %.17g, deposited %.17g",
          (long long)k, step_loss, led.deposited.mass);
    double suggested = -1;
    must(ctx, ejecta_suggested_step(ctx, &suggested), "suggested step");
    CHECK(suggested >= 0 && suggested < dt, "suggested step %g", suggested);
    if (suggested > max_suggested) max_suggested = suggested;

    int64_t n = 0;
    must(ctx, ejecta_record_count(ctx, &n), "record count");
    n_records += n;
    ejecta_apply_report rep;
    must(ctx, ejecta_apply_step_records(ctx, &rep), "apply");
    int64_t n_touched = 0;
    CHECK(ejecta_copy_touched(ctx, NULL, 0, &n_touched) == EJECTA_ERR_BUFFER_TOO_SMALL && n_touched == rep.elements,
          "touched count");

    for (int s = 0; s < N_STARS; s++) {
      stars[s].mass -= res[s].mass_loss;
      stars[s].carried_energy = res[s].carried_energy;
      stars[s].age += dt;
    }
    lost += step_loss;
  }
  double gained = gas_mass(gas) - m0;
  printf("steps=%d records=%lld supernovae_cc=%lld supernovae_ia=%lld max_suggested=%.17g\n", N_STEPS,
         (long long)n_records, (long long)sn_cc, (long long)sn_ia, max_suggested);
  printf("star_mass_loss=%.17g gas_mass_gain=%.17g\n", lost, gained);
  CHECK(fabs(gained - lost) <= 1e-12 * m0, "gas gained %.17g, stars lost %.17g", gained, lost);
  CHECK(lost > 0, "stars lost mass");
  CHECK(sn_cc > 0, "supernovae drawn");

  bad_input(ctx, &stars[0]);
  must(ctx, ejecta_destroy(&ctx), "destroy");
  free(gas);
  return verdict();
}
