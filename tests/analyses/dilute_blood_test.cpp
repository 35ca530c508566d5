// Dilution into plasma with the open bicarbonate system (arterial pCO2 40 mmHg, CO2 solubility
// 0.0307 mmol/L per mmHg at 37 °C, bicarbonate 24 mmol/L: Siggaard-Andersen, The Acid-Base
// Status of the Blood, 4th ed. 1974; Guyton and Hall, Textbook of Medical Physiology) and the
// non-bicarbonate buffer of the Van Slyke equation (Siggaard-Andersen 1977, Scand. J. Clin. Lab.
// Invest. 37 Suppl 146, 15-20: beta = 7.7 mmol/L per pH for plasma, 1.43 cHb + 7.7 for whole
// blood, cHb 9.3 mmol/L; recalled from Siggaard-Andersen 1977, to be verified), as a linear term
// beta (1 - 1/r) (7.4 - pH) in the charge balance of the hand calculation.
//
// Hand calculation of a 1:10 dilution of 50 mM citrate pH 4 into plasma-7.4 at 37 °C. Totals
// (mol/L) after dilution, f = 1/10: citrate 0.005; phosphate 0.9 x 1.0 mM; Na+ = 0.9 x (103 +
// 24 + 1.6) mM + 0.1 x NaOH of the formulation; K+ = 0.9 x 4.2 mM; Cl- = 0.9 x 107 mM. Open
// system: [CO2] = s pCO2 = 0.0307 x 40 = 1.228 mM whatever the acid added, so with aH = 10^-pH
//   [HCO3-] = K1 [CO2] / (aH g1),  [CO3(2-)] = K2 [HCO3-] g1 / (aH g2)
// and for citrate and phosphate the usual fractions with Ka' = Ka g(z_A)/g(z_B). The pH solves
//   Na + K + [H+] + beta' (7.4 - pH) = Cl + [OH-] + [HCO3-] + 2[CO3(2-)] + sum z phosphate
//                                      + sum z citrate,
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

// Buffer value (mol/L per pH) of 1.0 mM phosphate at pH 7.4, 37 °C, ionic strength I: ln(10) C
// times the variance of the species charge (Van Slyke 1922, J. Biol. Chem. 52, 525), from the
// mean charge and its finite-difference slope: var z = -dz/dpH / ln 10.
double phosphate_beta_at_74(const Library& lib, double I) {
  const AcidBaseSystem& p = lib.system("phosphate");
  const double dz = mean_charge(p, 7.4005, I, 37.0) - mean_charge(p, 7.3995, I, 37.0);
  return -1.0e-3 * dz / 0.001;
}

// The medium's ionic strength (about 0.13 mol/L, the library's note on plasma-7.4); the phosphate
// part of beta barely moves with it (0.003 mmol/L per pH between I 0.12 and 0.14).
constexpr double kPlasmaMediumI = 0.13;

// The plasma value 7.7 mmol/L per pH holds phosphate; the medium's 1.0 mM phosphate is in the
// hand calculation explicitly, so the linear term carries 7.7 less its buffer value at pH 7.4.
double protein_beta(const Library& lib, double beta_total) { return beta_total - phosphate_beta_at_74(lib, kPlasmaMediumI); }

// Options of a 1:10 dilution into plasma-7.4 (the medium of every case below).
DilutionOptions plasma_1_in_10() {
  DilutionOptions o;
  o.medium_id = "plasma-7.4";
  o.ratios = {10};
  return o;
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

// The hand calculation at 37 °C of a 1:10 dilution into plasma-7.4: strong cations `na` (mol/L,
// with the medium's sodium), extra chloride `cl_extra` of the formulation, citrate total `cit`,
// the linear non-bicarbonate buffer `beta` (mol/L per pH, already times 0.9) about pH 7.4.
double hand_ph(const Library& lib, double na, double cl_extra, double cit, double beta) {
  const double T = 37.0;
  const double co2 = 0.0307e-3 * 40.0;
  const double k = 0.9 * 4.2e-3, cl = 0.9 * 107e-3 + cl_extra;
  const double phos = 0.9e-3;
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
      return na + k + h - cl - oh - hco3 - 2 * co3 + phos * zp + cit * zc + beta * (7.4 - p);
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
  return pH;
}

TEST(DiluteBlood, CitratePh4IntoPlasmaMatchesTheOpenSystemHandCalculation) {
  const Library lib = builtin_library();
  const double naoh = formulation_naoh_for_ph4(lib);
  Mixture form;
  add_reagent(form, lib, "citric-acid.H2O", 0.05);
  add_reagent(form, lib, "NaOH", naoh);
  DilutionOptions o = plasma_1_in_10();
  const DilutionResult r = analyse_dilution(form, lib, o);
  ASSERT_TRUE(r.usable()) << r.message;
  EXPECT_EQ(r.blood_model, "open");
  EXPECT_DOUBLE_EQ(r.temperature_C, 37.0);

  const double pH = hand_ph(lib, 0.9 * (103 + 24 + 1.6) * 1e-3 + 0.1 * naoh, 0.0, 0.005, 0.9 * protein_beta(lib, 7.7e-3));
  std::printf("  1:10 citrate pH 4 into plasma, open, 37 C: pkarta %.4f  hand %.4f  \n", r.points[0].pH, pH);
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
  DilutionOptions o = plasma_1_in_10();
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

// An invented acidic formulation, 50 mM citric acid with 10 mM HCl, 1:10 into plasma at 37 °C:
// about 15 mM of protons from citrate and 1 mM from HCl meet 21.6 mM bicarbonate; without the
// non-bicarbonate buffer pH about 6.9, with it (0.9 x 7.7 mmol/L per pH) the proteins take up
// some of the protons and the pH ends nearer 7.4. Whole blood (1.43 x 9.3 + 7.7 = 21.0 mmol/L
// per pH) pulls it nearer still.
TEST(DiluteBlood, CitricAcidHclIntoPlasmaAndWholeBlood) {
  const Library lib = builtin_library();
  Mixture form;
  add_reagent(form, lib, "citric-acid.H2O", 0.05);
  add_reagent(form, lib, "HCl", 0.01);
  DilutionOptions o = plasma_1_in_10();
  const DilutionResult plasma = analyse_dilution(form, lib, o);
  o.blood = BloodKind::kWhole;
  const DilutionResult whole = analyse_dilution(form, lib, o);
  ASSERT_TRUE(plasma.usable() && whole.usable());
  EXPECT_NEAR(plasma.non_bicarbonate_buffer_mM_per_pH, 7.7, 1e-12);
  EXPECT_NEAR(whole.non_bicarbonate_buffer_mM_per_pH, 1.43 * 9.3 + 7.7, 1e-12);
  EXPECT_EQ(plasma.blood, "plasma");
  EXPECT_EQ(whole.blood, "whole");
  EXPECT_NE(plasma.blood_description.find("open CO2 at pCO2 40"), std::string::npos) << plasma.blood_description;
  EXPECT_NE(plasma.blood_description.find("plasma non-bicarbonate buffer 7.7"), std::string::npos);

  const double na = 0.9 * (103 + 24 + 1.6) * 1e-3;
  const double hand_plasma = hand_ph(lib, na, 0.001, 0.005, 0.9 * protein_beta(lib, 7.7e-3));
  const double hand_whole = hand_ph(lib, na, 0.001, 0.005, 0.9 * protein_beta(lib, (1.43 * 9.3 + 7.7) * 1e-3));
  const double hand_none = hand_ph(lib, na, 0.001, 0.005, 0.0);
  std::printf("  1:10 citric acid 50 mM + HCl 10 mM into plasma, 37 C: plasma pkarta %.4f hand %.4f; "
              "whole blood pkarta %.4f hand %.4f; no protein buffer (hand) %.4f\n",
              plasma.points[0].pH, hand_plasma, whole.points[0].pH, hand_whole, hand_none);
  EXPECT_NEAR(plasma.points[0].pH, hand_plasma, 0.05);
  EXPECT_NEAR(whole.points[0].pH, hand_whole, 0.05);
  // The buffer matters here: the hand results without it lie well apart.
  EXPECT_GT(hand_plasma - hand_none, 0.08);
  EXPECT_LT(std::fabs(whole.points[0].pH - 7.4), std::fabs(plasma.points[0].pH - 7.4) - 0.05);
  EXPECT_LT(plasma.points[0].pH, 7.4);

  // The whole-blood option needs a plasma or blood medium.
  o.medium_id = "saline-0.9";
  EXPECT_THROW(analyse_dilution(form, lib, o), InputError);
}

// Plasma's 7.7 mmol/L per pH includes its inorganic phosphate (Siggaard-Andersen 1977, as above);
// the medium's 1.0 mM phosphate is solved explicitly, so the lumped buffer carries the rest and
// the total at pH 7.4 stays 7.7. Hand value: about 0.3 mmol/L per pH (1 mM, pK2' near 6.8 at
// 37 °C and I 0.13, so HPO4 2- about 0.8: ln 10 x 0.8 x 0.2 = 0.37 before the conditional shift).
TEST(DiluteBlood, MediumPhosphateIsNotCountedTwice) {
  const Library lib = builtin_library();
  Mixture form;
  add_reagent(form, lib, "NaCl", 0.154);
  const DilutionResult r = analyse_dilution(form, lib, plasma_1_in_10());
  ASSERT_TRUE(r.usable()) << r.message;
  const double hand = 1e3 * phosphate_beta_at_74(lib, kPlasmaMediumI);
  EXPECT_NEAR(r.medium_explicit_buffer_mM_per_pH, hand, 0.01);
  EXPECT_GT(hand, 0.2);
  EXPECT_LT(hand, 0.45);
  EXPECT_NEAR(r.lumped_buffer_mM_per_pH + r.medium_explicit_buffer_mM_per_pH, 7.7, 1e-12);
  EXPECT_NE(r.blood_description.find("of which 0.38 mmol/L/pH is the medium's own phosphate, solved explicitly"), std::string::npos) << r.blood_description;
}

// The lumped buffer's own value at pH 7.4 and I 0.15: beta = ln(10) C x variance of the proton
// number (buffer value, Van Slyke 1922, J. Biol. Chem. 52, 525), and by finite difference.
TEST(DiluteBlood, LumpedBufferHasTheStatedValueAt74) {
  const Library lib = builtin_library();
  const double I = 0.15, T = 37.0;
  const AcidBaseSystem s = blood_buffer_system(I, T);
  const double C = blood_buffer_total(7.7e-3);
  // Fractions with conditional constants K' (pH = -log aH): both pK' must be 7.4.
  const double g1 = davies_gamma(1, I, T);
  EXPECT_NEAR(s.pkas[0].at(T) - std::log10(g1), 7.4, 1e-12);
  EXPECT_NEAR(s.pkas[1].at(T) + std::log10(g1), 7.4, 1e-12);
  // Each species a third at pH = pK': variance of the proton number 2/3.
  const double beta = std::log(10.0) * C * (2.0 / 3.0);
  EXPECT_NEAR(beta, 7.7e-3, 1e-9);
  EXPECT_NEAR(mean_charge(s, 7.4, I, T), 0.0, 1e-9);
  // Buffer value by finite difference of the mean charge: beta = -C dz/dpH.
  const double dz = mean_charge(s, 7.401, I, T) - mean_charge(s, 7.399, I, T);
  EXPECT_NEAR(-C * dz / 0.002, 7.7e-3, 1e-5);
}

}  // namespace
}  // namespace pkarta
