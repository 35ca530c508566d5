// Monte Carlo propagation of the compound's pKa and intrinsic-solubility uncertainties.
//
// Each sample draws every pKa from N(value, sd) and log10 S0 from N(log10 S0, log-sd)
// (independent normals; a constant with sd 0 stays fixed). Salt Ksp values are held at their
// resolved values. Each sample has its own random stream, seeded from the master seed and the
// sample index (splitmix64, then mt19937_64 and Box-Muller, all specified exactly), so results
// are the same whatever the number of threads and on every standard library.
//
// Bands are the 5th, 50th and 95th percentiles over the samples (linear interpolation between
// order statistics), per output.
#ifndef PKARTA_UNCERTAINTY_H_
#define PKARTA_UNCERTAINTY_H_

#include <cstdint>
#include <functional>
#include <ostream>
#include <vector>

#include "pkarta/chem/model.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/analyses/screen.h"

namespace pkarta {

/// How a Monte Carlo run is carried out (not what it computes).
struct MonteCarloRun {
  int threads = 0;  ///< worker threads; 0: std::thread::hardware_concurrency()
  /// Called on the calling thread as samples complete (done, total); may be empty.
  /// The library never prints: a command-line layer can draw a progress bar here.
  std::function<void(int done, int total)> progress;
};

/// The compound for sample `index` of a run seeded with `seed` (pKa values and S0 perturbed).
Compound sample_compound(const Compound& compound, std::uint64_t seed, int index);

/// Percentile bands of several outputs.
struct Bands {
  std::vector<double> p05, p50, p95;  ///< per output, over the sample values that are not NaN
  std::vector<double> mean;           ///< per output, over the same values
  std::vector<int> finite_samples;    ///< per output: samples that gave a value (not NaN)
  int samples = 0;
  std::uint64_t seed = 0;
};

/// Runs `samples` samples; `evaluate(sample_compound, out)` fills `outputs` values per sample
/// (NaN: not available for that sample, e.g. not achievable). `evaluate` is called from several
/// threads at once and must not modify shared state.
/// Throws std::invalid_argument when samples < 1 or outputs < 1.
Bands monte_carlo_bands(const Compound& compound, int outputs, int samples, std::uint64_t seed,
                        const std::function<void(const Compound&, double* out)>& evaluate,
                        const MonteCarloRun& run = {});

/// Percentile q (0..1) of values (sorted copy, linear interpolation between order statistics).
double percentile(std::vector<double> values, double q);

/// Bands of a pH-solubility profile.
struct ProfileBands {
  std::vector<double> pH;
  std::vector<double> nominal_log10_mol_per_L;  ///< the compound as given (no sampling)
  std::vector<double> p05_log10_mol_per_L;      ///< 5th percentile of log10 S
  std::vector<double> p50_log10_mol_per_L;
  std::vector<double> p95_log10_mol_per_L;
  int samples = 0;
  std::uint64_t seed = 0;
};

/// 5/50/95 % bands of log10 solubility (mol/L, solubility_at_pH) over a pH grid, from the
/// compound's pKa sd and S0 log-sd.
/// Example: profile_bands(compound, library, {1.0, 1.05, ..., 13.0}, conditions, 1000, 42)
ProfileBands profile_bands(const Compound& compound, const Library& library,
                           const std::vector<double>& pH_grid, const ProfileConditions& conditions,
                           int samples, std::uint64_t seed, const MonteCarloRun& run = {});

/// Bands of one buffer's min_conc over the samples.
struct ScreenBand {
  std::string buffer;                 ///< buffer id
  std::string nominal_status;         ///< status with the compound as given ("ok", ...)
  double nominal_min_conc_mol_per_L = 0.0;  ///< NaN unless nominal_status is "ok"
  /// Percentiles of min_conc (mol/L). A sample whose status is not "ok" (not-achievable or
  /// dose-not-soluble) counts as +infinity, so p95 = +inf means: not held in more than 5 % of
  /// the samples. "outside-range" does not depend on the drug and gives NaN bands.
  double p05_mol_per_L = 0.0;
  double p50_mol_per_L = 0.0;
  double p95_mol_per_L = 0.0;
  double ok_fraction = 0.0;           ///< share of samples with status "ok"
};

/// Bands of a screen: one entry per buffer, in the order of the nominal screen's ranking.
struct ScreenBands {
  std::vector<ScreenBand> buffers;
  int samples = 0;
  std::uint64_t seed = 0;
};

/// 5/50/95 % bands of min_conc per buffer from the compound's pKa sd and S0 log-sd: each sample
/// runs the whole screen (screen.h) on the sampled compound, serially, the samples in parallel.
/// Throws InputError as screen() does.
/// Example: screen_bands(library, job, options, 1000, 42)
ScreenBands screen_bands(const Library& library, const ScreenJob& job, const ScreenOptions& options,
                         int samples, std::uint64_t seed, const MonteCarloRun& run = {});

/// Text table of the screen bands (buffer, nominal min_conc, 5/50/95 % in mM, share ok).
void write_screen_bands_text(const ScreenBands& bands, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_UNCERTAINTY_H_
