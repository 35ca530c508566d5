"""The command line's outputs as tools read them.

Run by CTest with PKARTA_BINARY and PKARTA_SOURCE_DIR set. Each command's `--format csv`
(and every table of it, through --table) must parse with Python's csv module as one
rectangular table; `COMMAND --version` exits 0; no line of the default text output of the
README's example commands is wider than 100 columns.
"""
import csv
import io
import os
import re
import shlex
import subprocess
import unittest

BINARY = os.environ["PKARTA_BINARY"]
SOURCE = os.environ["PKARTA_SOURCE_DIR"]
BASE = "compounds/demo-base.xml"

# One run of each command that has tables (arguments without --format).
CASES = {
    "mix": ["mix", "--compound", BASE, "--dose", "2mg/mL", "--form", "hydrochloride",
            "--add", "KH2PO4=25mM", "--add", "Na2HPO4=25mM", "--temp", "5"],
    "mix-temperatures": ["mix", "--medium", "saline-0.9", "--add", "tris=20mM", "--add", "HCl=10mM",
                         "--temp", "5,25,37"],
    "profile": ["profile", "--compound", BASE, "--points", "1,2,4,6,7,9", "--uncertainty", "20"],
    "classify": ["classify", "--compound", "compounds/demo-ampholyte.xml", "--dose-mg", "50"],
    "screen": ["screen", "--compound", BASE, "--dose", "0.5mg/mL", "--form", "hydrochloride",
               "--target-ph", "5", "--dose-range", "10%", "--buffers", "citrate,acetate,phosphate"],
    "screen-batch": ["screen", "--compound", BASE, "--compound", "compounds/demo-acid.xml",
                     "--dose", "1mg/mL", "--target-ph", "6.5", "--buffers", "phosphate,citrate"],
    "recipe": ["recipe", "--buffer", "phosphate", "--ph", "7.0", "--conc", "50mM", "--volume", "500mL"],
    "recipe-formulation": ["recipe", "--compound", BASE, "--dose", "0.5mg/mL", "--form", "hydrochloride",
                           "--buffer", "citrate", "--ph", "5", "--conc", "20mM", "--isotonic"],
    "fit": ["fit", "--compound", BASE],
    "dilute": ["dilute", "--compound", BASE, "--dose", "2mg/mL", "--form", "hydrochloride",
               "--into", "saline-0.9", "--ratios", "1,2,5,10"],
    "library": ["library", "list"],
    "check": ["check", BASE, "compounds/library.xml"],
}
# Tables that belong to another form of the command (library show ID: properties).
OTHER_FORM = {("library", "properties"): ["library", "show", "phosphate"]}

COMMANDS = ["mix", "profile", "classify", "screen", "recipe", "fit", "dilute", "report", "check",
            "library", "demo"]


def run(args, check=True):
    return subprocess.run([BINARY, *args], cwd=SOURCE, check=check, capture_output=True, text=True)


def table_names(command):
    """The names listed under "Tables" in the command's --help."""
    out = run([command, "--help"]).stdout
    part = out.split("Tables (", 1)[1].split("\n", 1)[1]
    names = []
    for line in part.splitlines():
        m = re.match(r"^  ([a-z_]+)\s", line)
        if not m:
            break
        names.append(m.group(1))
    return names


def rectangular(test, text, where):
    rows = list(csv.reader(io.StringIO(text, newline="")))
    test.assertGreaterEqual(len(rows), 1, where)
    width = len(rows[0])
    test.assertGreater(width, 1, where)
    for i, row in enumerate(rows):
        test.assertEqual(len(row), width, f"{where}: row {i} has {len(row)} cells, header {width}")
    test.assertEqual(len(set(rows[0])), width, f"{where}: repeated column names {rows[0]}")
    return rows


class CsvTest(unittest.TestCase):
    def test_every_table_of_every_command_is_rectangular(self):
        for name, args in CASES.items():
            tables = table_names(args[0])
            self.assertGreaterEqual(len(tables), 1, name)
            if args[0] not in ("library", "check"):
                self.assertEqual(tables[-1], "notes", name)
            main = run([*args, "--format", "csv"]).stdout
            self.assertEqual(main, run([*args, "--format", "csv", "--table", tables[0]]).stdout, name)
            for t in tables:
                form = OTHER_FORM.get((args[0], t), args)
                rows = rectangular(self, run([*form, "--format", "csv", "--table", t]).stdout, f"{name} {t}")
                for header in rows[0]:
                    # One convention: lower_snake_case with the unit last (mol_per_L, mg_per_mL, C).
                    self.assertNotRegex(header, r"[ ()/]", f"{name} {t}: column {header!r}")

    def test_numeric_columns_hold_numbers_only(self):
        rows = rectangular(self, run([*CASES["profile"], "--format", "csv"]).stdout, "profile")
        head = rows[0]
        numeric = [i for i, h in enumerate(head) if h.endswith(("_mol_per_L", "_mg_per_mL")) or h == "pH"]
        for row in rows[1:]:
            for i in numeric:
                if row[i]:
                    float(row[i])  # raises on ">10" and the like

    def test_version_of_every_command(self):
        for c in COMMANDS:
            r = run([c, "--version"], check=False)
            self.assertEqual(r.returncode, 0, c)
            self.assertRegex(r.stdout, r"^pkarta \d+\.\d+\.\d+\n$", c)


class HelpTest(unittest.TestCase):
    def test_named_placeholders_and_two_examples_last(self):
        for c in COMMANDS:
            out = run([c, "--help"]).stdout
            self.assertNotRegex(out, r"--[a-z-]+ arg\b", c)  # Boost's anonymous "arg"
            self.assertIn("--compound FILE" if c in ("mix", "profile", "screen", "fit") else "--format text|csv|json", out, c)
            tail = out.rstrip("\n").split("\nExamples:\n")
            self.assertEqual(len(tail), 2, f"{c}: no Examples section")
            examples = [line for line in tail[1].splitlines() if line.startswith("  pkarta ")]
            self.assertEqual(len(examples), 2, c)
            for e in examples:
                self.assertTrue(e.startswith(f"  pkarta {c}"), e)
            for line in out.splitlines():
                self.assertLessEqual(len(line), 100, f"{c} --help: {line}")


class ProgressTest(unittest.TestCase):
    ARGS = ["profile", "--compound", BASE, "--uncertainty", "3000", "--format", "csv", "--table", "bands"]

    def test_bar_on_a_terminal_is_cleared_and_data_stays_clean(self):
        import pty
        import time
        master, slave = pty.openpty()
        started = time.monotonic()
        proc = subprocess.Popen([BINARY, *self.ARGS], cwd=SOURCE, stdout=subprocess.PIPE, stderr=slave)
        os.close(slave)
        err = b""
        while True:
            try:
                chunk = os.read(master, 4096)
            except OSError:
                break
            if not chunk:
                break
            err += chunk
        out = proc.communicate()[0]
        took = time.monotonic() - started
        os.close(master)
        self.assertEqual(proc.returncode, 0)
        if took > 1.5:  # work of more than a second shows a bar (not on a machine that finishes sooner)
            self.assertIn(b"uncertainty [", err)
        if err:
            last = err.rsplit(b"\r", 2)
            self.assertEqual(last[-1], b"")        # the line is left empty: cleared
            self.assertEqual(last[-2].strip(b" "), b"")
        self.assertNotIn(b"uncertainty [", out)
        self.assertNotIn(b"#", out)
        self.assertNotIn(b"\r\r", out)
        rectangular(self, out.decode(), "bands under a bar")

    def test_no_bar_when_stderr_is_not_a_terminal(self):
        r = run(self.ARGS)
        self.assertNotIn("[", r.stderr)
        self.assertNotIn("\r", r.stderr)


def readme_examples():
    """The `build/pkarta ...` command lines of README.md (continuations joined)."""
    with open(os.path.join(SOURCE, "README.md"), encoding="utf-8") as f:
        text = f.read()
    commands = []
    for block in re.findall(r"```sh\n(.*?)```", text, re.S):
        joined = block.replace("\\\n", " ")
        for line in joined.splitlines():
            line = line.split("  #", 1)[0].strip()
            if line.startswith("build/pkarta "):
                commands.append(line[len("build/pkarta "):])
    return commands


class TextWidthTest(unittest.TestCase):
    def test_readme_examples_fit_in_100_columns(self):
        checked = 0
        for cmd in readme_examples():
            args = shlex.split(cmd)
            # Those writing files or reading files the reader is to supply are left out.
            if (args[0] in ("report", "demo") or "-o" in args or "--out-dir" in args or "--table" in args
                    or any(a.startswith("my-") for a in args)):
                continue
            if "--format" in args:
                i = args.index("--format")
                del args[i:i + 2]
            r = run(args, check=False)
            self.assertEqual(r.returncode, 0, f"{cmd}: {r.stderr}")
            wide = [line for line in r.stdout.splitlines() if len(line) > 100]
            self.assertEqual(wide, [], cmd)
            checked += 1
        self.assertGreaterEqual(checked, 15)


if __name__ == "__main__":
    unittest.main()
