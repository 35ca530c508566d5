// Text, CSV and JSON of a buffer recipe (`pkarta recipe`) and of a formulation (the recipe
// with the drug, `pkarta recipe --compound`).
#ifndef PKARTA_WRITERS_RECIPE_WRITER_H_
#define PKARTA_WRITERS_RECIPE_WRITER_H_

#include <ostream>

#include "pkarta/analyses/recipe.h"
#include "pkarta/analyses/recipe_formulation.h"

namespace pkarta {

/// Writers: text (with a bench procedure), CSV, JSON (keys in docs/commands.md).
void write_recipe_text(const Recipe& recipe, std::ostream& out);
void write_recipe_csv(const Recipe& recipe, std::ostream& out);
void write_recipe_json(const Recipe& recipe, std::ostream& out);

/// Writers: the recipe's own text/JSON/CSV plus the drug, the order of addition and the
/// formulation's computed values (JSON adds "drug" and keeps "titrant").
void write_formulation_text(const Formulation& f, std::ostream& out);
void write_formulation_csv(const Formulation& f, std::ostream& out);
void write_formulation_json(const Formulation& f, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_RECIPE_WRITER_H_
