// The recipe of a formulation: the screen's recommended strength made up with the drug, fed back
// through `pkarta mix` from the masses and titrant volume alone.
#include "pkarta/analyses/recipe_formulation.h"

#include <gtest/gtest.h>

#include <cmath>
#include <nlohmann/json.hpp>
#include <string>

#include "cli_run.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

using pkarta_test::run;

nlohmann::json json_of(const std::string& args) {
  const pkarta_test::RunResult r = run(args + " --format json");
  EXPECT_EQ(r.code, 0) << args << "\n" << r.err;
  return nlohmann::json::parse(r.out);
}

// The mix command line for a recipe's JSON: every reagent by its mass per litre, the titrant by
// its amount, the drug by its mass as weighed, plus `extra` (a challenge).
std::string mix_args(const nlohmann::json& recipe, const std::string& extra = "") {
  const double volume = recipe["volume_L"].get<double>();
  char buf[128];
  std::string args = "mix --compound compounds/demo-base.xml --form hydrochloride";
  std::snprintf(buf, sizeof buf, " --dose %.9gg/L", recipe["drug"]["mass_g"].get<double>() / volume);
  args += buf;
  for (const auto& r : recipe["reagents"]) {
    std::snprintf(buf, sizeof buf, " --add %s=%.9gg/L", r["id"].get<std::string>().c_str(),
                  r["mass_g"].get<double>() / volume);
    args += buf;
  }
  if (!recipe["titrant"].is_null()) {
    const double mM = recipe["titrant"]["volume_mL"].get<double>() * recipe["titrant"]["conc_mol_per_L"].get<double>() / volume;
    std::snprintf(buf, sizeof buf, " --add %s=%.9gmM", recipe["titrant"]["id"].get<std::string>().c_str(), mM);
    args += buf;
  }
  return args + extra;
}

TEST(RecipeFormulation, RecommendedRecipeGivesTheTargetThroughMixAndHoldsAChallenge) {
  // The demo base at pH 5.0 (0.5 mg/mL as the hydrochloride, parenteral): the screen's leading
  // buffer at its recommended strength, made up with the drug and the pH adjusted with the
  // titrant. The masses and titrant volume alone, through mix, give pH 5.00 +/- 0.01, and 1 mM
  // HCl or NaOH (the screen's default challenge) moves it by less than the 0.1 tolerance.
  const std::string drug = "--compound compounds/demo-base.xml --dose 0.5mg/mL --form hydrochloride";
  const nlohmann::json screen = json_of("screen " + drug + " --target-ph 5 --route parenteral");
  const nlohmann::json& lead = screen["results"][0];
  ASSERT_EQ(lead["status"], "ok");
  const double rec = lead["recommended_conc_mol_per_L"].get<double>();
  ASSERT_GE(rec, lead["min_conc_mol_per_L"].get<double>());
  char conc[64];
  std::snprintf(conc, sizeof conc, "%.9gmM", rec * 1e3);
  for (const char* prep : {"adjusted", "premade"}) {
    const nlohmann::json recipe = json_of("recipe " + drug + " --buffer " + lead["buffer"].get<std::string>() +
                                          " --ph 5 --conc " + conc + " --volume 1L --isotonic --preparation " + prep);
    EXPECT_DOUBLE_EQ(recipe["conc_mol_per_L"].get<double>(), rec);
    EXPECT_NEAR(recipe["drug"]["mass_g"].get<double>(), 0.5, 1e-9);  // 0.5 mg/mL x 1 L, as the salt
    EXPECT_EQ(recipe["drug"]["form"], "hydrochloride");
    const double pH = json_of(mix_args(recipe))["pH"].get<double>();
    EXPECT_NEAR(pH, 5.0, 0.01) << prep;
    EXPECT_NEAR(pH, recipe["formulation"]["pH"].get<double>(), 1e-4) << prep;
    const double acid = json_of(mix_args(recipe, " --add HCl=1mM"))["pH"].get<double>();
    const double base = json_of(mix_args(recipe, " --add NaOH=1mM"))["pH"].get<double>();
    EXPECT_LT(std::fabs(acid - pH), 0.1) << prep;
    EXPECT_LT(std::fabs(base - pH), 0.1) << prep;
    EXPECT_LT(acid, pH);
    EXPECT_GT(base, pH);
    // Osmolality estimate at the isotonic target (290 mOsm/kg, common practice), drug included.
    EXPECT_NEAR(recipe["formulation"]["osmolality_estimate_mOsm_per_kg"].get<double>(), 290.0, 3.0) << prep;
    EXPECT_EQ(recipe["formulation"]["solid"], "none");
  }
}

TEST(RecipeFormulation, ChlorideOfSodiumChlorideDecidesTheTonicityReagentOfAHydrochloride) {
  // A hydrochloride's solubility limit falls as Ksp / [Cl-] (common-ion effect): the demo base
  // hydrochloride's limit with about 125 mM chloride from NaCl lies below twice the dose, so
  // dextrose is used; the sentence gives the numbers.
  Library lib = builtin_library();
  Warnings w;
  const Compound base = load_compound_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-base.xml", lib, &w);
  RecipeOptions o;
  o.buffer = "citrate";
  o.pH = 5.0;
  o.conc_mol_per_L = 0.02;
  o.isotonic = true;
  const double dose = 0.5 / form_molar_mass(base, "hydrochloride", lib);
  const Formulation f = make_formulation(lib, o, base, dose, "hydrochloride", ScreenPreparation::kAdjusted);
  bool dextrose = false;
  for (const RecipeReagent& r : f.recipe.reagents) dextrose = dextrose || (r.role == "tonicity" && r.id == "dextrose");
  EXPECT_TRUE(dextrose);
  EXPECT_NE(f.tonicity_note.find("dextrose is used instead"), std::string::npos) << f.tonicity_note;
  // With NaCl the saturation ratio of the whole dose is above 1 / margin: check it directly.
  Mixture with_nacl = formulation_mixture(lib, f, base);
  add_reagent(with_nacl, lib, "NaCl", 0.125);
  const Equilibrium e = solve(with_nacl);
  ASSERT_TRUE(e.usable() && e.drug);
  EXPECT_GT(e.drug->saturation_ratio * kTonicitySolubilityMargin, 1.0);
  // The free base brings no chloride: NaCl stays.
  const Formulation free = make_formulation(lib, o, base, 0.2 / form_molar_mass(base, "free", lib), "free");
  for (const RecipeReagent& r : free.recipe.reagents) {
    if (r.role == "tonicity") EXPECT_EQ(r.id, "NaCl");
  }
}

}  // namespace
}  // namespace pkarta
