// Dilution into plasma with the open bicarbonate system (arterial pCO2 40 mmHg, CO2 solubility
// 0.0307 mmol/L per mmHg at 37 °C, bicarbonate 24 mmol/L: Siggaard-Andersen, The Acid-Base
// Status of the Blood, 4th ed. 1974; Guyton and Hall, Textbook of Medical Physiology).
//
// Hand calculation of a 1:10 dilution of 50 mM citrate pH 4 into plasma-7.4 at 37 °C. Totals
// (mol/L) after dilution, f = 1/10: citrate 0.005; phosphate 0.9 x 1.0 mM; Na+ = 0.9 x (103 +
// 24 + 1.6) mM + 0.1 x NaOH of the formulation; K+ = 0.9 x 4.2 mM; Cl- = 0.9 x 107 mM. Open
// system: [CO2] = s pCO2 = 0.0307 x 40 = 1.228 mM whatever the acid added, so with aH = 10^-pH
//   [HCO3-] = K1 [CO2] / (aH g1),  [CO3(2-)] = K2 [HCO3-] g1 / (aH g2)
// and for citrate and phosphate the usual fractions with Ka' = Ka g(z_A)/g(z_B). The pH solves
//   Na + K + [H+] = Cl + [OH-] + [HCO3-] + 2[CO3(2-)] + sum z phosphate + sum z citrate,
// with Davies g_z at the ionic strength of the solution, iterated. The constants are the
// library's (thermodynamic, van 't Hoff to 37 °C). A rough estimate: the citrate goes from a mean
// charge of about -0.9 at pH 4 to about -2.8 near pH 7, so 5 mM citrate releases about 9.5 mM H+,
// which turns 9.5 of the 21.6 mM bicarbonate into CO2 that the lungs remove: [HCO3-] about
// 12 mM, pH about pK'(37 °C, I 0.14) 6.20 + log(12/1.228) = 7.2. The equations below are the
// exact form of that estimate; the tolerance asked of the tool is 0.05 pH, and it agrees far
// closer because both solve the same equations.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>

#include "pkarta/analyses/dilute.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

// Mean charge (sum z c / total) of a system at activity pH and ionic strength.
double mean_charge(const AcidBaseSystem& s, double pH, double I, double T) {
  const int n = static_cast<int>(s.pkas.size());
  double w[8] = {1.0};
  double sum = 1.0;
  for (int j = 1; j <= n; ++j) {
    const double ka = std::pow(10.0, -s.pkas[j - 1].at(T));
    const double ratio = ka * davies_gamma(s.charge_of(j - 1), I, T) /
                         (std::pow(10.0, -pH) * davies_gamma(s.charge_of(j), I, T));
    w[j] = w[j - 1] * ratio;
    sum += w[j];
  }
  double z = 0.0;
  for (int j = 0; j <= n; ++j) z += s.charge_of(j) * w[j] / sum;
  return z;
}

double formulation_naoh_for_ph4(const Library& lib) {
  double lo = 0.0, hi = 0.15;
  for (int i = 0; i < 80; ++i) {
    const double mid = 0.5 * (lo + hi);
    Mixture m;
    add_reagent(m, lib, "citric-acid.H2O", 0.05);
    add_reagent(m, lib, "NaOH", mid);
    if (solve(m).pH < 4.0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

TEST(DiluteBlood, CitratePh4IntoPlasmaMatchesTheOpenSystemHandCalculation) {
  const Library lib = builtin_library();
  const double naoh = formulation_naoh_for_ph4(lib);
  Mixture form;
  add_reagent(form, lib, "citric-acid.H2O", 0.05);
  add_reagent(form, lib, "NaOH", naoh);
  DilutionOptions o;
  o.medium_id = "plasma-7.4";
  o.ratios = {10};
  const DilutionResult r = analyse_dilution(form, lib, o);
  ASSERT_TRUE(r.usable()) << r.message;
  EXPECT_EQ(r.blood_model, "open");
  EXPECT_DOUBLE_EQ(r.temperature_C, 37.0);

  // The hand calculation.
  const double T = 37.0;
  const double co2 = 0.0307e-3 * 40.0;
  const double na = 0.9 * (103 + 24 + 1.6) * 1e-3 + 0.1 * naoh, k = 0.9 * 4.2e-3, cl = 0.9 * 107e-3;
  const double phos = 0.9e-3, cit = 0.005;
  const AcidBaseSystem& carb = lib.system("carbonate");
  const double K1 = std::pow(10.0, -carb.pkas[0].at(T)), K2 = std::pow(10.0, -carb.pkas[1].at(T));
  double I = 0.14, pH = 7.0;
  for (int outer = 0; outer < 100; ++outer) {
    const double g1 = davies_gamma(1, I, T), g2 = davies_gamma(2, I, T);
    auto charge = [&](double p, double* ionic) {
      const double aH = std::pow(10.0, -p);
      const double h = aH / g1, oh = std::pow(10.0, -pkw(T)) / aH / g1;
      const double hco3 = K1 * co2 / (aH * g1), co3 = K2 * hco3 * g1 / (aH * g2);
      const double zp = mean_charge(lib.system("phosphate"), p, I, T);
      const double zc = mean_charge(lib.system("citrate"), p, I, T);
      if (ionic) {
        // Ionic strength from the major species (citrate and phosphate at their mean charge
        // squared, a fair approximation at these small totals).
        *ionic = 0.5 * (na + k + cl + h + oh + hco3 + 4 * co3 + phos * zp * zp + cit * zc * zc);
      }
      return na + k + h - cl - oh - hco3 - 2 * co3 + phos * zp + cit * zc;
    };
    double lo = 4.0, hi = 10.0;
    for (int i = 0; i < 100; ++i) {
      const double mid = 0.5 * (lo + hi);
      if (charge(mid, nullptr) > 0) lo = mid;
      else hi = mid;
    }
    pH = 0.5 * (lo + hi);
    double newI = 0;
    charge(pH, &newI);
    if (std::fabs(newI - I) < 1e-10) break;
    I = newI;
  }
  std::printf("  1:10 citrate pH 4 into plasma, open, 37 C: pkarta %.4f  hand %.4f  (I = %.4f)\n", r.points[0].pH, pH, I);
  EXPECT_NEAR(r.points[0].pH, pH, 0.05);
  EXPECT_GT(pH, 6.9);
  EXPECT_LT(pH, 7.3);
}

// The open system holds dissolved CO2 at s pCO2 (the closed medium keeps its carbonate total
// and ends lower, since the CO2 made from bicarbonate stays); the output says which is used.
TEST(DiluteBlood, ClosedStaysAnOptionAndOutputsSayWhich) {
  const Library lib = builtin_library();
  Mixture form;
  add_reagent(form, lib, "citric-acid.H2O", 0.05);
  DilutionOptions o;
  o.medium_id = "plasma-7.4";
  o.ratios = {10};
  const DilutionResult open = analyse_dilution(form, lib, o);
  o.blood_model = BloodModel::kClosed;
  const DilutionResult closed = analyse_dilution(form, lib, o);
  ASSERT_TRUE(open.usable() && closed.usable());
  EXPECT_EQ(closed.blood_model, "closed");
  EXPECT_GT(open.points[0].pH, closed.points[0].pH + 0.05);
  bool open_note = false, closed_note = false;
  for (const std::string& n : open.notes) open_note = open_note || n.find("blood model: open") != std::string::npos;
  for (const std::string& n : closed.notes) closed_note = closed_note || n.find("blood model: closed") != std::string::npos;
  EXPECT_TRUE(open_note);
  EXPECT_TRUE(closed_note);

  // The open model's mixture holds [CO2] = 1.228 mM.
  Mixture m = diluted_mixture(form, lib, "plasma-7.4", 10);
  m.temperature_C = 37.0;
  Equilibrium e;
  open_carbonate_mixture(m, 1.228e-3, SolverOptions{}, &e);
  double c = 0;
  for (const Species& s : e.species) {
    if (s.system == "carbonate" && s.charge == 0) c += s.conc_mol_per_L;
  }
  EXPECT_NEAR(c, 1.228e-3, 1e-9);

  // Saline has no bicarbonate: the open model is refused, the auto model leaves it alone.
  o.medium_id = "saline-0.9";
  o.blood_model = BloodModel::kOpen;
  EXPECT_THROW(analyse_dilution(form, lib, o), InputError);
  o.blood_model = BloodModel::kAuto;
  EXPECT_EQ(analyse_dilution(form, lib, o).blood_model, "");
}

}  // namespace
}  // namespace pkarta
