"""The Python module against the command line: the same inputs give the same numbers.

Run by CTest with PKARTA_BINARY, PKARTA_SOURCE_DIR and PYTHONPATH (the built module) set.
Check value: 25 mM KH2PO4 + 25 mM Na2HPO4 at 25 °C, the IUPAC primary phosphate standard's
composition (by molality, pH 6.865; Buck et al. 2002, Pure Appl. Chem. 74, 2169).
"""
import json
import os
import subprocess
import sys
import unittest

import pkarta

BINARY = os.environ["PKARTA_BINARY"]
SOURCE = os.environ["PKARTA_SOURCE_DIR"]
BASE = os.path.join(SOURCE, "compounds", "demo-base.xml")


def cli_json(*args):
    out = subprocess.run([BINARY, *args, "--format", "json"], check=True, capture_output=True, text=True)
    return json.loads(out.stdout)


class ModuleTest(unittest.TestCase):
    def test_mix_equals_cli_to_1e12(self):
        py = pkarta.mix(add={"KH2PO4": "25mM", "Na2HPO4": "25mM"}, temp=25)
        cli = cli_json("mix", "--add", "KH2PO4=25mM", "--add", "Na2HPO4=25mM", "--temp", "25")
        self.assertAlmostEqual(py["pH"], cli["pH"], delta=1e-12)
        self.assertAlmostEqual(py["pH"], 6.865, delta=0.02)
        self.assertEqual(sorted(py), sorted(cli))

    def test_drug_options_and_version(self):
        py = pkarta.mix(compound=BASE, dose="2mg/mL", form="hydrochloride", add={"KH2PO4": "25mM"})
        cli = cli_json("mix", "--compound", BASE, "--dose", "2mg/mL", "--form", "hydrochloride",
                       "--add", "KH2PO4=25mM")
        self.assertAlmostEqual(py["pH"], cli["pH"], delta=1e-12)
        self.assertEqual(pkarta.version(), pkarta.__version__)
        version = subprocess.run([BINARY, "--version"], check=True, capture_output=True, text=True)
        self.assertIn(pkarta.version(), version.stdout)

    def test_bad_input_is_value_error_naming_the_option(self):
        with self.assertRaises(ValueError) as caught:
            pkarta.mix(add={"KH2PO4": "25xM"})
        self.assertIn("--add", str(caught.exception))

    def test_screen_and_recipe_keys_match_cli(self):
        py = pkarta.screen(compound=BASE, dose="0.5mg/mL", form="hydrochloride", target_ph=5)
        cli = cli_json("screen", "--compound", BASE, "--dose", "0.5mg/mL", "--form", "hydrochloride",
                       "--target-ph", "5")
        self.assertEqual(json.dumps(py, sort_keys=True), json.dumps(cli, sort_keys=True))
        rec = pkarta.recipe(buffer="phosphate", ph=7.0, conc="50mM", volume="500mL")
        self.assertIsInstance(rec, dict)

    def test_option_aliases_as_keywords(self):
        # The same names as the command line, aliases included (--ph / --target-ph, --volume-mL).
        a = pkarta.recipe(buffer="phosphate", ph=7.0, conc="50mM", volume="500mL")
        b = pkarta.recipe(buffer="phosphate", target_ph=7.0, conc="50mM", volume_mL=500)
        self.assertEqual(a["reagents"], b["reagents"])
        version = subprocess.run([BINARY, "--version"], check=True, capture_output=True, text=True).stdout.split()[1]
        self.assertEqual(a["pkarta_version"], version)

    def test_profile_points_load_into_pandas(self):
        profile = pkarta.profile(compound=BASE, temp=[25])
        try:
            import pandas
        except ImportError:
            self.skipTest("pandas not installed")
        frame = pandas.DataFrame(profile["points"])
        self.assertIn("pH", frame.columns)
        self.assertGreater(len(frame), 100)


if __name__ == "__main__":
    sys.exit(unittest.main())
