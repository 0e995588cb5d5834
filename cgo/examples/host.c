/*
 * host.c — a small C host of ejecta: gas held as an array of structs with
 * float32 positions and float64 everything else, a few supernovae, one
 * step. It checks that the ledger balances, that the gas changed exactly as
 * the records say, that config fields mean what they say (a kinetic
 * fraction of 0 gives no kinetic energy; the infrared boost bound scales
 * radiation pressure), and that bad input through the ABI gives error
 * codes, never a crash. Prints key=value lines and "result pass" on success; exits
 * non-zero on the first failed check.
 *
 * Code units: pc, Msun, km/s.
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

typedef struct gas_element {
  float pos[3];
  double vel[3];
  double mass;
  double density;
  double energy;  /* specific internal energy, (km/s)^2 */
  double metals;  /* metal mass fraction */
  double iron;    /* iron mass fraction */
  int64_t id;
} gas_element;

static ejecta_field field(void *p, int32_t type) { return strided(p, sizeof(gas_element), type); }

static void describe(gas_element *g, ejecta_gas *d, int32_t *species,
                     ejecta_field *fractions, int64_t n) {
  DESCRIBE_GAS(*d, g, n, EJECTA_FLOAT32);
  species[0] = EJECTA_SPECIES_METALS;
  species[1] = EJECTA_SPECIES_IRON;
  fractions[0] = field(&g[0].metals, EJECTA_FLOAT64);
  fractions[1] = field(&g[0].iron, EJECTA_FLOAT64);
  d->n_species = 2;
  d->species = species;
  d->species_fraction = fractions;
}

/* Creates a context from cfg, steps n stars on a copy of the gas (density
 * and mass scaled by density_scale; at rest if at_rest) and returns the
 * ledger. */
static ejecta_ledger step_on_copy(const ejecta_config *cfg, const gas_element *gas, double density_scale,
                                  int at_rest, const ejecta_star *stars, int n) {
  gas_element *g = malloc(N_GAS * sizeof *g);
  memcpy(g, gas, N_GAS * sizeof *g);
  for (int i = 0; i < N_GAS; i++) {
    g[i].density *= density_scale;
    g[i].mass *= density_scale;
    if (at_rest) g[i].vel[0] = g[i].vel[1] = g[i].vel[2] = 0;
  }
  char err[256];
  ejecta_context ctx = 0;
  int code = ejecta_create(cfg, &ctx, err, sizeof err);
  CHECK(code == EJECTA_OK, "create: %d %s", code, err);
  ejecta_gas d;
  int32_t species[2];
  ejecta_field fractions[2];
  describe(g, &d, species, fractions, N_GAS);
  must(ctx, ejecta_bind_gas(ctx, &d), "bind copy");
  must(ctx, ejecta_step(ctx, stars, n, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), "step copy");
  ejecta_ledger led;
  must(ctx, ejecta_get_ledger(ctx, &led), "ledger copy");
  char imb[256];
  CHECK(ejecta_ledger_balanced(&led, 1e-12, imb, sizeof imb) == EJECTA_OK, "copy ledger balanced: %s", imb);
  must(ctx, ejecta_destroy(&ctx), "destroy copy");
  free(g);
  return led;
}

/* ejecta_create must refuse cfg with the code want. */
static void refused(const ejecta_config *cfg, int want, const char *what) {
  char msg[256];
  ejecta_context ctx = 0;
  int code = ejecta_create(cfg, &ctx, msg, sizeof msg);
  CHECK(code == want && ctx == 0, "%s: code %d (%s)", what, code, msg);
}

/* Every config field means what it says, zero included: the defaults are
 * those ejecta.h states, a zero kinetic fraction gives no kinetic energy,
 * max_infrared_boost bounds the radiation pressure, and values without a
 * meaning are refused. */
static void settings(const gas_element *gas, const ejecta_star *stars) {
  ejecta_config cfg;
  must(0, ejecta_config_defaults(&cfg), "defaults");
  CHECK(cfg.kinetic_fraction == 0.28 && cfg.neighbor_count == 32 && cfg.worker_threads == 1 &&
            cfg.photon_reach == 0 && cfg.max_infrared_boost == 3 && cfg.wind_event_energy_erg == 1e51 &&
            strcmp(cfg.scheme, "terminal-momentum") == 0 && strcmp(cfg.remnant_fit, "kim-ostriker-2015") == 0 &&
            strcmp(cfg.weighting, "kernel-volume") == 0 && cfg.remnant_table == NULL,
        "defaults as ejecta.h states them");

  ejecta_star still[N_STARS];
  memcpy(still, stars, sizeof still);
  for (int s = 0; s < N_STARS; s++) still[s].velocity[0] = still[s].velocity[1] = still[s].velocity[2] = 0;
  use_host_units(&cfg);
  for (int a = 0; a < 3; a++) cfg.box_size[a] = BOX;
  snprintf(cfg.scheme, sizeof cfg.scheme, "%s", "kinetic");
  cfg.kinetic_fraction = 0;
  ejecta_ledger zero = step_on_copy(&cfg, gas, 1, 1, still, N_STARS);
  CHECK(zero.kick_energy == 0 && zero.radial_momentum == 0, "kinetic fraction 0: kick energy %g, radial momentum %g",
        zero.kick_energy, zero.radial_momentum);
  CHECK(fabs(zero.heat - zero.released.energy) <= 1e-12 * zero.released.energy, "kinetic fraction 0: all heat");
  cfg.kinetic_fraction = 0.28;
  ejecta_ledger sedov = step_on_copy(&cfg, gas, 1, 1, still, N_STARS);
  CHECK(sedov.kick_energy > 0.25 * sedov.released.energy, "kinetic fraction 0.28: kick energy %g", sedov.kick_energy);
  printf("zero_kinetic_kick_energy=%.17g sedov_kick_share=%.6f\n", zero.kick_energy,
         sedov.kick_energy / sedov.released.energy);

  /* Radiation pressure in gas 1e5 times denser (n_H ~ 1e5 cm^-3): the
   * infrared optical depth of 48 neighbors is ~16, so the momentum is
   * min(1 + tau_IR, bound) times the absorbed L/c. */
  snprintf(cfg.scheme, sizeof cfg.scheme, "%s", "radiation-pressure");
  cfg.max_infrared_boost = 1;
  ejecta_ledger one = step_on_copy(&cfg, gas, 1e5, 0, stars, N_STARS);
  cfg.max_infrared_boost = 3;
  ejecta_ledger three = step_on_copy(&cfg, gas, 1e5, 0, stars, N_STARS);
  cfg.max_infrared_boost = INFINITY;
  ejecta_ledger unbounded = step_on_copy(&cfg, gas, 1e5, 0, stars, N_STARS);
  double ratio = three.radial_momentum / one.radial_momentum;
  CHECK(fabs(ratio - 3) <= 1e-12 * 3, "infrared boost bound 3 vs 1: ratio %.17g", ratio);
  CHECK(unbounded.radial_momentum > 2 * three.radial_momentum, "no infrared bound: %g vs %g",
        unbounded.radial_momentum, three.radial_momentum);
  printf("infrared_boost_ratio=%.17g\n", ratio);

  /* Values with no meaning are refused; so is a config left zeroed. */
  ejecta_config bad;
  ejecta_config_defaults(&bad);
  bad.neighbor_count = 0;
  refused(&bad, EJECTA_ERR_INVALID_ARGUMENT, "neighbor_count 0");
  ejecta_config_defaults(&bad);
  bad.worker_threads = 0;
  refused(&bad, EJECTA_ERR_INVALID_ARGUMENT, "worker_threads 0");
  ejecta_config_defaults(&bad);
  bad.max_infrared_boost = 0.5;
  refused(&bad, EJECTA_ERR_INVALID_ARGUMENT, "max_infrared_boost 0.5");
  ejecta_config_defaults(&bad);
  bad.wind_event_energy_erg = 0;
  refused(&bad, EJECTA_ERR_INVALID_ARGUMENT, "wind_event_energy_erg 0");
  ejecta_config_defaults(&bad);
  bad.photon_reach = -1;
  refused(&bad, EJECTA_ERR_INVALID_ARGUMENT, "photon_reach -1");
  ejecta_config_defaults(&bad);
  bad.weighting[0] = 0;
  refused(&bad, EJECTA_ERR_UNKNOWN_NAME, "empty weighting");
  memset(&bad, 0, sizeof bad);
  refused(&bad, EJECTA_ERR_INVALID_ARGUMENT, "zeroed config");
}

/* Checks of bad input through the real exports: each must return its
 * documented code. */
static void bad_input(ejecta_context ctx, gas_element *gas) {
  ejecta_config cfg;
  ejecta_context other = 0;
  char msg[256];
  CHECK(ejecta_config_defaults(NULL) == EJECTA_ERR_NULL_POINTER, "defaults(NULL)");
  CHECK(ejecta_create(NULL, &other, msg, sizeof msg) == EJECTA_ERR_NULL_POINTER, "create(NULL config)");
  ejecta_config_defaults(&cfg);
  CHECK(ejecta_create(&cfg, NULL, msg, sizeof msg) == EJECTA_ERR_NULL_POINTER, "create(NULL out)");
  snprintf(cfg.scheme, sizeof cfg.scheme, "%s", "shock-and-awe");
  CHECK(ejecta_create(&cfg, &other, msg, sizeof msg) == EJECTA_ERR_UNKNOWN_NAME && other == 0, "unknown scheme");
  CHECK(strstr(msg, "shock-and-awe") != NULL, "create error text names the scheme: %s", msg);
  printf("create_error=%s\n", msg);
  ejecta_config_defaults(&cfg);
  memset(cfg.weighting, 'x', sizeof cfg.weighting);
  CHECK(ejecta_create(&cfg, &other, msg, sizeof msg) == EJECTA_ERR_UNKNOWN_NAME, "unterminated name");
  ejecta_config_defaults(&cfg);
  cfg.mass_g = NAN;
  CHECK(ejecta_create(&cfg, &other, msg, sizeof msg) == EJECTA_ERR_INVALID_ARGUMENT, "NaN units");
  ejecta_config_defaults(&cfg);
  cfg.neighbor_count = -3;
  CHECK(ejecta_create(&cfg, &other, msg, sizeof msg) == EJECTA_ERR_INVALID_ARGUMENT, "negative count");

  /* Bad gas descriptors on a scratch context. */
  ejecta_config_defaults(&cfg);
  must(0, ejecta_create(&cfg, &other, msg, sizeof msg), "create scratch");
  ejecta_gas d;
  int32_t species[2];
  ejecta_field fractions[2];
  CHECK(ejecta_bind_gas(other, NULL) == EJECTA_ERR_NULL_POINTER, "bind(NULL)");
  describe(gas, &d, species, fractions, 0);
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_INVALID_ARGUMENT, "zero count");
  describe(gas, &d, species, fractions, -5);
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_INVALID_ARGUMENT, "negative count");
  describe(gas, &d, species, fractions, N_GAS);
  d.mass.stride = 4;
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_INVALID_ARGUMENT, "stride below element");
  describe(gas, &d, species, fractions, N_GAS);
  d.density.data = NULL;
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_NULL_POINTER, "NULL column");
  describe(gas, &d, species, fractions, N_GAS);
  d.mass.type = 42;
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_INVALID_ARGUMENT, "unknown type");
  describe(gas, &d, species, fractions, N_GAS);
  d.velocity[1] = d.velocity[0];
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_INVALID_ARGUMENT, "overlapping written columns");
  describe(gas, &d, species, fractions, N_GAS);
  species[1] = 77;
  CHECK(ejecta_bind_gas(other, &d) == EJECTA_ERR_INVALID_ARGUMENT, "unknown species");

  ejecta_star s;
  memset(&s, 0, sizeof s);
  CHECK(ejecta_step(other, &s, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_NO_GAS, "step before bind");
  describe(gas, &d, species, fractions, N_GAS);
  must(other, ejecta_bind_gas(other, &d), "bind scratch");
  CHECK(ejecta_step(other, NULL, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_NULL_POINTER, "NULL stars");
  CHECK(ejecta_step(other, &s, 0, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "zero stars");
  CHECK(ejecta_step(other, &s, -1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "negative stars");
  CHECK(ejecta_step(other, &s, 1, 0, 9, NULL, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "unknown mode");
  CHECK(ejecta_step(other, &s, 1, 0, EJECTA_NEIGHBORS_HOST_ROWS, NULL, NULL) == EJECTA_ERR_NULL_POINTER, "rows NULL");
  s.energy = NAN;
  CHECK(ejecta_step(other, &s, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_BAD_VALUE, "NaN energy");
  int64_t len = 0;
  CHECK(ejecta_last_error(other, msg, sizeof msg, &len) == EJECTA_OK && len > 0, "last error after NaN");
  printf("nan_error=%s\n", msg);
  s.energy = 1;
  s.ejected_mass = -1;
  CHECK(ejecta_step(other, &s, 1, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL) == EJECTA_ERR_BAD_VALUE, "negative mass");
  CHECK(ejecta_apply_step_records(other, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "apply without step");
  ejecta_record r;
  memset(&r, 0, sizeof r);
  r.gas_id = 999999;
  CHECK(ejecta_apply_records(other, &r, 1, EJECTA_LOCATE_BY_ID, NULL) == EJECTA_ERR_UNKNOWN_GAS, "unknown gas ID");
  r.gas_id = gas[0].id;
  r.mass = NAN;
  CHECK(ejecta_apply_records(other, &r, 1, EJECTA_LOCATE_BY_ID, NULL) == EJECTA_ERR_BAD_VALUE, "NaN record");
  CHECK(ejecta_apply_records(other, NULL, 1, EJECTA_LOCATE_BY_ID, NULL) == EJECTA_ERR_NULL_POINTER, "NULL records");
  CHECK(ejecta_apply_records(other, &r, -1, EJECTA_LOCATE_BY_ID, NULL) == EJECTA_ERR_INVALID_ARGUMENT, "negative records");

  /* A destroyed context: every call reports it, none crashes. */
  ejecta_context stale = other;
  must(other, ejecta_destroy(&other), "destroy scratch");
  CHECK(other == 0, "destroy zeroes the handle");
  CHECK(ejecta_destroy(&other) == EJECTA_OK, "destroy(0) is a no-op");
  CHECK(ejecta_destroy(&stale) == EJECTA_ERR_INVALID_CONTEXT, "double destroy");
  CHECK(ejecta_bind_gas(stale, &d) == EJECTA_ERR_INVALID_CONTEXT, "bind on destroyed");
  CHECK(ejecta_step(stale, &s, 1, 0, 0, NULL, NULL) == EJECTA_ERR_INVALID_CONTEXT, "step on destroyed");
  CHECK(ejecta_last_error(stale, msg, sizeof msg, NULL) == EJECTA_ERR_INVALID_CONTEXT, "last error on destroyed");
  printf("destroyed_error=%s\n", msg);
  CHECK(ejecta_step(12345, &s, 1, 0, 0, NULL, NULL) == EJECTA_ERR_INVALID_CONTEXT, "made-up handle");
  CHECK(ejecta_step(0, &s, 1, 0, 0, NULL, NULL) == EJECTA_ERR_INVALID_CONTEXT, "zero handle");
  (void)ctx;
}

int main(void) {
  char version[32];
  int32_t abi = 0;
  must(0, ejecta_version(version, sizeof version, &abi), "version");
  CHECK(abi == EJECTA_ABI_VERSION, "library ABI %d, header %d", abi, EJECTA_ABI_VERSION);
  printf("version=%s abi=%d\n", version, abi);

  /* Gas: a lattice in a periodic box, n_H ~ 1 cm^-3 (density in
   * Msun/pc^3: 1.4 m_p n_H = 0.0345 Msun/pc^3), ~1e4 K. */
  gas_element *gas = calloc(N_GAS, sizeof *gas);
  gas_element *before = calloc(N_GAS, sizeof *gas);
  double h = BOX / SIDE;
  for (int i = 0; i < N_GAS; i++) {
    int ix = i % SIDE, iy = (i / SIDE) % SIDE, iz = i / (SIDE * SIDE);
    gas[i].pos[0] = (float)((ix + 0.5) * h);
    gas[i].pos[1] = (float)((iy + 0.5) * h);
    gas[i].pos[2] = (float)((iz + 0.5) * h);
    gas[i].vel[0] = 0.1 * (ix - SIDE / 2);
    gas[i].vel[1] = -0.05 * iy;
    gas[i].vel[2] = 0.02 * iz;
    gas[i].density = 0.0345;
    gas[i].mass = gas[i].density * h * h * h;
    gas[i].energy = 100.0;
    gas[i].metals = 0.0134;
    gas[i].iron = 0.0013;
    gas[i].id = 1000 + 7 * (int64_t)i;
  }
  memcpy(before, gas, N_GAS * sizeof *gas);

  ejecta_config cfg;
  must(0, ejecta_config_defaults(&cfg), "defaults");
  use_host_units(&cfg);
  cfg.neighbor_count = 48;
  cfg.worker_threads = 2;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = BOX;
  char err[256];
  ejecta_context ctx = 0;
  int code = ejecta_create(&cfg, &ctx, err, sizeof err);
  if (code != EJECTA_OK) {
    fprintf(stderr, "FAIL create: %d %s\n", code, err);
    return 2;
  }
  ejecta_gas desc;
  int32_t species[2];
  ejecta_field fractions[2];
  describe(gas, &desc, species, fractions, N_GAS);
  must(ctx, ejecta_bind_gas(ctx, &desc), "bind");

  /* Three supernovae of 1e51 erg ejecting 10 Msun (2 Msun metals, 0.1
   * Msun iron); one sits near a box face so its gas wraps. */
  ejecta_star stars[N_STARS];
  memset(stars, 0, sizeof stars);
  double where[N_STARS][3] = {{8.1, 7.9, 8.3}, {0.2, 15.9, 4.0}, {12.0, 3.3, 9.9}};
  for (int s = 0; s < N_STARS; s++) {
    stars[s].id = 50 - s;
    for (int a = 0; a < 3; a++) stars[s].position[a] = where[s][a];
    stars[s].velocity[0] = 3.0 * s;
    stars[s].mass = 1e3;
    stars[s].metallicity = 0.0134;
    stars[s].age = 5.0;
    stars[s].channel = EJECTA_CHANNEL_CORE_COLLAPSE;
    stars[s].ejected_mass = 10.0;
    stars[s].species_mass[EJECTA_SPECIES_METALS] = 2.0;
    stars[s].species_mass[EJECTA_SPECIES_IRON] = 0.1;
    stars[s].energy = FOE_CODE;
    stars[s].events = 1;
  }
  must(ctx, ejecta_step(ctx, stars, N_STARS, 0, EJECTA_NEIGHBORS_OWN_FINDER, NULL, NULL), "step");

  int64_t n_rec = 0, written = 0;
  must(ctx, ejecta_record_count(ctx, &n_rec), "record count");
  CHECK(n_rec == N_STARS * 48, "records %lld", (long long)n_rec);
  ejecta_record *recs = malloc((size_t)n_rec * sizeof *recs);
  /* A short buffer gets the first records and the number there are. */
  CHECK(ejecta_copy_records(ctx, recs, 2, &written) == EJECTA_ERR_BUFFER_TOO_SMALL && written == n_rec, "short buffer");
  must(ctx, ejecta_copy_records(ctx, recs, n_rec, &written), "copy records");
  CHECK(written == n_rec, "written %lld", (long long)written);

  ejecta_ledger led;
  must(ctx, ejecta_get_ledger(ctx, &led), "ledger");
  char imb[256];
  code = ejecta_ledger_balanced(&led, 1e-12, imb, sizeof imb);
  CHECK(code == EJECTA_OK, "ledger balanced: %s", imb);
  printf("ledger_released_mass=%.17g ledger_deposited_mass=%.17g radiated=%.17g capped=%lld\n",
         led.released.mass, led.deposited.mass, led.radiated, (long long)led.capped);

  ejecta_apply_report rep;
  must(ctx, ejecta_apply_step_records(ctx, &rep), "apply");
  CHECK(ejecta_apply_step_records(ctx, &rep) == EJECTA_ERR_ALREADY_APPLIED, "second apply refused");

  /* Per element: the mass change is the sum of its records' dm, and its
   * momentum and metal changes likewise. */
  double *dm = calloc(N_GAS, sizeof *dm), *dz = calloc(N_GAS, sizeof *dz);
  double (*dp)[3] = calloc(N_GAS, sizeof *dp);
  double sum_dm = 0, sum_de = 0;
  for (int64_t k = 0; k < n_rec; k++) {
    int64_t i = recs[k].gas_index;
    CHECK(i >= 0 && i < N_GAS && gas[i].id == recs[k].gas_id, "record %lld locates its gas", (long long)k);
    dm[i] += recs[k].mass;
    dz[i] += recs[k].species_mass[EJECTA_SPECIES_METALS];
    for (int a = 0; a < 3; a++) dp[i][a] += recs[k].momentum[a];
    sum_dm += recs[k].mass;
    sum_de += recs[k].energy;
  }
  double gas_dm = 0, gas_de = 0, gas_dz = 0, gas_dp[3] = {0, 0, 0};
  int changed = 0;
  for (int i = 0; i < N_GAS; i++) {
    gas_element *a = &before[i], *b = &gas[i];
    double m0 = a->mass, m1 = b->mass;
    CHECK(memcmp(a->pos, b->pos, sizeof a->pos) == 0 && a->id == b->id && a->density == b->density,
          "read-only fields of %d unchanged", i);
    if (dm[i] == 0) {
      CHECK(memcmp(a, b, sizeof *a) == 0, "untouched element %d unchanged", i);
      continue;
    }
    changed++;
    CHECK(fabs((m1 - m0) - dm[i]) <= 1e-12 * m1, "element %d: mass change %.17g, records %.17g", i, m1 - m0, dm[i]);
    CHECK(fabs((b->metals * m1 - a->metals * m0) - dz[i]) <= 1e-12 * m1, "element %d metals", i);
    double ke0 = 0, ke1 = 0;
    for (int ax = 0; ax < 3; ax++) {
      double p = m1 * b->vel[ax] - m0 * a->vel[ax];
      CHECK(fabs(p - dp[i][ax]) <= 1e-9 * (fabs(dp[i][ax]) + m1 * 1.0), "element %d momentum axis %d: %.17g vs %.17g", i, ax, p, dp[i][ax]);
      gas_dp[ax] += p;
      ke0 += 0.5 * m0 * a->vel[ax] * a->vel[ax];
      ke1 += 0.5 * m1 * b->vel[ax] * b->vel[ax];
    }
    gas_dm += m1 - m0;
    gas_dz += b->metals * m1 - a->metals * m0;
    gas_de += (ke1 + m1 * b->energy) - (ke0 + m0 * a->energy);
  }
  printf("records=%lld elements_changed=%d report_elements=%lld\n", (long long)n_rec, changed, (long long)rep.elements);
  printf("record_dm_sum=%.17g gas_mass_change=%.17g\n", sum_dm, gas_dm);
  printf("record_de_sum=%.17g gas_energy_change=%.17g reclaimed=%.17g shortfall=%.17g\n", sum_de, gas_de, rep.reclaimed, rep.shortfall);
  CHECK(changed == rep.elements, "changed %d vs report %lld", changed, (long long)rep.elements);
  CHECK(fabs(gas_dm - led.deposited.mass) <= 1e-12 * led.deposited.mass, "gas mass change vs ledger");
  CHECK(fabs(gas_dm - N_STARS * 10.0) <= 1e-12 * gas_dm, "all ejecta deposited");
  CHECK(fabs(gas_dz - led.deposited.species_mass[EJECTA_SPECIES_METALS]) <= 1e-12 * gas_dz, "metals vs ledger");
  double escale = led.energy_scale;
  CHECK(fabs(gas_de - (sum_de + rep.reclaimed + rep.shortfall)) <= 1e-10 * escale,
        "gas energy change %.17g vs records %.17g + reclaimed + shortfall", gas_de, sum_de);
  for (int ax = 0; ax < 3; ax++)
    CHECK(fabs(gas_dp[ax] - led.deposited.momentum[ax]) <= 1e-10 * led.momentum_scale, "momentum axis %d vs ledger", ax);

  int64_t n_touched = 0;
  CHECK(ejecta_copy_touched(ctx, NULL, 0, &n_touched) == EJECTA_ERR_BUFFER_TOO_SMALL && n_touched == rep.elements, "touched count");

  settings(before, stars);
  bad_input(ctx, gas);
  must(ctx, ejecta_destroy(&ctx), "destroy");
  free(dm); free(dz); free(dp); free(recs); free(gas); free(before);
  return verdict();
}
