// pH-solubility profiles: Henderson-Hasselbalch limits, pHmax, common-ion effect, a worked
// example from the literature, and the command line's handling of bad input.
#include <gtest/gtest.h>

#include "cli_run.h"
#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

#include "pkarta/chem/mixture_builder.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/writers/profile_writer.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace {

using pkarta_test::RunResult;
using pkarta_test::run;
using pkarta_test::temp_dir;
using pkarta_test::write_file;
using pkarta_test::slurp;

using namespace pkarta;

constexpr double kClosedFormRel = 1e-9;  // required accuracy of the ideal HH checks (relative)

const Library& lib() {
  static const Library l = builtin_library();
  return l;
}

Compound compound_from(const std::string& xml) { return parse_compound(xml, "<test compound>", lib(), nullptr); }

// A compound with the given pKa elements and S0 in mol/L (molar mass 300, invented).
Compound make_compound(const std::string& pkas, double s0_mol_per_L, const std::string& extra = "") {
  std::ostringstream x;
  x.precision(17);
  x << "<compound id=\"t\" name=\"test compound\" molar-mass=\"300\">" << pkas
    << "<intrinsic-solubility value=\"" << s0_mol_per_L << "\" unit=\"M\"/>" << extra << "</compound>";
  return compound_from(x.str());
}

ProfileConditions ideal_water(double t = 25.0) {
  ProfileConditions c;
  c.activity = ActivityModel::kIdeal;
  c.temperature_C = t;
  return c;
}

double rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

// Checks solubility (ideal mode) and the reported ideal curve against a closed form on 1-13.
template <typename F>
void expect_closed_form(const Compound& c, F closed_form, const ProfileConditions& cond) {
  SolubilityScanner s(c, lib(), cond);
  int checked = 0;
  for (double pH = 1.0; pH <= 13.0 + 1e-9; pH += 0.125) {
    const SolubilityAtPh r = s.at(pH);
    const double expected = closed_form(pH);
    if (expected >= kSolubilityCap_mol_per_L) {
      EXPECT_TRUE(r.capped) << "pH " << pH;
      continue;
    }
    EXPECT_LT(rel(r.solubility_mol_per_L, expected), kClosedFormRel) << "pH " << pH;
    EXPECT_LT(rel(r.ideal_solubility_mol_per_L, expected), kClosedFormRel) << "pH " << pH;
    EXPECT_EQ(r.limiting_solid, "free");
    ++checked;
  }
  EXPECT_GT(checked, 40);
}

// --- Henderson-Hasselbalch closed forms ---------------------------------------------------
// Avdeef 2003, Absorption and Drug Development, section 6.1: acid
// S = S0 (1 + 10^(pH - pKa)); base S = S0 (1 + 10^(pKa - pH)); ampholyte (eq. 6.7)
// S = S0 (1 + 10^(pH - pKa2) + 10^(pKa1 - pH)); diacidic base
// S = S0 (1 + 10^(pKa,hi - pH) + 10^(pKa,hi + pKa,lo - 2 pH)) (standard form, Avdeef 2003).
// Constants: indomethacin, miconazole, ciprofloxacin as given in Avdeef 2003, Figs. 6.1a-6.3a.

TEST(ProfileIdeal, MonoproticAcidMatchesHendersonHasselbalch) {
  const double pka = 4.42, s0 = std::pow(10.0, -5.58);  // indomethacin (Avdeef 2003)
  const Compound c = make_compound("<pka value=\"4.42\" type=\"acid\"/>", s0);
  expect_closed_form(c, [&](double pH) { return s0 * (1 + std::pow(10.0, pH - pka)); }, ideal_water());
}

TEST(ProfileIdeal, MonoproticBaseMatchesHendersonHasselbalch) {
  const double pka = 6.07, s0 = std::pow(10.0, -5.85);  // miconazole (Avdeef 2003)
  const Compound c = make_compound("<pka value=\"6.07\" type=\"base\"/>", s0);
  expect_closed_form(c, [&](double pH) { return s0 * (1 + std::pow(10.0, pka - pH)); }, ideal_water());
}

TEST(ProfileIdeal, DiproticBaseMatchesHendersonHasselbalch) {
  const double lo = 3.1, hi = 8.4, s0 = 3.85e-5;  // invented
  const Compound c = make_compound("<pka value=\"3.1\" type=\"base\"/><pka value=\"8.4\" type=\"base\"/>", s0);
  expect_closed_form(
      c, [&](double pH) { return s0 * (1 + std::pow(10.0, hi - pH) + std::pow(10.0, hi + lo - 2 * pH)); },
      ideal_water());
}

TEST(ProfileIdeal, AmpholyteMatchesAvdeefEquation) {
  const double pka1 = 6.16, pka2 = 8.62, s0 = std::pow(10.0, -3.72);  // ciprofloxacin (Avdeef 2003)
  const Compound c = make_compound("<pka value=\"6.16\" type=\"acid\"/><pka value=\"8.62\" type=\"base\"/>", s0);
  expect_closed_form(
      c, [&](double pH) { return s0 * (1 + std::pow(10.0, pH - pka2) + std::pow(10.0, pka1 - pH)); },
      ideal_water());
}

TEST(ProfileIdeal, DiproticAcidAtBodyTemperatureUsesVanTHoffConstants) {
  // pKa(T) by the Goldberg, Kishore and Lennen (2002) form and S0(T) by van 't Hoff with the
  // enthalpy of solution, then the diprotic-acid HH form S0 (1 + Ka1/h + Ka1 Ka2/h^2).
  const Compound c = make_compound(
      "<pka value=\"3.5\" type=\"acid\" dH=\"8\" dCp=\"-100\"/><pka value=\"7.2\" type=\"acid\" dH=\"20\"/>", 2e-4,
      "");
  Compound c2 = c;
  c2.s0_dH_kJ_per_mol = 25.0;
  const double T = 310.15, T0 = 298.15, R = 8.314462618, ln10 = std::log(10.0);
  const double pk1 = 3.5 + 8000 / (R * ln10) * (1 / T - 1 / T0) - (-100) / (R * ln10) * (T0 / T - 1 + std::log(T / T0));
  const double pk2 = 7.2 + 20000 / (R * ln10) * (1 / T - 1 / T0);
  const double s0 = 2e-4 * std::exp(-25000 / R * (1 / T - 1 / T0));
  expect_closed_form(
      c2, [&](double pH) { return s0 * (1 + std::pow(10.0, pH - pk1) + std::pow(10.0, 2 * pH - pk1 - pk2)); },
      ideal_water(37.0));
}

TEST(ProfileIdeal, DaviesModeReportsTheIdealCurveBeside) {
  const double pka = 6.07, s0 = std::pow(10.0, -5.85);
  const Compound c = make_compound("<pka value=\"6.07\" type=\"base\"/>", s0);
  ProfileConditions cond;  // Davies
  SolubilityScanner s(c, lib(), cond);
  for (double pH : {2.0, 5.0, 9.0}) {
    const SolubilityAtPh r = s.at(pH);
    EXPECT_LT(rel(r.ideal_solubility_mol_per_L, s0 * (1 + std::pow(10.0, pka - pH))), kClosedFormRel);
    if (pH < 5) {
      // With activities the cation is favoured (Ka' = Ka gamma(BH+)/gamma(B) < Ka): more dissolves.
      EXPECT_GT(r.solubility_mol_per_L, r.ideal_solubility_mol_per_L);
      EXPECT_GT(r.ionic_strength_mol_per_L, 0.0);
    }
  }
}

// --- Published HH points for real drugs (computed from Avdeef 2003) -----

TEST(ProfileReference, CiprofloxacinIndomethacinMiconazoleLogS) {
  struct Case {
    std::string pkas;
    double log_s0;
    std::vector<std::pair<double, double>> points;  // pH, log10 S (mol/L)
  };
  const std::vector<Case> cases = {
      {"<pka value=\"6.16\" type=\"acid\"/><pka value=\"8.62\" type=\"base\"/>", -3.72,
       {{5.0, -2.531}, {6.16, -3.418}, {7.39, -3.672}, {8.62, -3.418}, {10.0, -2.322}}},
      {"<pka value=\"4.42\" type=\"acid\"/>", -5.58, {{2.0, -5.578}, {4.42, -5.279}, {6.0, -3.989}, {7.4, -2.600}}},
      {"<pka value=\"6.07\" type=\"base\"/>", -5.85, {{2.0, -1.780}, {6.07, -5.549}, {7.4, -5.830}}},
  };
  for (const Case& k : cases) {
    const Compound c = make_compound(k.pkas, std::pow(10.0, k.log_s0));
    ProfileGrid g;
    for (const auto& pt : k.points) g.points_pH.push_back(pt.first);
    const Profile p = compute_profile(c, lib(), ideal_water(), g);
    ASSERT_EQ(p.points.size(), k.points.size());
    for (std::size_t i = 0; i < k.points.size(); ++i) {
      // Three decimals as published: half a unit of the last digit.
      EXPECT_NEAR(std::log10(p.points[i].solubility_mol_per_L), k.points[i].second, 0.0005)
          << k.pkas << " pH " << k.points[i].first;
    }
  }
  // The ampholyte's minimum lies at (pKa1 + pKa2)/2 = 7.39 (Avdeef 2003, eq. 6.7).
  const Compound cipro = make_compound("<pka value=\"6.16\" type=\"acid\"/><pka value=\"8.62\" type=\"base\"/>",
                                       std::pow(10.0, -3.72));
  ProfileGrid g;
  g.from_pH = 6.0;
  g.to_pH = 9.0;
  g.step_pH = 0.01;
  const Profile p = compute_profile(cipro, lib(), ideal_water(), g);
  std::size_t best = 0;
  for (std::size_t i = 0; i < p.points.size(); ++i) {
    if (p.points[i].solubility_mol_per_L < p.points[best].solubility_mol_per_L) best = i;
  }
  EXPECT_NEAR(p.points[best].pH, 7.39, 1e-9);
}

// --- Worked example: ibuprofen (Avdeef 2003) ---------------------------------------
// pKa 4.43, S0 = S(pH 0.5) = 5.52e-5 M, plateau S(pH 10) = 4.39e-3 M at 25 °C: S(pH 4) =
// 7.57e-5 M; at pH 9 the HH value, 2.05 M, exceeds the plateau; pHmax 6.33. The exercise takes
// the plateau as the sodium salt's solubility without added sodium, so Ksp = (4.39e-3)^2 in
// the ideal model. The NaOH that holds the pH adds sodium (common ion): at pH 10 it lowers the
// plateau by 1 %, at pH 8 by 0.01 %, so the plateau is checked at pH 8.

TEST(ProfileReference, IbuprofenWorkedExample) {
  const Compound c = make_compound("<pka value=\"4.43\" type=\"acid\"/>", 5.52e-5,
                                   "<salt id=\"sodium\" counterion=\"Na+\" ksp=\"1.92721e-5\"/>");
  ASSERT_NEAR(*c.salts[0].ksp, 4.39e-3 * 4.39e-3, 1e-10);
  ProfileGrid g;  // default 1-13, step 0.05
  const Profile p = compute_profile(c, lib(), ideal_water(), g);
  ASSERT_EQ(p.points.size(), 241u);
  ASSERT_EQ(p.ph_max.size(), 1u);
  EXPECT_NEAR(p.ph_max[0].pH, 6.33, 0.005);
  EXPECT_EQ(p.ph_max[0].salt, "sodium");

  ProfileGrid pts;
  pts.points_pH = {4.0, 8.0, 9.0};
  const Profile q = compute_profile(c, lib(), ideal_water(), pts);
  EXPECT_NEAR(q.points[0].solubility_mol_per_L, 7.57e-5, 0.005e-5);
  EXPECT_EQ(q.points[0].limiting_solid, "free");
  EXPECT_NEAR(q.points[1].solubility_mol_per_L, 4.39e-3, 0.005e-3);
  EXPECT_EQ(q.points[1].limiting_solid, "sodium");
  EXPECT_NEAR(q.points[2].ideal_solubility_mol_per_L, 2.05, 0.005);
  EXPECT_EQ(q.points[2].limiting_solid, "sodium");
  EXPECT_LT(q.points[2].solubility_mol_per_L, 4.39e-3);
}

// --- pHmax --------------------------------------------------------------------------------
// Base salt BH+ X- without excess counterion: pHmax = pKa + log10(S0 / sqrt(Ksp)) (Kramer and
// Flynn 1972; Bogardus and Blackwood 1979; Serajuddin 2007). pKa 10,
// S0 1e-4 M, Ksp 1e-2: pHmax 7.000, where [H+] and [OH-] are 1e-6 of [BH+] (ideal limit).
// Acid salt M+ A-: pHmax = pKa + log10(sqrt(Ksp) / S0); pKa 4, S0 1e-4, Ksp 1e-2: 7.000.

TEST(ProfilePhMax, BaseSaltMatchesTheIdealRelationAndTheSolidChangesThere) {
  const Compound c = make_compound("<pka value=\"10\" type=\"base\"/>", 1e-4,
                                   "<salt id=\"hydrochloride\" counterion=\"Cl-\" ksp=\"1e-2\"/>");
  const Profile p = compute_profile(c, lib(), ideal_water(), ProfileGrid{});
  ASSERT_EQ(p.ph_max.size(), 1u);
  const double expected = 10.0 + std::log10(1e-4 / std::sqrt(1e-2));
  EXPECT_NEAR(p.ph_max[0].pH, expected, 1e-6);
  // There [BH+] = sqrt(Ksp) and [B] = S0: S = sqrt(Ksp) (1 + 10^(pHmax - pKa)).
  EXPECT_NEAR(p.ph_max[0].solubility_mol_per_L, std::sqrt(1e-2) + 1e-4, 1e-8);
  // The grid's limiting solid changes between the two grid points around pHmax ...
  for (const ProfilePoint& pt : p.points) {
    EXPECT_EQ(pt.limiting_solid, pt.pH < p.ph_max[0].pH ? "hydrochloride" : "free") << pt.pH;
  }
  // ... and exactly at pHmax (refined to 1e-9 pH).
  ProfileGrid near;
  near.points_pH = {p.ph_max[0].pH - 2e-9, p.ph_max[0].pH + 2e-9};
  const Profile q = compute_profile(c, lib(), ideal_water(), near);
  EXPECT_EQ(q.points[0].limiting_solid, "hydrochloride");
  EXPECT_EQ(q.points[1].limiting_solid, "free");
}

TEST(ProfilePhMax, AcidSaltMatchesTheIdealRelation) {
  const Compound c = make_compound("<pka value=\"4\" type=\"acid\"/>", 1e-4,
                                   "<salt id=\"sodium\" counterion=\"Na+\" ksp=\"1e-2\"/>");
  const Profile p = compute_profile(c, lib(), ideal_water(), ProfileGrid{});
  ASSERT_EQ(p.ph_max.size(), 1u);
  EXPECT_NEAR(p.ph_max[0].pH, 4.0 + std::log10(std::sqrt(1e-2) / 1e-4), 1e-6);
  for (const ProfilePoint& pt : p.points) {
    EXPECT_EQ(pt.limiting_solid, pt.pH < p.ph_max[0].pH ? "free" : "sodium") << pt.pH;
  }
}

TEST(ProfilePhMax, WithActivitiesTheSolidStillChangesAtTheReportedPhMax) {
  const Compound c = compound_from(read_text_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-base.xml"));
  ProfileConditions cond;
  cond.temperature_C = 37.0;
  const Profile p = compute_profile(c, lib(), cond, ProfileGrid{});
  // The mesylate has no counterion in water + HCl/NaOH; the dihydrochloride's pHmax with the
  // free base lies where the hydrochloride is less soluble (not on the profile).
  ASSERT_EQ(p.ph_max.size(), 2u);
  EXPECT_EQ(p.ph_max[0].salt, "hydrochloride");
  EXPECT_TRUE(p.ph_max[0].on_profile);
  EXPECT_FALSE(p.ph_max[1].on_profile);
  ProfileGrid near;
  near.points_pH = {p.ph_max[0].pH - 1e-8, p.ph_max[0].pH + 1e-8};
  const Profile q = compute_profile(c, lib(), cond, near);
  EXPECT_EQ(q.points[0].limiting_solid, "hydrochloride");
  EXPECT_EQ(q.points[1].limiting_solid, "free");
  EXPECT_NEAR(q.points[0].solubility_mol_per_L, q.points[1].solubility_mol_per_L,
              1e-6 * q.points[1].solubility_mol_per_L);
  // Holding the pH with methanesulfonic acid lets the mesylate limit instead.
  cond.acid_titrant = "methanesulfonic-acid";
  const Profile m = compute_profile(c, lib(), cond, ProfileGrid{});
  ASSERT_EQ(m.ph_max.size(), 1u);
  EXPECT_EQ(m.ph_max[0].salt, "mesylate");
}

// --- Common-ion effect ----------------------------------------------------------------------
// At pH 4 the hydrochloride of a base (pKa 9, S0 1e-5 M, Ksp 1e-4) limits. In NaCl of
// concentration c, the charge balance gives [Cl-] = c + zbar D + [H+] - [OH-], and the salt
// D alpha [Cl-] = Ksp (Serajuddin 2007; Streng et al. 1984): a quadratic in D.

TEST(ProfileCommonIon, HydrochloridePlateauFallsAsTheKspImplies) {
  const Compound c = make_compound("<pka value=\"9\" type=\"base\"/>", 1e-5,
                                   "<salt id=\"hydrochloride\" counterion=\"Cl-\" ksp=\"1e-4\"/>");
  const double pH = 4.0, ksp = 1e-4;
  const double h = std::pow(10.0, -pH), oh = std::pow(10.0, -pkw(25.0)) / h;
  const double alpha = 1.0 / (1.0 + std::pow(10.0, pH - 9.0));  // BH+, also the mean charge
  double previous = 1.0;
  for (double nacl : {0.0, 0.01, 0.05, 0.154, 0.5}) {
    ProfileConditions cond = ideal_water();
    add_reagent(cond.medium, lib(), "NaCl", nacl);
    const SolubilityAtPh r = solubility_at_pH(c, lib(), pH, cond);
    const double b = alpha * (nacl + h - oh);
    const double d = (-b + std::sqrt(b * b + 4 * alpha * alpha * ksp)) / (2 * alpha * alpha);
    EXPECT_EQ(r.limiting_solid, "hydrochloride") << nacl;
    EXPECT_LT(rel(r.solubility_mol_per_L, d), kClosedFormRel) << nacl;
    EXPECT_LT(r.solubility_mol_per_L, previous);
    previous = r.solubility_mol_per_L;
  }
  // Davies: the activity product a(BH+) a(Cl-) stays at Ksp while the plateau falls.
  previous = 1.0;
  for (double nacl : {0.0, 0.05, 0.154}) {
    ProfileConditions cond;
    add_reagent(cond.medium, lib(), "NaCl", nacl);
    const SolubilityAtPh r = solubility_at_pH(c, lib(), pH, cond);
    const double g = davies_gamma(1, r.ionic_strength_mol_per_L, 25.0);
    const double cl = nacl - r.titrant_mol_per_L;  // the acid titrant adds chloride
    EXPECT_NEAR(g * g * r.fractions[0] * r.solubility_mol_per_L * cl / ksp, 1.0, 1e-9) << nacl;
    EXPECT_LT(r.solubility_mol_per_L, previous);
    previous = r.solubility_mol_per_L;
  }
}

TEST(ProfileCommonIon, SalineAndGastricMediaLowerTheHydrochloridePlateau) {
  const Compound c = compound_from(read_text_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-base.xml"));
  auto s_at = [&](const std::string& medium) {
    ProfileConditions cond;
    if (!medium.empty()) add_medium(cond.medium, lib(), medium);
    return solubility_at_pH(c, lib(), 4.0, cond);
  };
  const SolubilityAtPh water = s_at(""), saline = s_at("saline-0.9"), gastric = s_at("hcl-1.2");
  EXPECT_EQ(water.limiting_solid, "hydrochloride");
  EXPECT_EQ(saline.limiting_solid, "hydrochloride");
  // 154 mM chloride against about 7 mM in water: roughly 20 times lower, less with activities.
  EXPECT_LT(saline.solubility_mol_per_L, water.solubility_mol_per_L / 8);
  EXPECT_LT(gastric.solubility_mol_per_L, water.solubility_mol_per_L / 8);
  // The pHmax of a base salt moves up in saline (less salt dissolves, the free form reaches
  // it later): Kramer and Flynn's pKa + log10(S0 / S_salt).
  ProfileConditions w, s;
  add_medium(s.medium, lib(), "saline-0.9");
  const Profile pw = compute_profile(c, lib(), w, ProfileGrid{});
  const Profile ps = compute_profile(c, lib(), s, ProfileGrid{});
  ASSERT_GE(pw.ph_max.size(), 1u);
  ASSERT_GE(ps.ph_max.size(), 1u);
  ASSERT_EQ(pw.ph_max[0].salt, "hydrochloride");
  ASSERT_EQ(ps.ph_max[0].salt, "hydrochloride");
  EXPECT_GT(ps.ph_max[0].pH, pw.ph_max[0].pH + 1.0);
}

// --- Compounds without a free form ----------------------------------------------------------
// A permanent cation Q+ whose chloride is the excess solid: [Q+] = [Cl-] = sqrt(Ksp) in water
// (Serajuddin 2007: sqrt(Ksp) with no excess counterion), at any pH held by the titrants.

TEST(ProfileSaltOnly, PermanentCationChlorideDissolvesAtRootKsp) {
  const Compound c = compound_from(
      "<compound id=\"q\" name=\"quaternary\" molar-mass=\"250\" permanent-charge=\"1\">"
      "<salt id=\"chloride\" counterion=\"Cl-\" ksp=\"1e-2\"/></compound>");
  SolubilityScanner s(c, lib(), ideal_water());
  for (double pH : {3.0, 7.0, 12.0}) {
    const SolubilityAtPh r = s.at(pH);
    EXPECT_EQ(r.limiting_solid, "chloride");
    // At pH 3 the HCl adds 1e-3 M chloride: [Q+] ([Q+] + 1e-3) = Ksp.
    const double extra = pH < 7 ? std::pow(10.0, -pH) : 0.0;
    const double expected = (-extra + std::sqrt(extra * extra + 4e-2)) / 2;
    EXPECT_LT(rel(r.solubility_mol_per_L, expected), 1e-6) << pH;
  }
  const Profile p = compute_profile(c, lib(), ideal_water(), ProfileGrid{});
  EXPECT_TRUE(p.ph_max.empty());
  EXPECT_TRUE(p.warnings.empty());
  // With a bromide as well, each pH takes the less soluble salt, and the other one stays
  // undersaturated in that solution even where the titrant brings its counterion.
  const Compound two = compound_from(
      "<compound id=\"q\" name=\"quaternary\" molar-mass=\"250\" permanent-charge=\"1\">"
      "<pka value=\"4\" type=\"base\"/>"
      "<salt id=\"chloride\" counterion=\"Cl-\" ksp=\"1e-2\"/><salt id=\"bromide\" counterion=\"Br-\" ksp=\"1e-3\"/>"
      "</compound>");
  ProfileConditions saline;  // 0.5 M NaCl, Davies: there the chloride is the less soluble salt
  add_reagent(saline.medium, lib(), "NaCl", 0.5);
  for (const ProfileConditions& cond : {ideal_water(), saline}) {
    SolubilityScanner q(two, lib(), cond);
    bool chloride_seen = false;
    for (double pH = 0.0; pH <= 14.0; pH += 0.25) {
      const SolubilityAtPh r = q.at(pH);
      ASSERT_NE(r.limiting_solid, "none");
      chloride_seen = chloride_seen || r.limiting_solid == "chloride";
      for (std::size_t k = 0; k < 2; ++k) {
        const double expected = two.salts[k].id == r.limiting_solid ? 1.0 : 0.0;
        if (expected == 1.0) EXPECT_NEAR(r.salt_saturation_at_free[k], 1.0, 1e-9) << pH;
        else EXPECT_LE(r.salt_saturation_at_free[k], 1.0 + 1e-9) << pH;
      }
    }
    EXPECT_EQ(chloride_seen, !cond.medium.ions.empty());
  }
}

// --- Agreement with the closed-system solver ------------------------------------------------
// A profile point (pH, S, titrant) rebuilt as a closed mixture (docs/model.md): twice S
// of free form, the titrant, plus the counterion that the precipitated salt took out of
// solution; solve() must return the same pH, dissolved amount and solid. Checked inside the
// Davies range (I <= 0.5 mol/L; beyond 1 mol/L the profile holds the coefficients at I = 1).

TEST(ProfileConsistency, EachPointIsAClosedSystemEquilibrium) {
  for (const char* file : {"demo-base", "demo-acid", "demo-ampholyte"}) {
    const Compound c = compound_from(read_text_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/" + file + ".xml"));
    for (const char* medium : {"", "saline-0.9"}) {
      ProfileConditions cond;
      cond.temperature_C = 37.0;
      if (*medium) add_medium(cond.medium, lib(), medium);
      SolubilityScanner scanner(c, lib(), cond);
      for (double pH = 1.5; pH <= 12.5; pH += 0.25) {
        const SolubilityAtPh r = scanner.at(pH);
        if (r.capped || r.ionic_strength_mol_per_L > 0.5) continue;
        Mixture m = cond.medium;
        m.temperature_C = cond.temperature_C;
        const double dose = 2.0 * r.solubility_mol_per_L;
        add_drug(m, lib(), c, dose, "free");
        if (r.titrant_mol_per_L < 0) add_reagent(m, lib(), "HCl", -r.titrant_mol_per_L);
        if (r.titrant_mol_per_L > 0) add_reagent(m, lib(), "NaOH", r.titrant_mol_per_L);
        if (const Salt* salt = c.salt(r.limiting_solid)) {
          add_reagent(m, lib(), salt->counterion == "Cl-" ? "HCl" : "NaOH", dose - r.solubility_mol_per_L);
        }
        const Equilibrium e = solve(m);
        ASSERT_TRUE(e.usable()) << file << " " << medium << " pH " << pH << ": " << e.message;
        EXPECT_NEAR(e.pH, pH, 1e-9) << file << " " << medium;
        EXPECT_NEAR(e.drug->dissolved_mol_per_L / r.solubility_mol_per_L, 1.0, 1e-8) << file << " " << medium << " " << pH;
        EXPECT_EQ(e.drug->solid, r.limiting_solid) << file << " " << medium << " pH " << pH;
      }
    }
  }
}

// --- Profile bookkeeping --------------------------------------------------------------------

TEST(ProfileOutput, DefaultGridNotesDerivedKspAndWarnings) {
  const Compound c = make_compound("<pka value=\"8\" type=\"base\"/>", 1e-4,
                                   "<salt id=\"hydrochloride\" counterion=\"Cl-\" solubility-in-water=\"0.05 M\"/>");
  ProfileConditions cond;
  cond.temperature_C = 37.0;
  const Profile p = compute_profile(c, lib(), cond, ProfileGrid{});
  EXPECT_EQ(p.points.size(), 241u);
  EXPECT_DOUBLE_EQ(p.points.front().pH, 1.0);
  EXPECT_DOUBLE_EQ(p.points.back().pH, 13.0);
  ASSERT_EQ(p.derived_ksp.size(), 1u);
  EXPECT_EQ(p.derived_ksp[0].salt, "hydrochloride");
  EXPECT_DOUBLE_EQ(p.derived_ksp[0].ksp, *c.salts[0].ksp);
  // Derived in water: about (0.05 gamma)^2, gamma from Davies at I near 0.05.
  EXPECT_NEAR(p.derived_ksp[0].ksp, std::pow(0.05 * davies_gamma(1, 0.05, 25.0), 2), 0.02 * p.derived_ksp[0].ksp);
  bool s0_note = false;
  for (const std::string& n : p.notes) s0_note = s0_note || n.find("S0 used as measured at 25.0 °C") == 0;
  EXPECT_TRUE(s0_note);
  for (const ProfilePoint& pt : p.points) {
    EXPECT_NEAR(pt.solubility_mg_per_mL, pt.solubility_mol_per_L * 300.0, 1e-12 * pt.solubility_mg_per_mL);
    double sum = 0;
    for (double f : pt.fractions) sum += f;
    EXPECT_NEAR(sum, 1.0, 1e-12);
  }
  // pH 1 with HCl: about 0.1 M of acid plus the dissolved hydrochloride; in 1 M NaCl the
  // Davies range is left.
  ProfileConditions salty;
  add_reagent(salty.medium, lib(), "NaCl", 1.0);
  const Profile s = compute_profile(c, lib(), salty, ProfileGrid{});
  ASSERT_FALSE(s.warnings.empty());
  EXPECT_NE(s.warnings[0].find("ionic strength above 0.5 mol/L at 241 of 241 points"), std::string::npos);
  std::ostringstream json;
  write_profile_json(p, json);
  for (const char* key : {"\"temperature_C\"", "\"points\"", "\"solubility_mol_per_L\"", "\"solubility_mg_per_mL\"",
                          "\"ideal_solubility_mol_per_L\"", "\"limiting_solid\"", "\"ionic_strength_mol_per_L\"",
                          "\"fractions\"", "\"pHmax\"", "\"salt\"", "\"derived_ksp\"", "\"caution\""}) {
    EXPECT_NE(json.str().find(key), std::string::npos) << key;
  }
}

TEST(ProfileGrid, ValidatesRangeAndStep) {
  std::string err;
  ProfileGrid g;
  EXPECT_TRUE(g.is_valid(&err));
  EXPECT_EQ(g.values().size(), 241u);
  g.from_pH = 5;
  g.to_pH = 4;
  EXPECT_FALSE(g.is_valid(&err));
  EXPECT_NE(err.find("the pH range is empty"), std::string::npos);
  g = ProfileGrid{};
  g.step_pH = 0;
  EXPECT_FALSE(g.is_valid(&err));
  EXPECT_EQ(err, "ProfileGrid::step_pH = 0, must be > 0");
  g = ProfileGrid{};
  g.points_pH = {6.8, 1.2, 4.5, 4.5};
  EXPECT_TRUE(g.is_valid(&err));
  EXPECT_EQ(g.values(), (std::vector<double>{1.2, 4.5, 6.8}));
  EXPECT_THROW(titrant_strong_ion(lib(), "NaCl", -1), InputError);  // gives Na+ as well
  EXPECT_EQ(titrant_strong_ion(lib(), "methanesulfonic-acid", -1).id, "CH3SO3-");
}

// --- Command line -----------------------------------------------------------------------------

TEST(ProfileCli, JsonHasTheDesignKeys) {
  const RunResult r = run("profile --compound compounds/demo-base.xml --format json");
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* key : {"\"temperature_C\": 25", "\"pH\": 1.0", "\"solubility_mol_per_L\"", "\"pHmax\"",
                          "\"salt\": \"hydrochloride\"", "\"ksp_mol2_per_L2\""}) {
    EXPECT_NE(r.out.find(key), std::string::npos) << key;
  }
}

TEST(ProfileCli, TextShowsEveryHalfPhByDefaultAndEveryRowOnRequest) {
  RunResult r = run("profile --compound compounds/demo-base.xml");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("25 of 241 points"), std::string::npos);
  EXPECT_NE(r.out.find("S (mol/L)"), std::string::npos);
  EXPECT_NE(r.out.find("Caution"), std::string::npos);
  r = run("profile --compound compounds/demo-base.xml --from 2 --to 3 --step 0.1 --medium saline-0.9 --temp 37");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("  2.10 "), std::string::npos);
  EXPECT_NE(r.out.find("at 37.0 °C"), std::string::npos);
  r = run("profile --compound compounds/demo-base.xml --points 1.2,4.5,6.8 --format csv");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_EQ(r.out.rfind("pH,solubility_mol_per_L,solubility_mg_per_mL", 0), 0u);
  EXPECT_NE(r.out.find("\r\n6.8,"), std::string::npos);
}

TEST(ProfileCli, BadInputExitsTwoWithAClearMessage) {
  const std::string good_head = "<compound id=\"x\" name=\"x\" molar-mass=\"300\">\n";
  const std::string pka_out = write_file("pka.xml", good_head +
      "  <pka value=\"25\" type=\"base\"/>\n  <intrinsic-solubility value=\"1\" unit=\"ug/mL\"/>\n</compound>\n");
  const std::string bad_ion = write_file("ion.xml", good_head +
      "  <pka value=\"8\" type=\"base\"/>\n  <intrinsic-solubility value=\"1\" unit=\"ug/mL\"/>\n"
      "  <salt id=\"odd\" counterion=\"Xq-\" ksp=\"1e-3\"/>\n</compound>\n");
  const std::string s0_zero = write_file("s0z.xml", good_head +
      "  <pka value=\"8\" type=\"base\"/>\n  <intrinsic-solubility value=\"0\" unit=\"ug/mL\"/>\n</compound>\n");
  const std::string s0_neg = write_file("s0n.xml", good_head +
      "  <pka value=\"8\" type=\"base\"/>\n  <intrinsic-solubility value=\"-3\" unit=\"ug/mL\"/>\n</compound>\n");
  struct Case {
    std::string args, expect;
  };
  const std::vector<Case> cases = {
      {"profile --compound " + pka_out, "pka.xml:2:3:"},
      {"profile --compound " + bad_ion, "ion.xml:4:3: counterion 'Xq-' of salt 'odd' is not an ion of the library"},
      {"profile --compound " + s0_zero, "s0z.xml:3:3: intrinsic solubility must be > 0"},
      {"profile --compound " + s0_neg, "s0n.xml:3:3: intrinsic solubility must be > 0"},
      {"profile --compound compounds/demo-base.xml --from 5 --to 4", "--to: empty pH range"},
      {"profile --compound compounds/demo-base.xml --step 0", "--step: step 0 must be > 0"},
      {"profile --compound compounds/demo-base.xml --step -0.1", "--step: step -0.1 must be > 0"},
      {"profile --compound compounds/demo-base.xml --acid HNO2", "--acid: unknown reagent 'HNO2'"},
      {"profile --compound compounds/demo-base.xml --acid NaCl", "--acid: reagent 'NaCl' is not a strong acid"},
      {"profile --compound compounds/demo-base.xml --points 1,,2", "--points: empty entry"},
      {"profile --compound compounds/demo-base.xml --points 2 --step 0.1", "--points cannot be combined"},
      {"profile --compound compounds/demo-base.xml --from 16", "--from: value 16 is out of range"},
      {"profile --compound compounds/demo-base.xml --format xml", "--format: unknown format"},
      {"profile --compound compounds/demo-base.xml --medium sea", "--medium: unknown medium 'sea'"},
      {"profile", "--compound: --compound FILE is required"},
  };
  for (const Case& k : cases) {
    const RunResult r = run(k.args);
    EXPECT_EQ(r.code, 2) << k.args << "\n" << r.err;
    EXPECT_NE(r.err.find(k.expect), std::string::npos) << k.args << "\n" << r.err;
    EXPECT_TRUE(r.out.empty()) << k.args;
  }
}

}  // namespace
