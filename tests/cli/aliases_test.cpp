// One name for one thing across commands: every old spelling works, and its alias gives the
// same result (--target-ph/--ph, --dose-mg/--dose, --volume-mL/--volume, -o/--out-dir).
#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_run.h"

namespace {

using pkarta_test::run;
using pkarta_test::temp_dir;

void same_output(const std::string& a, const std::string& b) {
  const auto x = run(a), y = run(b);
  ASSERT_EQ(x.code, 0) << a << "\n" << x.err;
  ASSERT_EQ(y.code, 0) << b << "\n" << y.err;
  EXPECT_EQ(x.out, y.out) << a << "\n" << b;
}

TEST(Aliases, TargetPhAndPh) {
  const std::string screen = "screen --compound compounds/demo-base.xml --dose 0.5mg/mL --form hydrochloride "
                             "--buffers citrate,acetate --format json ";
  same_output(screen + "--target-ph 5", screen + "--ph 5");
  const std::string recipe = "recipe --buffer phosphate --conc 50mM --format json ";
  same_output(recipe + "--ph 7.0", recipe + "--target-ph 7.0");
  const auto both = run(recipe + "--ph 7.0 --target-ph 7.2");
  EXPECT_EQ(both.code, 2);
  EXPECT_NE(both.err.find("--target-ph is another name of --ph"), std::string::npos) << both.err;
  EXPECT_TRUE(both.out.empty());
}

TEST(Aliases, DoseAndVolumeOfClassify) {
  // ICH M9 (2019), 2.1: the dose in 250 mL; 25 mg, 0.025 g and --dose-mg 25 are one dose.
  const std::string c = "classify --compound compounds/demo-base.xml --format json ";
  same_output(c + "--dose-mg 25", c + "--dose 25mg");
  same_output(c + "--dose-mg 25", c + "--dose 0.025g --volume 250mL");
  same_output(c + "--dose-mg 25 --volume-mL 500", c + "--dose 25mg --volume 0.5L");
  EXPECT_EQ(run(c + "--dose 25mg/mL").code, 2);
}

TEST(Aliases, VolumeOfRecipeAndOutDirOfDemo) {
  const std::string r = "recipe --buffer phosphate --ph 7.0 --conc 50mM --format json ";
  same_output(r + "--volume 500mL", r + "--volume-mL 500");
  const std::string dir = temp_dir() + "/alias-demo";
  std::filesystem::remove_all(dir);
  const auto d = run("demo -o " + dir);
  ASSERT_EQ(d.code, 0) << d.err;
  EXPECT_TRUE(std::filesystem::exists(dir + "/demo-base.html"));
}

}  // namespace
