// host.cpp — a C++ host of ejecta. The gas is held as a structure of
// std::vectors of mixed element types (float64 positions and masses, an
// array of float64 velocity triples, float32 densities, int32 IDs), the
// context tracks its own species set ("O,Fe"), and a small RAII wrapper
// turns every failed call into an exception carrying the library's message.
// Two steps of four supernovae: the first applies the step's records in
// place, the second applies copied records located by gas ID (what an MPI
// host does with records routed from other ranks). After each step the
// host checks that the ledger balances and that the gas gained exactly what
// the records and the ledger say; bad input must come back as an error
// code and a message, never a crash.
//
// Prints key=value lines and "result pass" on success; exits non-zero on
// the first failed check. Code units: pc, Msun, km/s.

#include <array>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "ejecta.h"

namespace {

// Code units: pc, Msun (IAU 2015 nominal solar mass parameter over CODATA
// 2018 G), km/s.
constexpr double kParsecCm = 3.0856775814913673e18;
constexpr double kSolarMassG = 1.988409870698051e33;
constexpr double kKmPerSCm = 1e5;
// 1e51 erg in Msun (km/s)^2.
constexpr double kSupernovaEnergy = 1e51 / (kSolarMassG * kKmPerSCm * kKmPerSCm);

constexpr int kSide = 10;  // gas lattice side
constexpr int kGas = kSide * kSide * kSide;
constexpr double kBox = 20.0;  // periodic box side, pc
constexpr int kNeighbors = 32;

// Failure is a call that did not return EJECTA_OK: its code and message.
class Failure : public std::runtime_error {
 public:
  Failure(int code, const std::string& what)
      : std::runtime_error(what + " (code " + std::to_string(code) + ")"), code_(code) {}
  int code() const { return code_; }

 private:
  int code_;
};

// check_that throws when a check of the host fails.
void check_that(bool ok, const std::string& what) {
  if (!ok) throw std::logic_error("check failed: " + what);
}

// Context owns one ejecta context: created from a config, destroyed with
// the object. Every call that fails throws a Failure with the context's
// message.
class Context {
 public:
  explicit Context(const ejecta_config& config) {
    char why[512] = "";
    int rc = ejecta_create(&config, &handle_, why, sizeof why);
    if (rc != EJECTA_OK) throw Failure(rc, why);  // the message names the call
  }
  ~Context() { ejecta_destroy(&handle_); }
  Context(const Context&) = delete;
  Context& operator=(const Context&) = delete;

  ejecta_context handle() const { return handle_; }

  // must throws a Failure for a code other than EJECTA_OK.
  void must(int rc, const char* what) const {
    if (rc != EJECTA_OK) throw Failure(rc, std::string(what) + ": " + last_error());
  }

  // last_error is the message of the last failed call, asked for at its
  // full length (the buffer rule of ejecta.h: capacity 0 gives the length).
  std::string last_error() const {
    int64_t length = 0;
    int rc = ejecta_last_error(handle_, nullptr, 0, &length);
    if (rc != EJECTA_OK && rc != EJECTA_ERR_BUFFER_TOO_SMALL) return "(no message: code " + std::to_string(rc) + ")";
    std::vector<char> text(static_cast<size_t>(length) + 1);
    ejecta_last_error(handle_, text.data(), static_cast<int64_t>(text.size()), &length);
    return std::string(text.data());
  }

  // copy_all runs a copy call of ejecta.h twice: for the count, then into
  // a buffer of that size.
  template <class T, class Call>
  std::vector<T> copy_all(Call call, const char* what) const {
    int64_t n = 0;
    int rc = call(static_cast<T*>(nullptr), 0, &n);
    if (rc != EJECTA_OK && rc != EJECTA_ERR_BUFFER_TOO_SMALL) must(rc, what);
    std::vector<T> out(static_cast<size_t>(n));
    must(call(out.data(), n, &n), what);
    check_that(n == static_cast<int64_t>(out.size()), std::string(what) + ": count changed");
    return out;
  }

  std::vector<ejecta_record> records() const {
    ejecta_context h = handle_;
    return copy_all<ejecta_record>(
        [h](ejecta_record* r, int64_t cap, int64_t* n) { return ejecta_copy_records(h, r, cap, n); },
        "ejecta_copy_records");
  }

  std::vector<ejecta_touched> touched() const {
    ejecta_context h = handle_;
    return copy_all<ejecta_touched>(
        [h](ejecta_touched* t, int64_t cap, int64_t* n) { return ejecta_copy_touched(h, t, cap, n); },
        "ejecta_copy_touched");
  }

  ejecta_ledger ledger() const {
    ejecta_ledger l;
    must(ejecta_get_ledger(handle_, &l), "ejecta_get_ledger");
    return l;
  }

  std::string species_symbol(int32_t code) const {
    char symbol[8] = "";
    must(ejecta_species_symbol(handle_, code, symbol, sizeof symbol), "ejecta_species_symbol");
    return symbol;
  }

 private:
  ejecta_context handle_ = 0;
};

// Gas is the host's gas, a structure of arrays.
struct Gas {
  std::vector<double> x, y, z;
  std::vector<std::array<double, 3>> velocity;
  std::vector<double> mass;
  std::vector<float> density;
  std::vector<double> energy;  // specific internal energy, (km/s)^2
  std::vector<double> metals, oxygen, iron;  // mass fractions
  std::vector<int32_t> id;

  // Species codes of the context's set "O,Fe": 0 is the total metals.
  std::array<int32_t, 3> species{{EJECTA_SPECIES_METALS, 1, 2}};
  std::array<ejecta_field, 3> fractions{};

  explicit Gas(int n)
      : x(n), y(n), z(n), velocity(n), mass(n), density(n), energy(n), metals(n), oxygen(n), iron(n), id(n) {}

  // describe is the descriptor ejecta binds and reads through.
  ejecta_gas describe() {
    auto column = [](void* p, size_t stride, int32_t type) {
      ejecta_field f;
      f.data = p;
      f.stride = static_cast<int64_t>(stride);
      f.type = type;
      f.reserved = 0;
      return f;
    };
    ejecta_gas g;
    std::memset(&g, 0, sizeof g);
    g.count = static_cast<int64_t>(mass.size());
    g.position[0] = column(x.data(), sizeof(double), EJECTA_FLOAT64);
    g.position[1] = column(y.data(), sizeof(double), EJECTA_FLOAT64);
    g.position[2] = column(z.data(), sizeof(double), EJECTA_FLOAT64);
    for (int a = 0; a < 3; a++) g.velocity[a] = column(&velocity[0][a], sizeof velocity[0], EJECTA_FLOAT64);
    g.mass = column(mass.data(), sizeof(double), EJECTA_FLOAT64);
    g.density = column(density.data(), sizeof(float), EJECTA_FLOAT32);
    g.internal_energy = column(energy.data(), sizeof(double), EJECTA_FLOAT64);
    g.id = column(id.data(), sizeof(int32_t), EJECTA_INT32);
    fractions[0] = column(metals.data(), sizeof(double), EJECTA_FLOAT64);
    fractions[1] = column(oxygen.data(), sizeof(double), EJECTA_FLOAT64);
    fractions[2] = column(iron.data(), sizeof(double), EJECTA_FLOAT64);
    g.n_species = 3;
    g.species = species.data();
    g.species_fraction = fractions.data();
    return g;
  }
};

// Totals are the conserved amounts of the gas, or of records.
struct Totals {
  double mass = 0, metals = 0, oxygen = 0, iron = 0, energy = 0;
  std::array<double, 3> momentum{{0, 0, 0}};
};

Totals gas_totals(const Gas& g) {
  Totals t;
  for (size_t i = 0; i < g.mass.size(); i++) {
    double m = g.mass[i], v2 = 0;
    for (int a = 0; a < 3; a++) {
      t.momentum[a] += m * g.velocity[i][a];
      v2 += g.velocity[i][a] * g.velocity[i][a];
    }
    t.mass += m;
    t.metals += m * g.metals[i];
    t.oxygen += m * g.oxygen[i];
    t.iron += m * g.iron[i];
    t.energy += m * g.energy[i] + 0.5 * m * v2;
  }
  return t;
}

Totals record_totals(const std::vector<ejecta_record>& recs) {
  Totals t;
  for (const ejecta_record& r : recs) {
    t.mass += r.mass;
    t.metals += r.species_mass[EJECTA_SPECIES_METALS];
    t.oxygen += r.species_mass[1];
    t.iron += r.species_mass[2];
    t.energy += r.energy;
    for (int a = 0; a < 3; a++) t.momentum[a] += r.momentum[a];
  }
  return t;
}

bool within(double a, double b, double scale, double rel) { return std::fabs(a - b) <= rel * scale; }

// supernovae are n core-collapse supernovae of 1e51 erg ejecting 10 Msun
// (2 Msun metals, of which 1 Msun oxygen and 0.1 Msun iron), moving.
std::vector<ejecta_star> supernovae(int n, int64_t first_id) {
  std::vector<ejecta_star> stars(n);
  for (int s = 0; s < n; s++) {
    ejecta_star& st = stars[s];
    std::memset(&st, 0, sizeof st);
    st.id = first_id + s;
    st.position[0] = 2.5 + 5.0 * s;  // the first sits near a box face, so its gas wraps
    st.position[1] = 0.3 + 4.7 * s;
    st.position[2] = 19.6 - 3.1 * s;
    st.velocity[0] = 4.0 - 2.0 * s;
    st.velocity[1] = 1.5;
    st.mass = 1e3;
    st.metallicity = 0.0134;
    st.age = 5.0;
    st.channel = EJECTA_CHANNEL_CORE_COLLAPSE;
    st.ejected_mass = 10.0;
    st.species_mass[EJECTA_SPECIES_METALS] = 2.0;
    st.species_mass[1] = 1.0;
    st.species_mass[2] = 0.1;
    st.energy = kSupernovaEnergy;
    st.events = 1;
  }
  return stars;
}

// check_step checks one step: the ledger balances, the records carry what
// the ledger deposited, and the gas gained what the records carry (energy:
// plus what the apply report reclaimed or made up).
void check_step(const Context& ctx, const std::vector<ejecta_record>& recs, const Totals& before, const Gas& gas,
                const ejecta_apply_report& report, bool print) {
  ejecta_ledger led = ctx.ledger();
  char why[512] = "";
  check_that(ejecta_ledger_balanced(&led, 1e-12, why, sizeof why) == EJECTA_OK, std::string("ledger: ") + why);
  check_that(led.skipped == 0, "every star found gas");

  Totals r = record_totals(recs), after = gas_totals(gas);
  const ejecta_quantities& dep = led.deposited;
  check_that(within(r.mass, dep.mass, dep.mass, 1e-12), "records' mass is the ledger's");
  check_that(within(r.oxygen, dep.species_mass[1], dep.species_mass[1], 1e-12), "records' oxygen is the ledger's");
  check_that(within(r.iron, dep.species_mass[2], dep.species_mass[2], 1e-12), "records' iron is the ledger's");
  check_that(within(dep.mass, 4 * 10.0, dep.mass, 1e-12), "all ejecta deposited");
  check_that(within(dep.species_mass[1], 4 * 1.0, 4.0, 1e-12), "all oxygen deposited (species code 1 is O)");

  double dm = after.mass - before.mass;
  check_that(within(dm, dep.mass, after.mass, 1e-12), "gas mass gain is the ledger's");
  check_that(within(after.metals - before.metals, dep.species_mass[EJECTA_SPECIES_METALS], after.metals, 1e-12),
             "gas metal gain");
  check_that(within(after.oxygen - before.oxygen, dep.species_mass[1], after.oxygen, 1e-12), "gas oxygen gain");
  check_that(within(after.iron - before.iron, dep.species_mass[2], after.iron, 1e-12), "gas iron gain");
  for (int a = 0; a < 3; a++)
    check_that(within(after.momentum[a] - before.momentum[a], dep.momentum[a], led.momentum_scale, 1e-10),
               "gas momentum gain, axis " + std::to_string(a));
  double de = after.energy - before.energy;
  check_that(within(de, r.energy + report.reclaimed + report.shortfall, led.energy_scale, 1e-10),
             "gas energy gain is the records' plus reclaimed and shortfall");

  std::vector<ejecta_touched> touched = ctx.touched();
  check_that(static_cast<int64_t>(touched.size()) == report.elements, "one touched entry per changed element");
  for (size_t k = 1; k < touched.size(); k++)
    check_that(touched[k - 1].gas_id < touched[k].gas_id, "touched elements in gas-ID order");

  if (print) {
    std::printf("ledger_released_mass=%.17g ledger_deposited_mass=%.17g radiated=%.17g capped=%lld\n",
                led.released.mass, dep.mass, led.radiated, static_cast<long long>(led.capped));
    std::printf("records=%zu elements_changed=%zu report_elements=%lld\n", recs.size(), touched.size(),
                static_cast<long long>(report.elements));
    std::printf("record_dm_sum=%.17g gas_mass_change=%.17g\n", r.mass, dm);
    std::printf("record_de_sum=%.17g gas_energy_change=%.17g reclaimed=%.17g shortfall=%.17g\n", r.energy, de,
                report.reclaimed, report.shortfall);
    std::printf("oxygen_deposited=%.17g iron_deposited=%.17g\n", dep.species_mass[1], dep.species_mass[2]);
  }
}

// bad_input feeds the context input it must refuse, each with its code.
void bad_input(const Context& ctx, std::vector<ejecta_star> stars) {
  stars[0].energy = NAN;
  int rc = ejecta_step(ctx.handle(), stars.data(), static_cast<int64_t>(stars.size()), 2,
                       EJECTA_NEIGHBORS_OWN_FINDER, nullptr, nullptr);
  check_that(rc == EJECTA_ERR_BAD_VALUE, "a NaN energy is EJECTA_ERR_BAD_VALUE");
  std::printf("nan_error=%s\n", ctx.last_error().c_str());
  stars[0].energy = kSupernovaEnergy;
  stars[1].id = stars[0].id;
  rc = ejecta_step(ctx.handle(), stars.data(), static_cast<int64_t>(stars.size()), 2, EJECTA_NEIGHBORS_OWN_FINDER,
                   nullptr, nullptr);
  check_that(rc == EJECTA_ERR_INVALID_ARGUMENT, "duplicate star IDs are EJECTA_ERR_INVALID_ARGUMENT");
  std::printf("duplicate_error=%s\n", ctx.last_error().c_str());
  check_that(ejecta_choose_species(ctx.handle(), "O") == EJECTA_ERR_INVALID_ARGUMENT,
             "the species set is fixed once gas is bound");

  // A refused config comes back as a Failure with its message.
  ejecta_config cfg;
  ejecta_config_defaults(&cfg);
  std::snprintf(cfg.remnant_fit, sizeof cfg.remnant_fit, "%s", "back-of-the-envelope");
  try {
    Context refused(cfg);
    check_that(false, "an unknown remnant fit is refused");
  } catch (const Failure& f) {
    check_that(f.code() == EJECTA_ERR_UNKNOWN_NAME, "an unknown remnant fit is EJECTA_ERR_UNKNOWN_NAME");
    std::printf("create_error=%s\n", f.what());
  }
}

int run() {
  char version[32] = "";
  int32_t abi = 0;
  if (ejecta_version(version, sizeof version, &abi) != EJECTA_OK) throw Failure(-1, "ejecta_version");
  check_that(abi == EJECTA_ABI_VERSION, "library ABI " + std::to_string(abi) + ", header " +
                                            std::to_string(EJECTA_ABI_VERSION));
  std::printf("version=%s abi=%d\n", version, abi);

  // Gas: a jittered lattice in a periodic box, n_H ~ 1 cm^-3 (1.4 m_p n_H
  // is 0.0345 Msun/pc^3), ~1e4 K, moving with a shear.
  Gas gas(kGas);
  const double h = kBox / kSide;
  for (int i = 0; i < kGas; i++) {
    int ix = i % kSide, iy = (i / kSide) % kSide, iz = i / (kSide * kSide);
    gas.x[i] = (ix + 0.5) * h + 0.05 * h * std::sin(1.7 * i);
    gas.y[i] = (iy + 0.5) * h + 0.05 * h * std::cos(2.3 * i);
    gas.z[i] = (iz + 0.5) * h;
    gas.velocity[i] = {{0.2 * (iy - kSide / 2), -0.1 * ix, 0.05 * iz}};
    gas.density[i] = 0.0345f;
    gas.mass[i] = 0.0345 * h * h * h;
    gas.energy[i] = 100.0;
    gas.metals[i] = 0.0134;
    gas.oxygen[i] = 0.0057;
    gas.iron[i] = 0.0013;
    gas.id[i] = 5 + 3 * (kGas - i);  // IDs not in index order
  }

  ejecta_config cfg;
  if (ejecta_config_defaults(&cfg) != EJECTA_OK) throw Failure(-1, "ejecta_config_defaults");
  cfg.length_cm = kParsecCm;
  cfg.mass_g = kSolarMassG;
  cfg.velocity_cm_per_s = kKmPerSCm;
  cfg.neighbor_count = kNeighbors;
  cfg.worker_threads = 2;
  for (int a = 0; a < 3; a++) cfg.box_size[a] = kBox;
  Context ctx(cfg);

  ctx.must(ejecta_choose_species(ctx.handle(), "O,Fe"), "ejecta_choose_species");
  int32_t n_species = 0;
  ctx.must(ejecta_species_count(ctx.handle(), &n_species), "ejecta_species_count");
  check_that(n_species == 3 && ctx.species_symbol(0) == "Z" && ctx.species_symbol(1) == "O" &&
                 ctx.species_symbol(2) == "Fe",
             "species codes 0, 1, 2 are Z, O, Fe");
  std::printf("species=%s,%s,%s\n", ctx.species_symbol(0).c_str(), ctx.species_symbol(1).c_str(),
              ctx.species_symbol(2).c_str());

  ejecta_gas desc = gas.describe();
  ctx.must(ejecta_bind_gas(ctx.handle(), &desc), "ejecta_bind_gas");

  // Step 0: apply the step's own records in place.
  std::vector<ejecta_star> stars = supernovae(4, 100);
  ctx.must(ejecta_step(ctx.handle(), stars.data(), static_cast<int64_t>(stars.size()), 0,
                       EJECTA_NEIGHBORS_OWN_FINDER, nullptr, nullptr),
           "ejecta_step 0");
  std::vector<ejecta_record> recs = ctx.records();
  check_that(recs.size() == stars.size() * kNeighbors, "one record per star and neighbor");
  Totals before = gas_totals(gas);
  ejecta_apply_report report;
  ctx.must(ejecta_apply_step_records(ctx.handle(), &report), "ejecta_apply_step_records");
  check_that(report.records == static_cast<int64_t>(recs.size()), "every record applied");
  check_step(ctx, recs, before, gas, report, true);

  // Step 1: the stars have moved; apply copied records located by gas ID,
  // as records routed from another rank would be.
  for (ejecta_star& s : stars) {
    s.id += 10;
    for (int a = 0; a < 3; a++) s.position[a] = std::fmod(s.position[a] + 3.0, kBox);
  }
  ctx.must(ejecta_step(ctx.handle(), stars.data(), static_cast<int64_t>(stars.size()), 1,
                       EJECTA_NEIGHBORS_OWN_FINDER, nullptr, nullptr),
           "ejecta_step 1");
  recs = ctx.records();
  for (ejecta_record& r : recs) r.gas_index = -1;  // ignored when locating by ID
  before = gas_totals(gas);
  ctx.must(ejecta_apply_records(ctx.handle(), recs.data(), static_cast<int64_t>(recs.size()), EJECTA_LOCATE_BY_ID,
                                &report),
           "ejecta_apply_records");
  check_step(ctx, recs, before, gas, report, false);
  std::printf("second_step_records=%zu second_step_elements=%lld\n", recs.size(),
              static_cast<long long>(report.elements));

  bad_input(ctx, stars);
  return 0;
}

}  // namespace

int main() {
  try {
    run();
  } catch (const std::exception& e) {
    std::fprintf(stderr, "FAIL %s\n", e.what());
    return 1;
  }
  std::printf("result pass\n");
  return 0;
}
