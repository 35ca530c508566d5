#include "pkarta/analyses/uncertainty.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <random>
#include <stdexcept>
#include <thread>

#include "pkarta/base/format.h"

namespace pkarta {

namespace {

// splitmix64 (Steele, Lea and Flood 2014): decorrelates the per-sample seeds.
std::uint64_t splitmix64(std::uint64_t x) {
  x += 0x9E3779B97F4A7C15ULL;
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ULL;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBULL;
  return x ^ (x >> 31);
}

// Standard normal by Box-Muller from mt19937_64 (both exactly specified, unlike
// std::normal_distribution, whose algorithm differs between standard libraries).
class Normal {
 public:
  explicit Normal(std::uint64_t seed) : rng_(seed) {}
  double operator()() {
    const double u1 = (static_cast<double>(rng_() >> 11) + 0.5) * 0x1.0p-53;  // (0, 1)
    const double u2 = static_cast<double>(rng_() >> 11) * 0x1.0p-53;          // [0, 1)
    return std::sqrt(-2.0 * std::log(u1)) * std::cos(6.283185307179586 * u2);
  }

 private:
  std::mt19937_64 rng_;
};

}  // namespace

Compound sample_compound(const Compound& compound, std::uint64_t seed, int index) {
  Compound c = compound;
  Normal z(splitmix64(seed ^ splitmix64(static_cast<std::uint64_t>(index) + 1)));
  // Every sample draws the same sequence of normals whatever the sds, so that scaling an sd
  // scales the perturbation of the same draws.
  for (Pka& p : c.system.pkas) p.value += p.sd * z();
  const double zs = z();
  if (c.has_intrinsic_solubility) c.s0_mol_per_L *= std::pow(10.0, c.s0_log_sd * zs);
  return c;
}

double percentile(std::vector<double> values, double q) {
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(values.begin(), values.end());
  const double pos = std::clamp(q, 0.0, 1.0) * static_cast<double>(values.size() - 1);
  const std::size_t lo = static_cast<std::size_t>(std::floor(pos));
  const std::size_t hi = std::min(lo + 1, values.size() - 1);
  const double f = pos - static_cast<double>(lo);
  if (f == 0.0 || values[lo] == values[hi]) return values[lo];
  return values[lo] + f * (values[hi] - values[lo]);
}

Bands monte_carlo_bands(const Compound& compound, int outputs, int samples, std::uint64_t seed,
                        const std::function<void(const Compound&, double* out)>& evaluate,
                        const MonteCarloRun& run) {
  if (samples < 1) throw std::invalid_argument("monte_carlo_bands: samples must be >= 1");
  if (outputs < 1) throw std::invalid_argument("monte_carlo_bands: outputs must be >= 1");
  std::vector<double> values(static_cast<std::size_t>(samples) * outputs,
                             std::numeric_limits<double>::quiet_NaN());
  std::atomic<int> next{0}, done{0};
  std::exception_ptr failure;
  std::mutex failure_mutex;
  auto work = [&](bool report) {
    try {
      for (int i; (i = next.fetch_add(1)) < samples;) {
        const Compound c = sample_compound(compound, seed, i);
        evaluate(c, &values[static_cast<std::size_t>(i) * outputs]);
        const int d = done.fetch_add(1) + 1;
        if (report && run.progress) run.progress(d, samples);
      }
    } catch (...) {
      std::lock_guard<std::mutex> lock(failure_mutex);
      if (!failure) failure = std::current_exception();
      next.store(samples);  // the others stop at their next sample
    }
  };
  int threads = run.threads > 0 ? run.threads : static_cast<int>(std::thread::hardware_concurrency());
  threads = std::clamp(threads, 1, std::max(1, samples));
  std::vector<std::thread> pool;
  for (int t = 1; t < threads; ++t) pool.emplace_back(work, false);
  work(true);
  for (std::thread& t : pool) t.join();
  if (failure) std::rethrow_exception(failure);
  if (run.progress) run.progress(samples, samples);

  Bands b;
  b.samples = samples;
  b.seed = seed;
  b.p05.resize(outputs);
  b.p50.resize(outputs);
  b.p95.resize(outputs);
  b.finite_samples.resize(outputs);
  b.mean.resize(outputs);
  std::vector<double> col;
  col.reserve(samples);
  for (int k = 0; k < outputs; ++k) {
    col.clear();
    for (int i = 0; i < samples; ++i) {
      const double v = values[static_cast<std::size_t>(i) * outputs + k];
      if (!std::isnan(v)) col.push_back(v);
    }
    b.finite_samples[k] = static_cast<int>(col.size());
    double sum = 0.0;
    for (double v : col) sum += v;
    b.mean[k] = col.empty() ? std::numeric_limits<double>::quiet_NaN() : sum / static_cast<double>(col.size());
    b.p05[k] = percentile(col, 0.05);
    b.p50[k] = percentile(col, 0.50);
    b.p95[k] = percentile(col, 0.95);
  }
  return b;
}

ProfileBands profile_bands(const Compound& compound, const Library& library,
                           const std::vector<double>& pH_grid, const ProfileConditions& conditions,
                           int samples, std::uint64_t seed, const MonteCarloRun& run) {
  ProfileBands out;
  out.pH = pH_grid;
  out.samples = samples;
  out.seed = seed;
  if (pH_grid.empty()) return out;
  Compound base = compound;
  base.measured.clear();  // not used by the model; keeps per-sample copies small
  base.description.clear();
  const int n = static_cast<int>(pH_grid.size());
  for (double pH : pH_grid) {
    out.nominal_log10_mol_per_L.push_back(
        std::log10(solubility_at_pH(base, library, pH, conditions).solubility_mol_per_L));
  }
  const Bands b = monte_carlo_bands(
      base, n, samples, seed,
      [&](const Compound& c, double* values) {
        for (int k = 0; k < n; ++k) {
          values[k] = std::log10(solubility_at_pH(c, library, pH_grid[k], conditions).solubility_mol_per_L);
        }
      },
      run);
  out.p05_log10_mol_per_L = b.p05;
  out.p50_log10_mol_per_L = b.p50;
  out.p95_log10_mol_per_L = b.p95;
  return out;
}

ScreenBands screen_bands(const Library& library, const ScreenJob& job, const ScreenOptions& options,
                         int samples, std::uint64_t seed, const MonteCarloRun& run) {
  const ScreenReport nominal = screen(library, job, options);  // validates; throws InputError
  ScreenBands out;
  out.samples = samples;
  out.seed = seed;
  const std::size_t nb = nominal.results.size();
  for (const ScreenResult& r : nominal.results) {
    ScreenBand b;
    b.buffer = r.buffer;
    b.nominal_status = screen_status_name(r.status);
    b.nominal_min_conc_mol_per_L = r.status == ScreenStatus::kOk && r.min_conc_mol_per_L
                                       ? *r.min_conc_mol_per_L
                                       : std::numeric_limits<double>::quiet_NaN();
    out.buffers.push_back(b);
  }
  if (nb == 0) return out;
  ScreenJob base = job;
  base.compound.measured.clear();
  base.compound.description.clear();
  // Outputs: min_conc per buffer, then 1/0 for "ok" per buffer (its mean is the ok share).
  const int outputs = static_cast<int>(2 * nb);
  const Bands bands = monte_carlo_bands(
      base.compound, outputs, samples, seed,
      [&](const Compound& c, double* values) {
        ScreenJob s = base;
        s.compound = c;
        const ScreenReport rep = screen(library, s, options);
        for (std::size_t k = 0; k < nb; ++k) {
          const ScreenResult* r = nullptr;
          for (const ScreenResult& x : rep.results) {
            if (x.buffer == out.buffers[k].buffer) r = &x;
          }
          double v = std::numeric_limits<double>::quiet_NaN();
          bool ok = false;
          if (r && r->status == ScreenStatus::kOk && r->min_conc_mol_per_L) {
            v = *r->min_conc_mol_per_L;
            ok = true;
          } else if (r && r->status != ScreenStatus::kOutsideRange) {
            v = std::numeric_limits<double>::infinity();
          }
          values[k] = v;
          values[nb + k] = ok ? 1.0 : 0.0;
        }
      },
      run);
  for (std::size_t k = 0; k < nb; ++k) {
    out.buffers[k].p05_mol_per_L = bands.p05[k];
    out.buffers[k].p50_mol_per_L = bands.p50[k];
    out.buffers[k].p95_mol_per_L = bands.p95[k];
    out.buffers[k].ok_fraction = bands.mean[nb + k];
  }
  return out;
}

void write_screen_bands_text(const ScreenBands& b, std::ostream& out) {
  out << "Monte Carlo bands of min_conc (" << b.samples << " samples, seed " << b.seed
      << "; pKa sd and S0 log-sd of the compound file, Ksp held)\n\n";
  auto mm = [](double v) {
    if (std::isnan(v)) return std::string("n/a");
    if (std::isinf(v)) return std::string("not held");
    return sig(v * 1000.0, 3);
  };
  TextTable t({"buffer", "status", "min conc (mM)", "5 % (mM)", "50 % (mM)", "95 % (mM)", "ok in samples"});
  for (const ScreenBand& s : b.buffers) {
    t.add_row({s.buffer, s.nominal_status, mm(s.nominal_min_conc_mol_per_L), mm(s.p05_mol_per_L),
               mm(s.p50_mol_per_L), mm(s.p95_mol_per_L), fixed(100.0 * s.ok_fraction, 1) + " %"});
  }
  t.write(out);
}

}  // namespace pkarta
