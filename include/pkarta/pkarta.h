// pkarta's public library in one header: the layers below the command line.
//   base      errors, formatting
//   chem      model, water, formula, units, reagents' ions, the equilibrium solver
//   io        compound and library files, atomic output files, digests
//   analyses  mix, profile, classify, screen, recipe, dilute, fit, uncertainty (compute only)
//   writers   text, CSV and JSON of each analysis
//   report    the HTML report and its charts
#ifndef PKARTA_PKARTA_H_
#define PKARTA_PKARTA_H_

#include "pkarta/base/error.h"
#include "pkarta/base/format.h"
#include "pkarta/base/limits.h"
#include "pkarta/base/suggest.h"
#include "pkarta/base/version.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/model.h"
#include "pkarta/chem/units.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/atomic_file.h"
#include "pkarta/io/compound_xml_edit.h"
#include "pkarta/io/solubility_csv.h"
#include "pkarta/io/sha256.h"
#include "pkarta/io/text_file.h"
#include "pkarta/io/xml_input.h"
#include "pkarta/analyses/classify.h"
#include "pkarta/analyses/dilute.h"
#include "pkarta/analyses/fit.h"
#include "pkarta/analyses/fit_statistics.h"
#include "pkarta/analyses/levenberg_marquardt.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/analyses/recipe.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/analyses/uncertainty.h"
#include "pkarta/writers/classify_writer.h"
#include "pkarta/writers/fit_writer.h"
#include "pkarta/writers/dilute_writer.h"
#include "pkarta/writers/mix_writer.h"
#include "pkarta/writers/profile_writer.h"
#include "pkarta/writers/recipe_writer.h"
#include "pkarta/writers/screen_writer.h"
#include "pkarta/writers/uncertainty_writer.h"
#include "pkarta/report/report.h"
#include "pkarta/report/svg_chart.h"

#endif  // PKARTA_PKARTA_H_
