// A compound or library file with several errors names every one of them in one run, in line
// order, each at its own line:column (1-based, common practice of compilers and editors); a file
// with one error gives that error alone, as a plain InputError.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "pkarta/base/error.h"
#include "pkarta/io/xml_input.h"

namespace {

const pkarta::Library& library() {
  static const pkarta::Library lib = pkarta::builtin_library();
  return lib;
}

// Every error of a compound text, as what() gives each; empty when it reads.
std::vector<std::string> compound_errors(const std::string& text) {
  pkarta::Warnings warnings;
  try {
    pkarta::parse_compound(text, "c.xml", library(), &warnings);
  } catch (const pkarta::InputErrors& e) {
    std::vector<std::string> all;
    for (const pkarta::InputError& one : e.all()) all.push_back(one.what());
    EXPECT_EQ(std::string(e.what()), all.front()) << "the list is its first error";
    return all;
  } catch (const pkarta::InputError& e) {
    return {e.what()};
  }
  return {};
}

std::vector<std::string> library_errors(const std::string& text) {
  pkarta::Warnings warnings;
  try {
    pkarta::parse_library(text, "l.xml", &library(), &warnings);
  } catch (const pkarta::InputErrors& e) {
    std::vector<std::string> all;
    for (const pkarta::InputError& one : e.all()) all.push_back(one.what());
    return all;
  } catch (const pkarta::InputError& e) {
    return {e.what()};
  }
  return {};
}

TEST(XmlAllErrors, ThreeErrorsOnThreeLinesInLineOrder) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x' molar-mass='300'>\n"
      "  <pka value='8' type='bass'/>\n"
      " <pka value='9.5' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='mg/ml'/>\n"
      " <salt id='hydrochloride' counterion='Cl-' ksp='1'/>\n"
      "    <salt id='free' counterion='Cl-' ksp='1'/>\n"
      "</compound>\n");
  ASSERT_EQ(errors.size(), 3u);
  EXPECT_EQ(errors[0], "c.xml:2:3: attribute 'type' of <pka> is \"bass\", expected acid or base");
  EXPECT_EQ(errors[1], "c.xml:4:2: attribute 'unit' is \"mg/ml\": write it as the schema spells it, mg/mL "
                       "(units: M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v)");
  EXPECT_EQ(errors[2], "c.xml:6:5: salt id 'free' is reserved");
}

TEST(XmlAllErrors, OneErrorIsAPlainInputErrorAsBefore) {
  const std::string text =
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='-1' unit='ug/mL'/>\n</compound>\n";
  pkarta::Warnings warnings;
  try {
    pkarta::parse_compound(text, "c.xml", library(), &warnings);
    FAIL() << "accepted";
  } catch (const pkarta::InputErrors&) {
    FAIL() << "one error reported as a list";
  } catch (const pkarta::InputError& e) {
    EXPECT_STREQ(e.what(), "c.xml:3:2: intrinsic solubility must be > 0, got -1");
  }
}

TEST(XmlAllErrors, ValuesAreEchoedAsTheFileWritesThem) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='2.5e1' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL' temperature='120.0'/>\n</compound>\n");
  ASSERT_EQ(errors.size(), 2u);
  EXPECT_EQ(errors[0], "c.xml:2:2: attribute 'value' of <pka> is 2.5e1, expected -5 to 20");
  EXPECT_EQ(errors[1], "c.xml:3:2: attribute 'temperature' of <intrinsic-solubility> is 120.0, expected -10 to 100");
}

TEST(XmlAllErrors, EachPairOutOfOrderIsAnError) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='8.0' type='base'/>\n"
      " <pka value='3' type='acid'/>\n <pka value='10' type='acid'/>\n <pka value='9.5' type='acid'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n");
  ASSERT_EQ(errors.size(), 2u);
  EXPECT_EQ(errors[0], "c.xml:3:2: pKa values must be in ascending order (3 follows 8.0)");
  EXPECT_EQ(errors[1], "c.xml:5:2: pKa values must be in ascending order (9.5 follows 10)");
}

// The checks across elements (a net-neutral form needs an intrinsic solubility) would only
// repeat an element's error: they are made when every element was read.
TEST(XmlAllErrors, NoFollowOnErrorFromARefusedElement) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='mg/ml'/>\n</compound>\n");
  ASSERT_EQ(errors.size(), 1u);
  EXPECT_NE(errors[0].find("c.xml:3:2: attribute 'unit'"), std::string::npos) << errors[0];
}

// An error in the root's attributes ends the reading: the molar mass converts every amount.
TEST(XmlAllErrors, RootAttributeErrorStopsTheReading) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x'>\n <pka value='8' type='bass'/>\n</compound>\n");
  ASSERT_EQ(errors.size(), 1u);
  EXPECT_EQ(errors[0], "c.xml:1:1: <compound> needs attribute 'molar-mass'");
}

// The schema's order (compound.xsd: description, pka, intrinsic-solubility, salt,
// measured-solubility); reading goes on after an element out of order.
TEST(XmlAllErrors, ElementsOutOfTheSchemasOrderAreRefused) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x' molar-mass='300'>\n <intrinsic-solubility value='1' unit='ug/mL'/>\n"
      " <pka value='8' type='base'/>\n <salt id='s' counterion='Cl-' ksp='x'/>\n</compound>\n");
  ASSERT_EQ(errors.size(), 2u);
  EXPECT_EQ(errors[0], "c.xml:3:2: <pka> after <intrinsic-solubility>: the elements of <compound> go in the "
                       "order description, pka, intrinsic-solubility, salt, measured-solubility");
  EXPECT_EQ(errors[1].rfind("c.xml:4:2: ", 0), 0u) << errors[1];
}

TEST(XmlAllErrors, EveryMeasuredPointOnItsOwn) {
  const std::vector<std::string> errors = compound_errors(
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n <measured-solubility>\n"
      "  <point pH='16' value='1' unit='ug/mL'/>\n  <point pH='5' value='1' unit='ug/mL'/>\n"
      "  <point pH='6' value='0' unit='ug/mL'/>\n </measured-solubility>\n</compound>\n");
  ASSERT_EQ(errors.size(), 2u);
  EXPECT_EQ(errors[0], "c.xml:5:3: attribute 'pH' of <point> is 16, expected -1 to 15");
  EXPECT_EQ(errors[1], "c.xml:7:3: measured solubility must be > 0, got 0");
}

// A library: each element on its own; one that refers to a refused element is skipped without
// a second message (the first names the cause), an unknown reference is still an error.
TEST(XmlAllErrors, LibraryErrorsWithoutFollowOnErrors) {
  const std::vector<std::string> errors = library_errors(
      "<library>\n <system id='s'><pka value='30' type='acid'/></system>\n"
      " <reagent id='r' formula='Na'><gives system='s'/></reagent>\n"
      " <reagent id='q' formula='Qq'/>\n <buffer id='b' system='zz'/>\n"
      " <buffer id='c' system='s' acid-reagent='r'/>\n</library>\n");
  ASSERT_EQ(errors.size(), 3u);
  EXPECT_EQ(errors[0], "l.xml:2:17: attribute 'value' of <pka> is 30, expected -5 to 20");
  EXPECT_EQ(errors[1], "l.xml:4:2: formula \"Qq\": unknown element 'Qq' at character 3");
  EXPECT_EQ(errors[2], "l.xml:5:2: unknown system 'zz'");
}

}  // namespace
