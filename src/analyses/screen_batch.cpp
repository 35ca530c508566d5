// Screens of one or many compounds: option and job checks, the buffers screened in parallel,
// ranking, and the dose range of a screen.

#include "pkarta/analyses/screen.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <thread>

#include "pkarta/base/format.h"
#include "pkarta/analyses/dilute.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/chem/units.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

int status_group(ScreenStatus s) {
  switch (s) {
    case ScreenStatus::kOk: return 0;
    case ScreenStatus::kNotAchievable: return 1;
    case ScreenStatus::kDoseNotSoluble: return 2;
    case ScreenStatus::kOutsideRange: return 3;
  }
  return 4;
}


void check_job(const ScreenJob& job) {
  if (!(job.dose_mol_per_L > 0) || !std::isfinite(job.dose_mol_per_L)) {
    throw InputError(SourceLocation{job.compound.file, 0, 0}, "the dose must be > 0");
  }
  if (job.form != "free" && !job.compound.salt(job.form)) {
    std::string known = "free";
    for (const Salt& s : job.compound.salts) known += ", " + s.id;
    throw InputError(SourceLocation{job.compound.file, 0, 0},
                     "compound '" + job.compound.id + "' has no salt '" + job.form + "' (forms: " + known + ")");
  }
}

bool has_status(const ScreenReport& rep, ScreenStatus status) {
  return std::any_of(rep.results.begin(), rep.results.end(),
                     [status](const ScreenResult& r) { return r.status == status; });
}

// Runs body(i) for i in [0, n) on `threads` threads.
void parallel_for(std::size_t n, int threads, const std::function<void(std::size_t)>& body,
                  const std::function<void()>& after_each) {
  if (threads <= 1 || n <= 1) {
    for (std::size_t i = 0; i < n; ++i) {
      body(i);
      if (after_each) after_each();
    }
    return;
  }
  std::atomic<std::size_t> next{0};
  std::mutex mutex;
  std::exception_ptr failure;
  auto worker = [&] {
    for (;;) {
      const std::size_t i = next.fetch_add(1);
      if (i >= n) return;
      try {
        body(i);
      } catch (...) {
        std::lock_guard<std::mutex> lock(mutex);
        if (!failure) failure = std::current_exception();
        next.store(n);
        return;
      }
      if (after_each) {
        std::lock_guard<std::mutex> lock(mutex);
        after_each();
      }
    }
  };
  std::vector<std::thread> pool;
  const int count = static_cast<int>(std::min<std::size_t>(n, static_cast<std::size_t>(threads)));
  pool.reserve(count);
  for (int t = 0; t < count; ++t) pool.emplace_back(worker);
  for (std::thread& t : pool) t.join();
  if (failure) std::rethrow_exception(failure);
}


// For each premade screen in which no buffer is ok: the same buffers screened "adjusted" (its
// ok results kept, ranked) and the titrant the dose alone needs, with the titrants of the
// leading adjusted buffer (else of the closest premade one).
void add_fallbacks(const Library& library, const std::vector<ScreenJob>& jobs,
                   const std::vector<const Buffer*>& buffers, const ScreenOptions& options, int threads,
                   std::vector<ScreenReport>& reports) {
  if (options.preparation != ScreenPreparation::kPremade || buffers.empty()) return;
  std::vector<std::size_t> failing;
  // Only where a buffer fails to hold the pH (not-achievable): adjusting the pH after the dose
  // does not help a dose that does not dissolve at the target.
  for (std::size_t i = 0; i < reports.size(); ++i) {
    if (!has_status(reports[i], ScreenStatus::kOk) && has_status(reports[i], ScreenStatus::kNotAchievable)) {
      failing.push_back(i);
    }
  }
  if (failing.empty()) return;
  ScreenOptions adjusted = options;
  adjusted.preparation = ScreenPreparation::kAdjusted;
  const std::size_t nb = buffers.size();
  std::vector<std::vector<ScreenResult>> results(failing.size(), std::vector<ScreenResult>(nb));
  parallel_for(failing.size() * nb, threads, [&](std::size_t k) {
    const std::size_t i = failing[k / nb], b = k % nb;
    results[k / nb][b] = screen_buffer(library, *buffers[b], jobs[i], reports[i].solubility_at_target_mol_per_L, adjusted);
  }, nullptr);
  for (std::size_t f = 0; f < failing.size(); ++f) {
    ScreenReport& rep = reports[failing[f]];
    ScreenFallback fb;
    rank_screen_results(results[f]);
    for (ScreenResult& r : results[f]) {
      if (r.status == ScreenStatus::kOk) fb.adjusted.push_back(std::move(r));
    }
    const std::string& lead = fb.adjusted.empty() ? rep.results.front().buffer : fb.adjusted.front().buffer;
    const BufferPreparation t = dose_titration(library, library.buffer(lead), jobs[failing[f]], options);
    fb.dose_titrant_found = t.converged;
    fb.dose_titrant = t.converged ? t.titrant : "";
    fb.dose_titrant_mol_per_L = t.converged ? t.titrant_mol_per_L : 0.0;
    if (!fb.dose_titrant.empty()) {
      fb.dose_titrant_mg_per_mL = fb.dose_titrant_mol_per_L * library.reagent(fb.dose_titrant).molar_mass_g_per_mol;
    }
    rep.fallback = std::move(fb);
  }
}

}  // namespace

std::vector<std::pair<double, double>> dose_soluble_pH_ranges(const Library& library, const Compound& compound,
                                                              double dose_mol_per_L, const ScreenOptions& options) {
  SolubilityScanner scanner(compound, library, ProfileConditions::in_water(options.temperature_C, options.activity));
  auto dissolves = [&](double pH) { return scanner.at(pH).solubility_mol_per_L >= dose_mol_per_L; };
  // The pH where `dissolves` changes between a (value va) and b.
  auto edge = [&](double a, double b, bool va) {
    for (int it = 0; it < 10 && std::fabs(b - a) > 1e-4; ++it) {
      const double mid = 0.5 * (a + b);
      (dissolves(mid) == va ? a : b) = mid;
    }
    return 0.5 * (a + b);
  };
  std::vector<std::pair<double, double>> ranges;
  const double step = 0.05;
  const int n = static_cast<int>(std::lround((13.0 - 1.0) / step));
  bool prev = dissolves(1.0);
  double start = 1.0;
  for (int i = 1; i <= n; ++i) {
    const double pH = 1.0 + i * step, before = pH - step;
    const bool now = dissolves(pH);
    if (now != prev) {
      const double x = edge(before, pH, prev);
      if (now) start = x;
      else ranges.emplace_back(start, x);
      prev = now;
    }
  }
  if (prev) ranges.emplace_back(start, 13.0);
  return ranges;
}

void rank_screen_results(std::vector<ScreenResult>& results) {
  auto key_conc = [](const ScreenResult& r) { return r.min_conc_mol_per_L ? *r.min_conc_mol_per_L : kInf; };
  auto abs_or_inf = [](double x) { return std::isfinite(x) ? std::fabs(x) : kInf; };
  std::stable_sort(results.begin(), results.end(), [&](const ScreenResult& a, const ScreenResult& b) {
    const int ga = status_group(a.status), gb = status_group(b.status);
    if (ga != gb) return ga < gb;
    if (a.status == ScreenStatus::kOk && a.holds_at_storage != b.holds_at_storage) return a.holds_at_storage;
    const double ca = key_conc(a), cb = key_conc(b);
    if (ca != cb) return ca < cb;
    if (!a.min_conc_mol_per_L) {  // nothing holds the target: closest to it first
      const double da = abs_or_inf(a.pH_drift), db = abs_or_inf(b.pH_drift);
      if (da != db) return da < db;
    }
    const double ta = abs_or_inf(a.temperature_drift_pH()), tb = abs_or_inf(b.temperature_drift_pH());
    if (ta != tb) return ta < tb;
    return a.buffer < b.buffer;
  });
}


namespace {
ScreenReport report_header(const ScreenJob& job, const ScreenOptions& options) {
  ScreenReport rep;
  rep.compound_id = job.compound.id;
  rep.compound_name = job.compound.name;
  rep.compound_file = job.compound.file;
  rep.form = job.form;
  rep.target_pH = options.target_pH;
  rep.tolerance_pH = options.tolerance_pH;
  rep.temperature_C = options.temperature_C;
  rep.activity = options.activity;
  rep.low_temperature_C = options.low_temperature_C;
  rep.high_temperature_C = options.high_temperature_C;
  rep.dose_mol_per_L = job.dose_mol_per_L;
  rep.dose_range_fraction = options.dose_range_fraction;
  rep.route = options.route;
  rep.preparation = options.preparation;
  rep.challenge_mol_per_L = options.challenge_mol_per_L;
  rep.min_capacity_mol_per_L_per_pH = options.min_capacity_mol_per_L_per_pH;
  rep.max_drift_pH = options.max_drift_pH;
  rep.round_step_mol_per_L = options.round_step_mol_per_L;
  rep.dilution_medium = options.dilution_medium;
  return rep;
}

void check_options(const ScreenOptions& options) {
  std::string err;
  if (!options.is_valid(&err)) throw InputError(err);
}
}  // namespace

ScreenReport screen(const Library& library, const ScreenJob& job, const ScreenOptions& options) {
  BatchOptions serial;
  serial.threads = 1;
  return screen_batch(library, {job}, options, serial).front();
}

std::vector<ScreenReport> screen_batch(const Library& library, const std::vector<ScreenJob>& jobs,
                                       const ScreenOptions& options, const BatchOptions& batch) {
  check_options(options);
  for (const ScreenJob& job : jobs) check_job(job);
  const std::vector<const Buffer*> buffers = screen_candidates(library, options);
  std::string dilution_label;  // throws for an unknown medium before any work
  if (!options.dilution_medium.empty()) {
    DilutionOptions d;
    d.medium_id = options.dilution_medium;
    dilution_label = dilution_conditions(library, d, options.temperature_C).words;
  }
  int threads = batch.threads;
  if (threads <= 0) threads = std::max(1u, std::thread::hardware_concurrency());

  std::vector<ScreenReport> reports;
  reports.reserve(jobs.size());
  for (const ScreenJob& job : jobs) {
    reports.push_back(report_header(job, options));
    reports.back().dilution_label = dilution_label;
    reports.back().results.resize(buffers.size());
  }
  // The solubility at the target first (one per compound), then every (compound, buffer) pair.
  parallel_for(jobs.size(), threads, [&](std::size_t i) {
    reports[i].solubility_at_target_mol_per_L = screen_solubility_at_target(library, jobs[i].compound, options);
  }, nullptr);
  const std::size_t nb = buffers.size();
  const std::size_t total = jobs.size() * nb;
  std::size_t done = 0;
  parallel_for(total, threads, [&](std::size_t k) {
    const std::size_t i = k / nb, b = k % nb;
    reports[i].results[b] = screen_buffer(library, *buffers[b], jobs[i], reports[i].solubility_at_target_mol_per_L, options);
  }, [&] {
    ++done;
    if (batch.progress) batch.progress(done, total);
  });
  for (ScreenReport& rep : reports) rank_screen_results(rep.results);
  add_fallbacks(library, jobs, buffers, options, threads, reports);
  for (std::size_t i = 0; i < reports.size(); ++i) {
    ScreenReport& rep = reports[i];
    if (rep.solubility_at_target_mol_per_L < rep.dose_mol_per_L) {
      rep.dose_soluble_pH_ranges = dose_soluble_pH_ranges(library, jobs[i].compound, rep.dose_mol_per_L, options);
      std::string where;
      for (const auto& [lo, hi] : rep.dose_soluble_pH_ranges) {
        if (!where.empty()) where += " or ";
        if (lo <= 1.0 + 1e-9 && hi >= 13.0 - 1e-9) where += "over pH 1-13";
        else if (lo <= 1.0 + 1e-9) where += "at pH " + fixed(hi, 2) + " and below";
        else if (hi >= 13.0 - 1e-9) where += "at pH " + fixed(lo, 2) + " and above";
        else where += "at pH " + fixed(lo, 2) + " to " + fixed(hi, 2);
      }
      rep.warnings.push_back("the dose (" + sig(1e3 * rep.dose_mol_per_L, 3) + " mM) exceeds the drug's solubility in water at pH " +
                             fixed(rep.target_pH, 2) + " (" + sig(1e3 * rep.solubility_at_target_mol_per_L, 3) + " mM, " +
                             fixed(rep.temperature_C, 1) + " °C): " +
                             (where.empty() ? std::string("it dissolves nowhere between pH 1 and 13 in water")
                                            : "in water it dissolves " + where) +
                             "; lower the dose or move the target pH");
    }
    // The leading ok buffer may precipitate the drug on dilution while another ok buffer does not.
    const ScreenResult* lead = nullptr;
    const ScreenResult* clear = nullptr;
    for (const ScreenResult& r : rep.results) {
      if (r.status != ScreenStatus::kOk || !std::isfinite(r.dilution_max_supersaturation)) continue;
      if (!lead) lead = &r;
      else if (!clear && r.dilution_max_supersaturation <= 1.0) clear = &r;
    }
    if (lead && clear && lead->dilution_max_supersaturation > 1.0) {
      rep.warnings.push_back("the leading buffer, " + lead->buffer + ", may let the drug precipitate on dilution into " +
                             rep.dilution_medium + " (highest supersaturation ratio " +
                             sig(lead->dilution_max_supersaturation, 3) + "); " + clear->buffer + " does not (" +
                             sig(clear->dilution_max_supersaturation, 3) + "): weigh the two");
    }
    if (rep.route == "parenteral" || rep.route == "ophthalmic") {
      for (const ScreenResult& r : rep.results) {
        if (r.status != ScreenStatus::kOk) continue;
        const double osm = kOsmoticCoefficient * r.osmolarity_mOsm_per_L / water_density_kg_per_L(rep.temperature_C);
        if (osm < 250.0) {
          rep.warnings.push_back(kLowOsmolalityWarningStart + fixed(osm, 0) +
                                 " mOsm/kg, is below the 250 mOsm/kg usual for " + rep.route +
                                 " products (common practice, not a rule): add a tonicity reagent "
                                 "(pkarta recipe --isotonic)");
        }
        break;
      }
    }
  }
  return reports;
}

double parse_dose_range(std::string_view text) {
  std::string_view t = text;
  while (!t.empty() && t.front() == ' ') t.remove_prefix(1);
  while (!t.empty() && t.back() == ' ') t.remove_suffix(1);
  for (std::string_view prefix : {"+/-", "+-", "\xC2\xB1"}) {
    if (t.substr(0, prefix.size()) == prefix) {
      t.remove_prefix(prefix.size());
      break;
    }
  }
  bool percent = false;
  if (!t.empty() && t.back() == '%') {
    percent = true;
    t.remove_suffix(1);
  }
  double v;
  try {
    v = parse_number(t, "dose range");
  } catch (const InputError&) {
    throw InputError("dose range \"" + std::string(text) + "\" is not a number; expected e.g. 10% or 0.1");
  }
  if (percent) v /= 100.0;
  if (!(v >= 0.0 && v < 1.0)) {
    throw InputError("dose range \"" + std::string(text) + "\" is out of range; expected 0 to 100% (e.g. 10% or 0.1)");
  }
  return v;
}
}  // namespace pkarta
