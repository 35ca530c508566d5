// The report's request and analysis: runs the analyses a request asks for into a ReportData.
#include "pkarta/report/report.h"

#include <cmath>
#include <cstdlib>
#include <ctime>

#include "pkarta/base/error.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {

bool ReportRequest::is_valid(std::string* error) const {
  auto bad = [&](const std::string& m) {
    if (error) *error = "ReportRequest::" + m;
    return false;
  };
  if (!(dose_mol_per_L >= 0.0) || !std::isfinite(dose_mol_per_L)) return bad("dose_mol_per_L must be >= 0");
  if (target_pH && !(*target_pH >= 0.0 && *target_pH <= 14.0)) return bad("target_pH must lie in 0-14");
  if (!(tolerance_pH > 0.0)) return bad("tolerance_pH = " + sig(tolerance_pH) + ", must be > 0");
  if (!(profile_step_pH > 0.0)) return bad("profile_step_pH = " + sig(profile_step_pH) + ", must be > 0");
  if (!(profile_to_pH > profile_from_pH)) return bad("profile_to_pH must be above profile_from_pH");
  if ((profile_to_pH - profile_from_pH) / profile_step_pH > 10000) return bad("profile has more than 10000 points");
  if (!(temperature_C >= -10.0 && temperature_C <= 100.0)) return bad("temperature_C must lie in -10..100");
  return true;
}

double round_up_125(double x) {
  if (!(x > 0) || !std::isfinite(x)) return x;
  const double mag = std::pow(10.0, std::floor(std::log10(x)));
  for (double m : {1.0, 2.0, 5.0, 10.0}) {
    if (m * mag >= x * (1.0 - 1e-12)) return m * mag;
  }
  return 10.0 * mag;
}

std::string report_date_utc() {
  std::time_t t = std::time(nullptr);
  if (const char* e = std::getenv("SOURCE_DATE_EPOCH"); e && *e) {
    const std::string s = e;
    if (s.find_first_not_of("0123456789") != std::string::npos || s.size() > 15) {
      throw InputError(SourceLocation{"SOURCE_DATE_EPOCH", 0, 0},
                       "expected a number of seconds since 1970-01-01 UTC, got \"" + s + "\"");
    }
    t = static_cast<std::time_t>(std::stoll(s));
  }
  std::tm tm{};
  gmtime_r(&t, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%d", &tm);
  return buf;
}

ReportData analyse_report(const Compound& compound, const Library& library, const ReportRequest& request,
                          const RunRecord& run) {
  std::string why;
  if (!request.is_valid(&why)) throw InputError(why);
  ReportData d;
  d.compound = compound;
  d.request = request;
  d.free_molar_mass_g_per_mol = compound.molar_mass_g_per_mol;
  d.form_molar_mass_g_per_mol = form_molar_mass(compound, request.form, library);
  for (const Salt& s : compound.salts) d.salt_ksp_at_run_temperature.push_back(salt_ksp_at(s, request.temperature_C));

  // Provenance.
  Provenance& p = d.provenance;
  p.library_id = library.id;
  p.library_version = library.version;
  p.date_utc = run.date_utc;
  p.command_line = run.command_line;
  p.inputs = run.inputs;

  // pH-solubility profile in water, pH held by HCl or NaOH, with pHmax.
  const ProfileConditions cond = ProfileConditions::in_water(request.temperature_C, request.activity);
  const ProfileGrid grid = ProfileGrid::range(request.profile_from_pH, request.profile_to_pH, request.profile_step_pH);
  d.profile = compute_profile(compound, library, cond, grid);

  // Solubility classification at 37 °C (ICH M9).
  if (request.classify_dose_mg) {
    ClassifyOptions co;
    co.dose_mg = *request.classify_dose_mg;
    co.form = request.form;
    co.activity = request.activity;
    d.classification = classify(compound, library, co);
  }

  // The medium the formulation is diluted into: the one asked, else the route's.
  std::string dilution_medium = request.dilution_medium;
  if (dilution_medium.empty()) {
    dilution_medium = request.route == "parenteral" ? "plasma-7.4" : request.route == "oral" ? "sif-6.8" : "saline-0.9";
    if (!library.media.count(dilution_medium)) dilution_medium = "none";
  }

  // Buffer screen at the target pH (each ok formulation also diluted into that medium), and the
  // drift curves of its leading buffers.
  if (request.target_pH && request.dose_mol_per_L > 0.0) {
    ScreenOptions so;
    if (dilution_medium != "none") so.dilution_medium = dilution_medium;
    so.target_pH = *request.target_pH;
    so.tolerance_pH = request.tolerance_pH;
    so.temperature_C = request.temperature_C;
    so.buffers = request.buffers;
    so.route = request.route;
    so.activity = request.activity;
    ScreenJob job{compound, request.dose_mol_per_L, request.form};
    d.screen = screen(library, job, so);
    for (const ScreenResult& r : d.screen->results) {
      if (r.status == ScreenStatus::kOutsideRange) continue;
      const AcidBaseSystem& sys = library.system(library.buffer(r.buffer).system);
      d.provenance.buffer_sources.emplace_back(r.buffer, sys.source.empty() ? std::string("not given") : sys.source);
    }
    for (const ScreenResult& r : d.screen->results) {
      if (static_cast<int>(d.drift.size()) >= request.drift_buffers) break;
      if (r.status != ScreenStatus::kOk && r.status != ScreenStatus::kNotAchievable) continue;
      const Buffer& buffer = library.buffer(r.buffer);
      DriftCurve curve{r.buffer, r.name, {}, {}, r.min_conc_mol_per_L};
      const double top = buffer.max_conc_mol_per_L, bottom = std::min(1e-4, top / 100.0);
      const int points = 25;
      for (int i = 0; i < points; ++i) {
        const double c = bottom * std::pow(top / bottom, static_cast<double>(i) / (points - 1));
        curve.conc_mol_per_L.push_back(c);
        curve.pH_after_drug.push_back(ph_after_drug(library, buffer, c, compound, request.dose_mol_per_L, request.form, so));
      }
      d.drift.push_back(std::move(curve));
    }
  }

  // Recipe of the leading buffer, and the formulation diluted into a medium.
  const ScreenResult* lead = nullptr;
  if (d.screen) {
    for (const ScreenResult& r : d.screen->results) {
      if (r.status == ScreenStatus::kOk) {
        lead = &r;
        break;
      }
    }
  }
  // The recommended formulation: where Davies activities are known to drift (ionic strength
  // and multivalent buffer anions), the summary says so and names the closer models; then the
  // formulation diluted into the route's medium (or the one asked).
  auto check_and_dilute = [&](const Mixture& formulation, std::vector<std::string> inputs) {
    if (const Equilibrium e = solve(formulation); e.usable()) {
      if (const std::string hint = activity_model_hint(formulation, e); !hint.empty()) {
        d.warnings.push_back("formulation: " + hint);
      }
    }
    if (dilution_medium == "none") return;
    DilutionOptions dl;
    dl.medium_id = dilution_medium;
    DilutionResult r = analyse_dilution(formulation, library, dl, std::move(inputs));
    if (r.usable()) d.dilution = std::move(r);
    else d.warnings.push_back("dilution: " + r.message);
  };
  auto recipe_options = [&](const ScreenResult& r) {
    RecipeOptions ro;
    ro.buffer = r.buffer;
    ro.pH = *request.target_pH;
    ro.conc_mol_per_L = *r.recommended_conc_mol_per_L;  // the screen's one recommended strength
    ro.volume_L = request.recipe_volume_L;
    ro.temperature_C = request.temperature_C;
    ro.isotonic = request.route == "parenteral" || request.route == "ophthalmic";
    ro.activity = request.activity;
    return ro;
  };
  if (lead && lead->recommended_conc_mol_per_L) {
    RecipeOptions ro = recipe_options(*lead);
    // Sodium chloride would bring the counterion of a Cl- or Na+ salt (common-ion effect):
    // make such a recipe isotonic with dextrose when the library has it.
    if (ro.isotonic && library.reagents.count("dextrose")) {
      for (const Salt& salt : compound.salts) {
        if (salt.counterion == "Cl-" || salt.counterion == "Na+") {
          ro.tonicity_reagent = "dextrose";
          d.recipe_tonicity_note = "Made isotonic with dextrose, not sodium chloride: NaCl brings " + salt.counterion +
                                   ", the counterion of the " + salt.id + ", whose solubility it would lower (common-ion effect). "
                                   "Dextrose is added until the osmolality estimate (osmotic coefficient " +
                                   fixed(kOsmoticCoefficient, 2) + ") reaches " + fixed(kIsotonicTarget_mOsm_per_kg, 0) +
                                   " mOsm/kg; the osmolality must be measured.";
          break;
        }
      }
    }
    d.recipe = make_recipe(library, ro);
    Mixture formulation = recipe_mixture(library, *d.recipe, request.activity);
    add_drug(formulation, library, compound, request.dose_mol_per_L, request.form);
    check_and_dilute(formulation, {d.recipe->buffer_name + " " + sig(d.recipe->conc_mol_per_L * 1e3, 3) + " mM",
                                   compound.id + " " + request.dose_text});
  } else if (d.screen && d.screen->fallback && !d.screen->fallback->adjusted.empty() &&
             d.screen->fallback->adjusted.front().recommended_conc_mol_per_L) {
    // No buffer holds the target made first; the first that does with the pH adjusted after the
    // dose gets the recipe of the whole formulation (make_formulation chooses the tonicity reagent).
    const ScreenResult& alt = d.screen->fallback->adjusted.front();
    try {
      d.adjusted_formulation = make_formulation(library, recipe_options(alt), compound, request.dose_mol_per_L,
                                                request.form, ScreenPreparation::kAdjusted);
      const Formulation& f = *d.adjusted_formulation;
      check_and_dilute(formulation_mixture(library, f, compound, request.activity),
                       {f.recipe.buffer_name + " " + sig(f.recipe.conc_mol_per_L * 1e3, 3) + " mM, pH adjusted after the dose",
                        compound.id + " " + request.dose_text});
    } catch (const std::exception& e) {
      d.warnings.push_back(std::string("recipe of the adjusted formulation: ") + e.what());
    }
  }

  // Uncertainty band of the profile (Monte Carlo over the pKa and S0 uncertainties).
  bool has_sd = compound.s0_log_sd > 0;
  for (const Pka& k : compound.system.pkas) has_sd = has_sd || k.sd > 0;
  if (request.uncertainty_samples > 0 && has_sd) {
    std::vector<double> grid;
    // An integer counter: the grid points do not accumulate rounding.
    const int n = static_cast<int>(std::floor((request.profile_to_pH - request.profile_from_pH) /
                                              request.uncertainty_step_pH + 1e-9));
    for (int i = 0; i <= n; ++i) grid.push_back(request.profile_from_pH + i * request.uncertainty_step_pH);
    MonteCarloRun run;
    run.threads = 0;
    if (request.progress) {
      run.progress = [&request](int done, int total) {
        request.progress(static_cast<std::size_t>(done), static_cast<std::size_t>(total));
      };
    }
    d.uncertainty = profile_bands(compound, library, grid, cond, request.uncertainty_samples, request.uncertainty_seed, run);
  }

  // Fit of the constants to the measured points of the compound file.
  if (request.fit_measured && !compound.measured.empty()) {
    const std::vector<FitPoint> points = fit_points_from_compound(compound);
    FitOptions fo;
    fo.conditions = cond;
    std::vector<FitParameter> params = default_fit_parameters(compound, library, points, fo);
    if (!params.empty() && points.size() > params.size()) {
      d.fit = fit_solubility(compound, library, points, params, fo);
    }
  }

  // The dose in water alone.
  if (request.dose_mol_per_L > 0.0) {
    Mixture m;
    m.temperature_C = request.temperature_C;
    m.activity = request.activity;
    add_drug(m, library, compound, request.dose_mol_per_L, request.form);
    MixResult r = analyse_mix(m, {compound.id + " " + request.dose_text});
    if (r.equilibrium.usable()) d.dose_in_water = std::move(r);
    else d.warnings.push_back("the dose in water did not converge: " + r.equilibrium.message);
  }
  for (const std::string& w : d.profile.warnings) d.warnings.push_back(w);
  if (d.classification) {
    for (const std::string& w : d.classification->warnings) d.warnings.push_back("classification: " + w);
  }
  if (d.screen) {
    // The recipe of the report is made isotonic for these routes: the warning that the buffer
    // alone is hypotonic is answered there.
    const bool isotonic_recipe = (d.recipe && d.recipe->isotonic) ||
                                 (d.adjusted_formulation && d.adjusted_formulation->recipe.isotonic);
    for (const std::string& w : d.screen->warnings) {
      if (isotonic_recipe && w.rfind(kLowOsmolalityWarningStart, 0) == 0) continue;
      d.warnings.push_back(w);
    }
  }
  return d;
}

}  // namespace pkarta
