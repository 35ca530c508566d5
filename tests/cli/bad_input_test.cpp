// The table of bad inputs of docs/hardening.md ("Bad inputs"): options, compound files, library
// files and data the model does not cover. Each case is run through the pkarta binary; it must
// exit with the stated code, say the stated words on stderr and print nothing on stdout.
// The test prints one line per case, the source of the table.
#include <gtest/gtest.h>
#include <sys/wait.h>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

namespace {

struct Case {
  const char* kind;     // "option", "compound file", "library file", "data file", "data"
  const char* file;     // text of {F}, or nullptr
  const char* args;     // command line; {F} is replaced by the file's path
  int code;             // expected exit code
  const char* expect;   // substring of stderr
};

const char* const kHead = "<compound id='x' name='x' molar-mass='300'>\n";
const char* const kBase = "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
                          " <intrinsic-solubility value='1' unit='ug/mL'/>\n";

std::string compound(const std::string& body) { return std::string(kHead) + body + "</compound>\n"; }
std::string base_with(const std::string& body) { return std::string(kBase) + body + "</compound>\n"; }
std::string library(const std::string& body) { return "<library>\n" + body + "</library>\n"; }

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

std::string temp_dir() {
  static const std::string dir = [] {
    char tmpl[] = "/tmp/pkarta-bad-XXXXXX";
    return std::string(mkdtemp(tmpl));
  }();
  return dir;
}

std::string replace_all(std::string s, const std::string& from, const std::string& to) {
  for (std::size_t p = s.find(from); p != std::string::npos; p = s.find(from, p + to.size())) {
    s.replace(p, from.size(), to);
  }
  return s;
}

TEST(BadInput, EveryCaseExitsWithItsCodeAndMessage) {
  const std::string nine_pkas = [] {
    std::string s;
    for (int i = 1; i <= 9; ++i) s += " <pka value='" + std::to_string(i) + "' type='acid'/>\n";
    return compound(s + " <intrinsic-solubility value='1' unit='ug/mL'/>\n");
  }();
  const std::string files[] = {
      // compound files (0..)
      "",                                                                             // 0
      "\x01\x02\xff\xfe binary",                                                      // 1
      "pH,value\n2,3\n",                                                              // 2
      std::string(kHead) + " <pka value='8' type='base'/>\n",                         // 3 unclosed
      "<drug/>",                                                                      // 4
      "<compound name='x' molar-mass='300'/>",                                        // 5
      "<compound id='x' name='x'/>",                                                  // 6
      "<compound id='x' name='x' molar-mass='abc'/>",                                 // 7
      "<compound id='x' name='x' molar-mass='0'/>",                                   // 8
      "<compound id='x' name='x' molar-mass='inf'/>",                                 // 9
      "<compound id='x' name='x' molar-mass='1e999'/>",                               // 10
      "<compound id='x' name='x' molar-mass='3,5e2'/>",                               // 11
      compound(" <pka value='42' type='base'/>\n"),                                   // 12
      compound(" <pka value='8' type='weird'/>\n"),                                   // 13
      compound(" <pka type='base'/>\n"),                                              // 14
      compound(" <pka value='8' type='base' dH='500'/>\n"),                           // 15
      compound(" <pka value='8' type='base' temperature='200'/>\n"),                  // 16
      compound(" <pka value='8' type='base'/>\n <pka value='3' type='base'/>\n"),     // 17
      nine_pkas,                                                                      // 18
      compound(" <pka value='8' type='base'/>\n"),                                    // 19
      compound(" <intrinsic-solubility value='0' unit='mg/mL'/>\n"),                  // 20
      compound(" <intrinsic-solubility value='-1' unit='mg/mL'/>\n"),                 // 21
      compound(" <intrinsic-solubility value='1' unit='stone'/>\n"),                  // 22
      compound(" <intrinsic-solubility value='1' unit='e3M'/>\n"),                    // 23
      compound(" <intrinsic-solubility value='20' unit='M'/>\n"),                     // 24
      compound(" <intrinsic-solubility value='1e-20' unit='M'/>\n"),                  // 25
      compound(" <intrinsic-solubility value='1' unit='mg/mL'/>\n"
               " <intrinsic-solubility value='2' unit='mg/mL'/>\n"),                  // 26
      base_with(" <salt id='hcl' counterion='Xy-' ksp='1e-3'/>\n"),                   // 27
      base_with(" <salt id='hcl' counterion='Cl-'/>\n"),                              // 28
      base_with(" <salt id='hcl' counterion='Cl-' ksp='1e-3' solubility-in-water='1 mg/mL'/>\n"),  // 29
      base_with(" <salt id='hcl' counterion='Cl-' ksp='-1'/>\n"),                     // 30
      base_with(" <salt id='hcl' counterion='Cl-' ksp='1e-50'/>\n"),                  // 31
      base_with(" <salt id='calcium' counterion='Ca2+' ksp='1e-3'/>\n"),              // 32
      base_with(" <salt id='sodium' counterion='Na+' ksp='1e-3'/>\n"),                // 33
      base_with(" <salt id='hcl' counterion='Cl-' ksp='1e-3'/>\n <salt id='hcl' counterion='Br-' ksp='1e-3'/>\n"),  // 34
      base_with(" <salt id='free' counterion='Cl-' ksp='1e-3'/>\n"),                  // 35
      base_with(" <salt id='a' counterion='Cl-' ksp='1e-3'/>\n <salt id='b' counterion='Cl-' ksp='1e-2'/>\n"),  // 36
      compound(" <pka value='6' type='base'/>\n <intrinsic-solubility value='1' unit='ug/mL'/>\n"
               " <salt id='hcl' counterion='Cl-' solubility-in-water='100 mg/mL'/>\n"),  // 37
      base_with(" <measured-solubility><point pH='2' value='-3' unit='mg/mL'/></measured-solubility>\n"),  // 38
      base_with(" <measured-solubility><point pH='20' value='3' unit='mg/mL'/></measured-solubility>\n"),  // 39
      "<compound id='x' name='x' molar-mass='300' permanent-charge='2.5'/>",         // 40
      "<compound id='x' name='x' molar-mass='300' permanent-charge='2'>\n <pka value='9' type='acid'/>\n"
      " <intrinsic-solubility value='1' unit='mg/mL'/>\n</compound>\n",               // 41
      base_with(" <colour value='blue'/>\n"),                                         // 42
      // library files (43..)
      library(" <system id='s'/>\n"),                                                // 43
      library(" <reagent id='r' formula='Qq'><gives ion='Na+'/></reagent>\n"),        // 44
      library(" <reagent id='r' formula='NaCl'><gives ion='Zz+'/></reagent>\n"),      // 45
      library(" <buffer id='b' system='nothing'/>\n"),                                // 46
      library(" <medium id='m'><add reagent='NaCl' amount='9'/></medium>\n"),         // 47
      library(" <ion id='Q+' charge='1'/>\n"),                                        // 48
      library(" <buffer id='b' system='phosphate' routes='rectal'/>\n"),              // 49
      library(" <ion id='Q+' charge='1' molar-mass='10'/>\n <ion id='Q+' charge='1' molar-mass='10'/>\n"),  // 50
      library(" <reagent id='r' formula='NaCl' state='gas'><gives ion='Na+'/></reagent>\n"),  // 51
      library(" <medium id='m'><add reagent='NaCl' amount='1000M'/></medium>\n"),     // 52
      library(" <reagent id='r' formula='NaCl'><gives ion='Na+' system='phosphate'/></reagent>\n"),  // 53
      library(" <reagent id='r' formula='NaCl'><gives ion='Na+' count='0'/></reagent>\n"),  // 54
      library(" <buffer id='b' system='phosphate' max-conc='10 M'/>\n"),              // 55
      library(" <ion id='Q+' charge='1.5' molar-mass='10'/>\n"),                      // 56
      library(" <reagent id='r' formula='Ca(OH'><gives ion='Ca2+'/></reagent>\n"),    // 57
      library(" <buffer id='b' system='phosphate' max-conc='5 mg/mL'/>\n"),           // 58
      // measured points that underflow, overflow or weigh without limit (59..)
      base_with(" <measured-solubility><point pH='2' value='1e-320' unit='ug/mL'/></measured-solubility>\n"),  // 59
      base_with(" <measured-solubility><point pH='2' value='1e308' unit='%w/v'/></measured-solubility>\n"),  // 60
      base_with(" <measured-solubility><point pH='2' value='1e-400' unit='mg/mL'/></measured-solubility>\n"),  // 61
      base_with(" <measured-solubility><point pH='2' value='1e400' unit='mg/mL'/></measured-solubility>\n"),  // 62
      base_with(" <measured-solubility><point pH='2' value='3' unit='mg/mL' log-sd='1e-300'/></measured-solubility>\n"),  // 63
      "pH,value,unit,log_sd\n2,3,mg/mL,1e-300\n7,20,ug/mL,0.1\n",               // 64 CSV
      "pH,value,unit\n2,1e-320,ug/mL\n7,20,ug/mL\n",                             // 65 CSV
      "pH,value,unit\n2,1e308,%w/v\n7,20,ug/mL\n",                                // 66 CSV
      "pH,value,unit\n2,1e400,mg/mL\n7,20,ug/mL\n",                               // 67 CSV
      "pH,value,unit\n2,1e-400,mg/mL\n7,20,ug/mL\n",                              // 68 CSV
      // option and unit text that is not what it says (69..)
      "pH,value,unit\n2,3,e3M\n7,20,ug/mL\n",                                      // 69 CSV
      "pH,value,unit\n2,3,0mM\n7,20,ug/mL\n",                                      // 70 CSV
      // bytes that are not UTF-8 in names and ids (71..)
      "<compound id='x' name='bad\xff\xfename' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n",             // 71
      "<compound id='x\xc3' name='n' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n",             // 72 cut sequence
      "<compound id='x' name='\xc0\xafx' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n",             // 73 overlong
      "<compound id='x' name='\xed\xa0\x80x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n",             // 74 surrogate
      base_with(" <salt id='h\xff" "cl' counterion='Cl-' ksp='1e-3'/>\n"),              // 75
      library(" <ion id='Q\xff+' charge='1' molar-mass='10'/>\n"),                   // 76
      library(" <medium id='m' name='sal\xe9ine'><add reagent='NaCl' amount='9g/L'/></medium>\n"),  // 77 Latin-1
      "pH,value,unit,not\xff\n2,3,mg/mL,1\n7,20,ug/mL,1\n",                       // 78 CSV
      // extreme charge (79..)
      "<compound id='q' name='q' molar-mass='300' permanent-charge='16'>\n <pka value='3' type='acid'/>\n</compound>\n",  // 79
      // pKa values that cross with temperature (80..); van 't Hoff by hand: 0.4 = (120 kJ/mol /
      // (R ln 10)) (1/298.15 K - 1/T) gives T = 303.9 K, 30.8 °C, so out of order from 31 °C
      compound(" <pka value='7.0' type='acid' dH='-60'/>\n <pka value='7.4' type='acid' dH='60'/>\n"
               " <intrinsic-solubility value='1' unit='ug/mL'/>\n"),                  // 80
      library(" <system id='s' name='s' source='invented'>\n  <pka value='4' type='acid' dH='-40'/>\n"
              "  <pka value='4.1' type='acid' dH='40'/>\n </system>\n"),              // 81
      compound(" <pka value='8' type='bass'/>\n <intrinsic-solubility value='1' unit='mg/ml'/>\n"
               " <salt id='free' counterion='Cl-' ksp='1'/>\n"),                     // 82 three errors
      compound(" <intrinsic-solubility value='1' unit='ug/mL'/>\n <pka value='8' type='base'/>\n"),  // 83
      // names the schema does not have (84..)
      compound(" <pka value='8' type='base' temprature='30'/>\n <intrinsic-solubility value='1' unit='ug/mL'/>\n"),  // 84
      library(" <ionn id='Q+' charge='1' molar-mass='10'/>\n"),                      // 85
      library(" <reagent id='r' formula='NaCl'><give ion='Na+'/></reagent>\n"),       // 86
      library(" <reagent id='r' formula='NaCl' molar-mass='58.4'><gives ion='Na+'/></reagent>\n"),  // 87
  };
  auto F = [&](int i) { return files[i].c_str(); };
  const Case cases[] = {
      // options
      {"option", nullptr, "", 2, "usage: pkarta COMMAND"},
      {"option", nullptr, "frobnicate", 2, "unknown command 'frobnicate'"},
      {"option", nullptr, "mix --bogus", 2, "unrecognised option '--bogus'"},
      {"option", nullptr, "mix --compund x.xml", 2, "unrecognised option '--compund'; did you mean '--compound'?"},
      {"option", nullptr, "mxi --add NaCl=1mM", 2, "unknown command 'mxi'; did you mean 'mix'?"},
      {"option", nullptr, "dilute --compound compounds/demo-base.xml --dose 2mg/mL --into plasma-7.4 --ratios 1:10", 2,
       "--ratios: give each ratio as total volume / formulation volume, not as \"1:10\""},
      {"option", nullptr, "dilute --compound compounds/demo-base.xml --dose 2mg/mL --into plasma-7.4 --blood venous", 2,
       "--blood: expected plasma or whole, got \"venous\""},
      {"option", nullptr, "dilute --compound compounds/demo-base.xml --dose 2mg/mL --into saline-0.9 --blood whole", 2,
       "--blood: whole needs a plasma or blood medium; saline-0.9 is neither"},
      {"option", nullptr, "mix --add KH2PO5=25mM", 2, "unknown reagent 'KH2PO5'; did you mean 'KH2PO4'?"},
      {"option", nullptr, "profile --compound compounds/demo-base.xml --from 2,5", 2,
       "--from: value is not a number: \"2,5\" (pkarta reads a decimal point: write 2.5)"},
      {"option", nullptr, "mix --compound ''", 2, "--compound: the value is empty"},
      {"option", nullptr, "screen --compound compounds/demo-base.xml --dose 1mg/mL --target-ph 5 --threads 1.5", 2,
       "--threads: expected a whole number of threads, got 1.5"},
      {"option", nullptr, "fit --compound compounds/demo-base.xml -o /nonexistent-folder/x.xml", 2,
       "cannot write: the folder /nonexistent-folder does not exist"},
      {"option", nullptr, "check /dev/zero", 2, "/dev/zero: cannot read file: it is a character device, not a regular file"},
      {"option", nullptr, "fit --compound compounds/demo-base.xml -o /dev/null", 2,
       "/dev/null: the output path is a character device, not a regular file"},
      {"option", nullptr, "profile --bogus", 2, "unrecognised option '--bogus'"},
      {"option", nullptr, "mix --add", 2, "the required argument for option '--add' is missing"},
      {"option", nullptr, "mix --add NaCl=10mM extra", 2, "unexpected argument 'extra' after '--add NaCl=10mM'"},
      {"option", nullptr, "mix --add NaCl=10 mM", 2, "unexpected argument 'mM' after '--add NaCl=10'"},
      {"option", nullptr, "mix --add KH2PO4", 2, "--add: expected REAGENT=AMOUNT"},
      {"option", nullptr, "mix --add =25mM", 2, "--add: expected REAGENT=AMOUNT"},
      {"option", nullptr, "mix --add KH2PO4=", 2, "--add: expected REAGENT=AMOUNT"},
      {"option", nullptr, "mix --add KH2PO4=25", 2, "--add: amount \"25\" has no unit"},
      {"option", nullptr, "mix --add KH2PO4=mM", 2, "--add: amount \"mM\" has no number"},
      {"option", nullptr, "mix --add KH2PO4=25furlongs", 2, "--add: unknown unit \"furlongs\""},
      {"option", nullptr, "mix --add NaCl=1,5mM", 2, "has a decimal comma; pkarta reads a decimal point: write 1.5mM"},
      {"option", nullptr, "mix --add KH2PO4=-5mM", 2, "--add: amount \"-5mM\" is negative"},
      {"option", nullptr, "mix --add KH2PO4=nanM", 2, "--add: amount \"nanM\" has no number"},
      {"option", nullptr, "mix --add KH2PO4=1e400M", 2, "--add: amount is out of the range of numbers"},
      {"option", nullptr, "mix --add KH2PO4=1e300M", 2, "--add: amount \"1e300M\" is too large"},
      {"option", nullptr, "mix --add NaCl=1000M", 2, "--add: NaCl at 1000M is 1000 mol/L, beyond the 10 mol/L"},
      {"option", nullptr, "mix --add NaCl=2000g/L", 2, "--add: NaCl at 2000g/L is 34.2 mol/L"},
      {"option", nullptr, "mix --add NoSuchSalt=25mM", 2, "--add: unknown reagent 'NoSuchSalt'"},
      {"option", nullptr, "mix --add KH2PO4=25mM --temp hot", 2, "--temp: value is not a number: \"hot\""},
      {"option", nullptr, "mix --add KH2PO4=25mM --temp 400", 2, "--temp: value 400 is out of range"},
      {"option", nullptr, "mix --add KH2PO4=25mM --temp -50", 2, "--temp: value -50 is out of range"},
      {"option", nullptr, "mix --add KH2PO4=25mM --temp nan", 2, "--temp: value must be finite"},
      {"option", nullptr, "mix --add KH2PO4=25mM --temp 25 --temp 30", 2, "'--temp' cannot be specified more than once"},
      {"option", nullptr, "mix --add KH2PO4=25mM --format xml", 2, "--format: unknown format \"xml\""},
      {"option", nullptr, "mix --add KH2PO4=25mM --format csv --format json", 2, "'--format' cannot be specified more than once"},
      {"option", nullptr, "mix --medium nowhere", 2, "--medium: unknown medium 'nowhere'"},
      {"option", nullptr, "mix", 2, "nothing to mix"},
      {"option", nullptr, "mix --dose 5mg/mL", 2, "--dose: --dose needs --compound"},
      {"option", nullptr, "mix --compound compounds/demo-base.xml", 2, "--dose: --compound needs --dose"},
      {"option", nullptr, "mix --compound compounds/demo-base.xml --dose 5", 2, "--dose: amount \"5\" has no unit"},
      {"option", nullptr, "mix --compound compounds/demo-base.xml --dose 5mg/mL --form tartrate", 2, "has no salt 'tartrate'"},
      {"option", nullptr, "mix --compound compounds/demo-base.xml --dose 5000mg/mL", 2, "--dose: the dose of demo-base at 5000mg/mL is 16.1 mol/L"},
      {"option", nullptr, "mix --compound /no/such/file.xml --dose 5mg/mL", 2, "/no/such/file.xml: cannot read file"},
      {"option", nullptr, "mix --compound compounds --dose 5mg/mL", 2, "compounds: cannot read file: it is a folder"},
      {"option", nullptr, "mix --add KH2PO4=25mM --library /no/such/lib.xml", 2, "/no/such/lib.xml: cannot read file"},
      {"option", nullptr, "library show nothing-like-this", 2, "no library entry"},
      {"option", nullptr, "library dance", 2, "unknown library action"},
      {"option", nullptr, "library list extra", 2, "library list takes no further argument"},
      {"option", nullptr, "check", 2, "usage"},
      {"option", nullptr, "check /no/such/file.xml", 2, "/no/such/file.xml: cannot read file"},
      // compound files
      {"compound file", F(0), "check {F}", 2, ":1:1: malformed XML: No document element found"},
      {"compound file", F(1), "check {F}", 2, "malformed XML"},
      {"compound file", F(2), "check {F}", 2, "malformed XML"},
      {"compound file", F(3), "check {F}", 2, "malformed XML: Start-end tags mismatch"},
      {"compound file", F(4), "check {F}", 2, ":1:1: root element is <drug>, expected <compound>"},
      {"compound file", F(5), "check {F}", 2, ":1:1: <compound> needs attribute 'id'"},
      {"compound file", F(6), "check {F}", 2, "<compound> needs attribute 'molar-mass'"},
      {"compound file", F(7), "check {F}", 2, "attribute 'molar-mass' is not a number: \"abc\""},
      {"compound file", F(8), "check {F}", 2, "attribute 'molar-mass' of <compound> is 0, expected 1 to"},
      {"compound file", F(9), "check {F}", 2, "attribute 'molar-mass' must be finite"},
      {"compound file", F(10), "check {F}", 2, "attribute 'molar-mass' is out of the range of numbers"},
      {"compound file", F(11), "check {F}", 2, "attribute 'molar-mass' is not a number: \"3,5e2\""},
      {"compound file", F(12), "check {F}", 2, ":2:2: attribute 'value' of <pka> is 42, expected -5 to 20"},
      {"compound file", F(13), "check {F}", 2, "attribute 'type' of <pka> is \"weird\", expected acid or base"},
      {"compound file", F(14), "check {F}", 2, ":2:2: <pka> needs attribute 'value'"},
      {"compound file", F(15), "check {F}", 2, "attribute 'dH' of <pka> is 500, expected -200 to 200"},
      {"compound file", F(16), "check {F}", 2, "attribute 'temperature' of <pka> is 200, expected -10 to 100"},
      {"compound file", F(17), "check {F}", 2, ":3:2: pKa values must be in ascending order (3 follows 8)"},
      {"compound file", F(18), "check {F}", 2, ":10:2: at most 8 pKa values are supported"},
      {"compound file", F(19), "check {F}", 2, "needs an <intrinsic-solubility> (it has a net-neutral form)"},
      {"compound file", F(20), "check {F}", 2, ":2:2: intrinsic solubility must be > 0, got 0"},
      {"compound file", F(21), "check {F}", 2, "intrinsic solubility must be > 0, got -1"},
      {"compound file", F(22), "check {F}", 2, "attribute 'unit': unknown unit \"stone\""},
      {"compound file", F(23), "check {F}", 2, "attribute 'unit' is \"e3M\", expected a unit alone"},
      {"compound file", F(24), "check {F}", 2, "attribute 'value' of <intrinsic-solubility> is 20, expected 1e-15 to 10"},
      {"compound file", F(25), "check {F}", 2, "attribute 'value' of <intrinsic-solubility> is 1e-20, expected 1e-15 to 10"},
      {"compound file", F(26), "check {F}", 2, ":3:2: a second <intrinsic-solubility>; give one"},
      {"compound file", F(27), "check {F}", 2, ":4:2: counterion 'Xy-' of salt 'hcl' is not an ion of the library"},
      {"compound file", F(28), "check {F}", 2, "<salt> needs exactly one of 'ksp' or 'solubility-in-water'"},
      {"compound file", F(29), "check {F}", 2, "<salt> needs exactly one of 'ksp' or 'solubility-in-water'"},
      {"compound file", F(30), "check {F}", 2, "ksp must be > 0, got -1"},
      {"compound file", F(31), "check {F}", 2, "attribute 'ksp' of <salt> is 1e-50, expected 1e-40 to 100"},
      {"compound file", F(32), "check {F}", 2, "counterion 'Ca2+' has charge 2; only 1:1 salts"},
      {"compound file", F(33), "check {F}", 2, "salt 'sodium': the compound has no species of charge -1"},
      {"compound file", F(34), "check {F}", 2, ":5:2: duplicate salt id 'hcl'"},
      {"compound file", F(35), "check {F}", 2, "salt id 'free' is reserved"},
      {"compound file", F(36), "check {F}", 2, "salts 'a' and 'b' share the counterion Cl-"},
      {"compound file", F(37), "check {F}", 2, "salt 'hcl' would disproportionate in water"},
      {"compound file", F(38), "check {F}", 2, "measured solubility must be > 0, got -3"},
      {"compound file", F(39), "check {F}", 2, "attribute 'pH' of <point> is 20, expected -1 to 15"},
      {"compound file", F(40), "check {F}", 2, "attribute 'permanent-charge' of <compound> is \"2.5\": expected a whole number such as -1, 0 or 2"},
      {"compound file", F(41), "check {F}", 2, "the compound has no net-neutral form (permanent-charge 2)"},
      {"compound file", F(42), "check {F}", 2,
       ":4:2: unknown element <colour> in <compound>; allowed here: description, pka, intrinsic-solubility, salt, measured-solubility"},
      {"compound file", F(42), "mix --compound {F} --dose 1e-3mg/mL --add NaCl=150mM", 2, ":4:2: unknown element <colour> in <compound>"},
      {"compound file", F(84), "check {F}", 2,
       ":2:2: unknown attribute 'temprature' on <pka>; allowed here: value, type, dH, dCp, temperature, sd, source,"},
      {"library file", F(85), "check {F}", 2, ":2:2: unknown element <ionn> in <library>; allowed here: ion, system, reagent, buffer, medium"},
      {"library file", F(86), "check {F}", 2, ":2:33: unknown element <give> in <reagent>; allowed here: gives"},
      {"library file", F(87), "check {F}", 2, ":2:2: unknown attribute 'molar-mass' on <reagent>; allowed here: id, formula, name, state"},
      // library files
      {"library file", F(43), "check {F}", 2, ":2:2: <system> 's' has no <pka>"},
      {"library file", F(44), "check {F}", 2, "formula \"Qq\": unknown element 'Qq' at character 3"},
      {"library file", F(45), "check {F}", 2, ":2:33: unknown ion 'Zz+'"},
      {"library file", F(46), "check {F}", 2, "unknown system 'nothing'"},
      {"library file", F(47), "check {F}", 2, "attribute 'amount': amount \"9\" has no unit"},
      {"library file", F(48), "check {F}", 2, "<ion> needs a 'formula' or a 'molar-mass'"},
      {"library file", F(49), "check {F}", 2, "unknown route 'rectal'"},
      {"library file", F(50), "check {F}", 2, ":3:2: duplicate ion id 'Q+'"},
      {"library file", F(51), "check {F}", 2, "attribute 'state' is \"gas\", expected solid, liquid or solution"},
      {"library file", F(52), "check {F}", 2, "attribute 'amount' of <add> is 1000 mol/L, beyond the 10 mol/L"},
      {"library file", F(53), "check {F}", 2, "<gives> needs exactly one of 'system' or 'ion'"},
      {"library file", F(54), "check {F}", 2, "attribute 'count' of <gives> is \"0\": expected a whole number of 1 or more"},
      {"library file", F(55), "check {F}", 2, "attribute 'max-conc' of <buffer> is 10, expected 1e-05 to 5"},
      {"library file", F(56), "check {F}", 2, "attribute 'charge' of <ion> is \"1.5\": expected a whole number"},
      {"library file", F(57), "check {F}", 2, "formula \"Ca(OH\": missing ')'"},
      {"library file", F(58), "check {F}", 2, "max-conc must be in M, mM or mol/kg"},
      {"library file", F(52), "mix --add NaCl=10mM --library {F}", 2, "beyond the 10 mol/L"},
      // measured solubilities for the fit: every one must give a finite log10 S and weight
      {"compound file", F(59), "check {F}", 2, ":4:23: measured solubility 1e-320 ug/mL underflows to 0 mol/L, expected 1e-15 to 10 mol/L"},
      {"compound file", F(60), "check {F}", 2, ":4:23: measured solubility 1e308 %w/v overflows in mol/L"},
      {"compound file", F(61), "check {F}", 2, ":4:23: attribute 'value' is out of the range of numbers: \"1e-400\""},
      {"compound file", F(62), "check {F}", 2, ":4:23: attribute 'value' is out of the range of numbers: \"1e400\""},
      {"compound file", F(63), "fit --compound {F} --params s0", 2, ":4:23: attribute 'log-sd' of <point> is 1e-300, expected 0.0001 to 5"},
      {"data file", F(64), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:11: column 'log_sd' is 1e-300, expected 0.0001 to 5"},
      {"data file", F(65), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:3: solubility 1e-320 ug/mL underflows to 0 mol/L"},
      {"data file", F(66), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:3: solubility 1e308 %w/v overflows in mol/L"},
      {"data file", F(67), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:3: column 'value' is out of the range of numbers: \"1e400\""},
      {"data file", F(68), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:3: column 'value' is out of the range of numbers: \"1e-400\""},
      // numbers and units that wrap or are not what they say
      {"option", nullptr, "fit --compound compounds/demo-base.xml --params pka4294967297", 2,
       "--params: 'pka4294967297': compound 'demo-base' has 2 pKa values (pka1..pka2)"},
      {"option", nullptr, "fit --compound compounds/demo-base.xml --params pka18446744073709551617", 2,
       "--params: 'pka18446744073709551617': compound 'demo-base' has 2 pKa values"},
      {"option", nullptr, "screen --compound compounds/demo-base.xml --dose 1mg/mL --target-ph 5 --threads 4294967297", 2,
       "--threads: value 4294967297 is out of range, expected 0 to 1024"},
      {"option", nullptr, "profile --compound compounds/demo-base.xml --uncertainty 10 --seed 1.5", 2,
       "--seed: expected a whole number, got 1.5"},
      {"option", nullptr, "profile --compound compounds/demo-base.xml --uncertainty 1e1.5", 2,
       "--uncertainty: value is not a number: \"1e1.5\""},
      {"option", nullptr, "report --compound compounds/demo-base.xml --format xml -o x.html", 2,
       "--format: unknown format \"xml\", expected text, csv or json"},
      {"option", nullptr, "report --compound compounds/demo-base.xml --format html -o x.html", 2,
       "--format: unknown format \"html\", expected text, csv or json"},
      {"option", nullptr, "demo --format yaml", 2, "--format: unknown format \"yaml\", expected text, csv or json"},
      {"data file", F(69), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:5: column 'unit' is \"e3M\", expected a unit alone such as mg/mL, ug/mL or mM"},
      {"data file", F(70), "fit --compound compounds/demo-base.xml --params s0 --data {F}", 2,
       ":2:5: column 'unit' is \"0mM\", expected a unit alone"},
      // names and ids that are not UTF-8: refused where they are, before any JSON or HTML
      {"compound file", F(71), "check {F}", 2, ":1:27: invalid UTF-8 (byte 0xFF); save the file as UTF-8 text"},
      {"compound file", F(71), "profile --compound {F} --format json", 2, ":1:27: invalid UTF-8 (byte 0xFF)"},
      {"compound file", F(71), "mix --compound {F} --dose 1mg/mL --format json", 2, ":1:27: invalid UTF-8 (byte 0xFF)"},
      {"compound file", F(71), "report --compound {F} -o never-written.html", 2, ":1:27: invalid UTF-8 (byte 0xFF)"},
      {"compound file", F(72), "check {F}", 2, ":1:16: invalid UTF-8 (byte 0xC3)"},
      {"compound file", F(73), "check {F}", 2, ":1:24: invalid UTF-8 (byte 0xC0)"},
      {"compound file", F(74), "check {F}", 2, ":1:24: invalid UTF-8 (byte 0xED)"},
      {"compound file", F(75), "check {F}", 2, ":4:13: invalid UTF-8 (byte 0xFF)"},
      {"library file", F(76), "check {F}", 2, ":2:12: invalid UTF-8 (byte 0xFF)"},
      {"library file", F(77), "mix --add NaCl=1mM --library {F} --format json", 2, ":2:26: invalid UTF-8 (byte 0xE9)"},
      {"data file", F(78), "fit --compound compounds/demo-base.xml --params s0 --data {F} --format json", 2,
       ":1:18: invalid UTF-8; save the file as UTF-8 text"},
      // valid-looking extremes: the 10 mol/L the model covers, in concentration and in charge
      {"compound file", F(79), "mix --compound {F} --dose 1M", 2,
       "--dose: the dose of q at 1M carries up to 16.0 mol/L of charge (species of charge 16 at 1.00 mol/L), beyond the 10 mol/L"},
      {"compound file", F(79), "screen --compound {F} --dose 1M --target-ph 5", 2, "--dose: the dose of q at 1M carries up to 16.0 mol/L"},
      {"compound file", F(79), "report --compound {F} --dose 1M -o never-written.html", 2, "--dose: the dose of q at 1M carries up to 16.0"},
      {"compound file", F(79), "recipe --buffer phosphate --ph 7 --conc 50mM --compound {F} --dose 1M", 2, "--dose: the dose of q at 1M carries"},
      // Nothing can limit its solubility (no neutral form, no salt): a profile would be the cap
      // everywhere, with an ionic strength of about 1360 mol/L.
      {"compound file", F(79), "profile --compound {F}", 2, "nothing limits the solubility of 'q' in this medium"},
      {"compound file", F(79), "classify --compound {F} --dose-mg 10", 2, "nothing limits the solubility of 'q'"},
      {"option", nullptr, "classify --compound compounds/demo-base.xml --dose-mg 100 --volume-mL 1e-300", 2,
       "--volume-mL: 100 mg in 1e-300 mL is 3.21e+299 mol/L, beyond the 10 mol/L the model covers"},
      {"option", nullptr, "classify --compound compounds/demo-base.xml --dose-mg 4000 --volume-mL 1", 2,
       "--volume-mL: 4000 mg in 1 mL is 12.8 mol/L, beyond the 10 mol/L"},
      // pKa values that cross inside 0-60 °C: a warning, the input is still read
      {"compound file", F(80), "check {F}", 0,
       ":3:2: warning: pKa 2 (7.4) and pKa 1 (7) cross by their temperature dependence: out of order from 31 to 60 °C"},
      {"compound file", F(80), "profile --compound {F} --temp 60", 0, "the macroscopic model, its constants in ascending order, no longer holds there"},
      {"library file", F(81), "check {F}", 0, ":4:3: warning: pKa 2 (4.1) and pKa 1 (4) cross by their temperature dependence: out of order from"},
      {"compound file", F(82), "check {F}", 2, ":4:2: salt id 'free' is reserved"},
      {"compound file", F(82), "mix --compound {F} --dose 1mg/mL", 2, ":3:2: attribute 'unit' is \"mg/ml\""},
      {"compound file", F(83), "check {F}", 2, ":3:2: <pka> after <intrinsic-solubility>: the elements of <compound> go in the order"},
      // -o of the one-stream commands: checked before any work
      {"option", nullptr, "mix --add KH2PO4=25mM --format json -o /nonexistent-folder/x.json", 2,
       "/nonexistent-folder/x.json: cannot write: the folder /nonexistent-folder does not exist"},
      {"option", nullptr, "profile --compound compounds/demo-base.xml -o compounds/demo-base.xml", 2,
       "refusing to overwrite the input file compounds/demo-base.xml"},
      {"option", nullptr, "screen --compound compounds/demo-base.xml --dose 1mg/mL --target-ph 6 -o /dev/null", 2,
       "/dev/null: the output path is a character device, not a regular file"},
      {"option", nullptr, "fit --compound compounds/demo-base.xml -o -", 2,
       "--output: fit prints its result on standard output; give a file name for the fitted compound file"},
      // data the model does not cover
      {"data", nullptr, "mix --add HCl=9M --add NaCl=9M", 1, "too concentrated for the model"},
  };
  int i = 0, failures = 0;
  for (const Case& c : cases) {
    std::string args = c.args;
    if (c.file) {
      const std::string path = temp_dir() + "/case" + std::to_string(i) + ".xml";
      std::ofstream(path, std::ios::binary) << c.file;
      args = replace_all(args, "{F}", path);
    }
    ++i;
    const std::string out = temp_dir() + "/out.txt", err = temp_dir() + "/err.txt";
    const std::string cmd = std::string("cd ") + PKARTA_SOURCE_DIR + " && " + PKARTA_BINARY + " " + args +
                            " >" + out + " 2>" + err;
    const int status = std::system(cmd.c_str());
    const int code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    std::string message = slurp(err);
    const bool ok = code == c.code && message.find(c.expect) != std::string::npos &&
                    (c.code == 0 || slurp(out).empty());
    if (!ok) ++failures;
    EXPECT_EQ(code, c.code) << c.args << "\n" << message;
    EXPECT_NE(message.find(c.expect), std::string::npos) << c.args << "\nexpected: " << c.expect << "\nstderr: " << message;
    if (c.code != 0) EXPECT_TRUE(slurp(out).empty()) << c.args << ": output written despite the error";
    // One line of the table: kind | input | exit | message (first line, file paths shortened).
    message = message.substr(0, message.find('\n'));
    message = replace_all(message, temp_dir() + "/", "");
    std::string shown = "`" + replace_all(c.args, "{F}", "FILE") + "`";
    if (c.file) {
      std::string text = replace_all(replace_all(c.file, "\n", " "), "<compound id='x' name='x' molar-mass='300'>", "<compound ...>");
      text = replace_all(text, " <pka value='8' type='base'/>  <intrinsic-solubility value='1' unit='ug/mL'/> ", " (base, S0) ");
      for (char& ch : text) {
        if (static_cast<unsigned char>(ch) < 0x20 || static_cast<unsigned char>(ch) >= 0x7f) ch = '?';
      }
      if (text.size() > 110) text = text.substr(0, 107) + "...";
      shown += " with FILE `" + (text.empty() ? std::string("(empty)") : text) + "`";
    }
    std::printf("[ bad input ] %s | %s | %d | %s\n", c.kind, replace_all(shown, "|", "\\|").c_str(), code,
                replace_all(message, "|", "\\|").c_str());
  }
  std::printf("[ bad input ] %d cases, %d failures\n", i, failures);
}

}  // namespace
