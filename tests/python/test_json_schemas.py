"""Every command's --format json output against its JSON Schema (schemas/json/COMMAND.schema.json).

Run by CTest with PKARTA_BINARY and PKARTA_SOURCE_DIR set; needs Debian's python3-jsonschema
(Makefile TEST_PACKAGES). Each schema is itself checked against draft 2020-12; every output
carries pkarta_version; the shape does not depend on the number of inputs (mix: one temperature
or several both give "states"; screen: one compound or several both give "screens").
"""
import json
import os
import subprocess
import tempfile
import unittest

import jsonschema

BINARY = os.environ["PKARTA_BINARY"]
SOURCE = os.environ["PKARTA_SOURCE_DIR"]
SCHEMAS = os.path.join(SOURCE, "schemas", "json")
BASE = "compounds/demo-base.xml"
OUT = tempfile.mkdtemp(prefix="pkarta-schema-")

RUNS = {
    "mix": [
        ["--compound", BASE, "--dose", "2mg/mL", "--form", "hydrochloride", "--add", "KH2PO4=25mM",
         "--add", "Na2HPO4=25mM", "--temp", "5"],
        ["--add", "KH2PO4=0.025mol/kg", "--add", "Na2HPO4=0.025mol/kg"],
        ["--medium", "saline-0.9", "--add", "tris=20mM", "--add", "HCl=10mM", "--temp", "5,25,37"],
    ],
    "profile": [
        ["--compound", BASE, "--points", "1,2,4,6,7,9,12"],
        ["--compound", BASE, "--medium", "saline-0.9", "--temp", "37", "--step", "0.5"],
        ["--compound", BASE, "--points", "2,7", "--uncertainty", "10", "--seed", "3"],
        ["--compound", "compounds/demo-acid.xml", "--from", "3", "--to", "9", "--step", "1"],
    ],
    "classify": [
        ["--compound", "compounds/demo-ampholyte.xml", "--dose-mg", "50"],
        ["--compound", BASE, "--dose-mg", "25", "--form", "hydrochloride"],
    ],
    "screen": [
        ["--compound", BASE, "--dose", "0.5mg/mL", "--form", "hydrochloride", "--target-ph", "5",
         "--route", "parenteral", "--dose-range", "10%"],
        ["--compound", "compounds/demo-acid.xml", "--dose", "5mg/mL", "--form", "sodium", "--target-ph", "7.4",
         "--tolerance", "0.05", "--buffers", "phosphate,tris,HEPES"],
        ["--compound", BASE, "--compound", "compounds/demo-acid.xml", "--dose", "1mg/mL", "--target-ph", "6.5",
         "--buffers", "phosphate,citrate"],
        ["--compound", BASE, "--dose", "1mg/mL", "--form", "hydrochloride", "--target-ph", "4.5",
         "--buffers", "acetate", "--uncertainty", "10"],
    ],
    "recipe": [
        ["--buffer", "phosphate", "--ph", "7.0", "--conc", "50mM", "--volume", "500mL"],
        ["--buffer", "tris", "--ph", "7.4", "--conc", "20mM", "--reagents", "tris", "--titrant", "--temp", "37"],
        ["--compound", BASE, "--dose", "0.5mg/mL", "--form", "hydrochloride", "--buffer", "citrate", "--ph", "5",
         "--conc", "20mM", "--volume", "1L", "--isotonic", "--preparation", "adjusted"],
    ],
    "fit": [["--compound", BASE], ["--compound", "compounds/demo-acid.xml"]],
    "dilute": [
        ["--compound", BASE, "--dose", "2mg/mL", "--form", "mesylate", "--into", "plasma-7.4", "--into-temp", "37"],
        ["--compound", BASE, "--dose", "2mg/mL", "--form", "hydrochloride", "--into", "saline-0.9",
         "--ratios", "1,2,5,10,20,50,100"],
    ],
    "library": [["list"], ["show", "phosphate"], ["show", "tris"]],
    "check": [[BASE, "compounds/library.xml"]],
    "report": [["--compound", BASE, "--dose", "2mg/mL", "--form", "hydrochloride", "--target-ph", "5",
                "-o", os.path.join(OUT, "base.html")]],
    "demo": [["--out-dir", os.path.join(OUT, "demo")]],
}


def run_json(command, args):
    r = subprocess.run([BINARY, command, *args, "--format", "json"], cwd=SOURCE, capture_output=True, text=True)
    if r.returncode != 0:
        raise AssertionError(f"{command} {args}: exit {r.returncode}: {r.stderr}")
    return json.loads(r.stdout)


def schema(command):
    with open(os.path.join(SCHEMAS, command + ".schema.json"), encoding="utf-8") as f:
        return json.load(f)


class SchemaTest(unittest.TestCase):
    def test_every_command_has_a_valid_schema(self):
        help_text = subprocess.run([BINARY, "--help"], capture_output=True, text=True).stdout
        commands = [line.split()[0] for line in help_text.split("commands:\n", 1)[1].split("\n\n", 1)[0].splitlines()]
        self.assertEqual(sorted(commands), sorted(RUNS))
        for c in commands:
            s = schema(c)
            self.assertEqual(s["$schema"], "https://json-schema.org/draft/2020-12/schema", c)
            jsonschema.Draft202012Validator.check_schema(s)
            self.assertIn("pkarta_version", s["required"], c)

    def test_every_output_validates(self):
        for command, runs in RUNS.items():
            validator = jsonschema.Draft202012Validator(schema(command))
            for args in runs:
                doc = run_json(command, args)
                errors = sorted(validator.iter_errors(doc), key=lambda e: list(e.path))
                self.assertEqual(errors, [], f"{command} {args}: " + "; ".join(
                    f"{list(e.path)}: {e.message[:200]}" for e in errors[:5]))

    def test_a_schema_refuses_a_wrong_document(self):
        # The check can fail: a number where a list of states belongs is refused.
        doc = run_json("mix", ["--add", "KH2PO4=25mM"])
        doc["states"] = 7
        self.assertFalse(jsonschema.Draft202012Validator(schema("mix")).is_valid(doc))
        del doc["pkarta_version"]
        doc["states"] = []
        self.assertFalse(jsonschema.Draft202012Validator(schema("mix")).is_valid(doc))

    def test_same_shape_for_one_input_or_several(self):
        one = run_json("mix", ["--add", "KH2PO4=25mM", "--temp", "37"])
        three = run_json("mix", ["--add", "KH2PO4=25mM", "--temp", "5,25,37"])
        self.assertEqual(len(one["states"]), 1)
        self.assertEqual(len(three["states"]), 3)
        self.assertEqual(one["states"][0]["pH"], three["states"][2]["pH"])
        self.assertEqual(one["pH"], one["states"][0]["pH"])  # the earlier keys stay
        s1 = run_json("screen", RUNS["screen"][1])
        s2 = run_json("screen", RUNS["screen"][2])
        self.assertEqual(len(s1["screens"]), 1)
        self.assertEqual(len(s2["screens"]), 2)
        self.assertEqual(s1["screens"][0]["results"], s1["results"])

    def test_labelled_arrays(self):
        p = run_json("profile", ["--compound", BASE, "--points", "7"])
        pt = p["points"][0]
        self.assertEqual(list(pt["fractions_by_species"]), p["species"])
        self.assertAlmostEqual(sum(pt["fractions_by_species"].values()), 1.0, delta=1e-9)
        f = run_json("fit", ["--compound", BASE])
        names = [x["name"] for x in f["parameters"]]
        self.assertEqual(list(f["correlation_by_parameter"]), names)
        for i, a in enumerate(names):
            self.assertEqual(f["correlation_by_parameter"][a][a], f["correlation"][i][i])


if __name__ == "__main__":
    unittest.main()
