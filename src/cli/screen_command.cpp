// `pkarta screen`: the weakest buffer holding a target pH once the dose is dissolved.
#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <iostream>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/base/error.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/base/format.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/analyses/uncertainty.h"
#include "pkarta/writers/screen_writer.h"
#include "pkarta/writers/tables.h"
#include "progress_bar.h"

#include <cmath>
#include <sstream>


namespace pkarta::cli {

namespace {

std::vector<std::string> split_list(const std::string& text) {
  std::vector<std::string> out;
  std::string cur;
  for (char c : text + ",") {
    if (c == ',') {
      if (!cur.empty()) out.push_back(cur);
      cur.clear();
    } else if (c != ' ') {
      cur += c;
    }
  }
  return out;
}

// Compound files: each --compound is a file or a folder (its *.xml files, by name).
std::vector<std::string> compound_paths(const std::vector<std::string>& given) {
  namespace fs = std::filesystem;
  std::vector<std::string> out;
  for (const std::string& g : given) {
    std::error_code ec;
    if (fs::is_directory(g, ec)) {
      std::vector<std::string> found;
      for (const fs::directory_entry& e : fs::directory_iterator(g, ec)) {
        if (e.is_regular_file() && e.path().extension() == ".xml") found.push_back(e.path().string());
      }
      if (ec) throw InputError(SourceLocation{"--compound", 0, 0}, "cannot read folder " + g);
      std::sort(found.begin(), found.end());
      if (found.empty()) {
        throw InputError(SourceLocation{"--compound", 0, 0}, "folder " + g + " holds no .xml compound file");
      }
      out.insert(out.end(), found.begin(), found.end());
    } else {
      out.push_back(g);
    }
  }
  return out;
}

}  // namespace

int run_screen(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::vector<std::string> compounds;
    std::string target_alias;
    std::string dose, form = "free", dose_as = "weighed", target, tolerance = "0.1", buffers = "all", route = "any",
                temp = "25", dose_range, threads = "0", uncertainty = "0", seed = "1",
                preparation = "premade", challenge = "1mM", min_capacity, storage = "5,40", max_drift, round, into;
    po::options_description desc("screen options");
    desc.add_options()
        ("compound", po::value(&compounds)->composing(),
         "compound XML file, or a folder of them; may repeat (batch)")
        ("dose", po::value(&dose), "dose as an amount of the form weighed, e.g. 5mg/mL or 10mM")
        ("form", po::value(&form)->default_value("free"), "form of the drug: free or a salt id")
      ("dose-as", po::value(&dose_as)->default_value("weighed"),
       "weighed: --dose is of the form weighed; free: of its free-form equivalent")
        ("target-ph", po::value(&target), "pH to hold, 0-14")
        ("ph", po::value(&target_alias), "the same as --target-ph")
        ("tolerance", po::value(&tolerance)->default_value("0.1"), "allowed pH drift after the dose, > 0")
        ("buffers", po::value(&buffers)->default_value("all"), "all, or buffer ids separated by commas")
        ("route", po::value(&route)->default_value("any"), "oral, parenteral, ophthalmic, topical or any")
        ("temp", po::value(&temp)->default_value("25"), "run temperature, °C")
        ("dose-range", po::value(&dose_range), "also report the worst pH for the dose +/- this (10% or 0.1)")
        ("preparation", po::value(&preparation)->default_value("premade"),
         "premade: buffer made at the target pH, dose dissolved in it; adjusted: buffer and dose "
         "dissolved, pH brought to the target with the buffer's titrant")
        ("challenge", po::value(&challenge)->default_value("1mM"),
         "strong acid and, separately, strong base added to the finished formulation must leave its "
         "pH within the tolerance; 0 turns this off")
        ("min-capacity", po::value(&min_capacity), "buffer capacity required, mol/L per pH (e.g. 0.01 or 10mM)")
        ("storage", po::value(&storage)->default_value("5,40"),
         "storage temperatures, °C: LOW,HIGH; the pH and any drug solid are computed at both, and buffers "
         "that hold the target there rank first")
        ("max-drift", po::value(&max_drift),
         "the pH at both storage temperatures must lie within this of the target (a criterion; without it "
         "the tolerance decides the ranking only)")
        ("round", po::value(&round), "round the recommended strength up to a multiple of this (e.g. 5mM); "
         "default: 1-2-5 series in mM from 1 mM")
        ("into", po::value(&into),
         "medium each ok formulation is diluted into, 1:1 to 1:100 (highest supersaturation reported), "
         "or none (default: plasma-7.4 for the parenteral route, none otherwise)")
        ("threads", po::value(&threads)->default_value("0"), "worker threads for a batch (0: all cores)")
        ("uncertainty", po::value(&uncertainty)->default_value("0"),
         "Monte Carlo samples over the pKa sd and S0 log-sd: 5/50/95 % bands of min conc (one compound)")
        ("seed", po::value(&seed)->default_value("1"), "seed of the Monte Carlo samples (reproducible)");
    ActivityOptions activity;
    add_activity_options(desc, activity);
    bool wide = false;
    desc.add_options()("wide", po::bool_switch(&wide), "text: every column of the screen (wider than 100 columns)");
    TableOptions tables;
    add_table_options(desc, tables);
    add_common_options(desc, common);
    add_output_option(desc, common);
    const po::variables_map vm = parse(args, desc);
    take_alias(vm, "target-ph", "ph", target_alias, target);
    if (common.help) {
      print_help(std::cout,
                 "pkarta screen --compound FILE --dose AMOUNT [--form free|SALT] --target-ph PH "
                 "[--tolerance 0.1] [--buffers all|ID,ID] [--route oral|parenteral|ophthalmic|any] "
                 "[--temp CELSIUS] [--dose-range 10%] [--preparation premade|adjusted] [--challenge 1mM] "
                 "[--min-capacity CAPACITY] [--storage 5,40] [--max-drift PH] [--round AMOUNT] [--into MEDIUM|none]",
                 desc);
      std::cout << "\n" << tables_help(screen_table_info());
      print_examples(std::cout, {"pkarta screen --compound compounds/demo-base.xml --dose 0.5mg/mL --form hydrochloride --target-ph 5 --route parenteral",
                                 "pkarta screen --compound my-compounds/ --dose 1mg/mL --target-ph 6.5 --format csv -o screen-tables"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, screen_table_info(), compounds);
    if (compounds.empty()) throw InputError(SourceLocation{"--compound", 0, 0}, "give a compound file (--compound F)");
    std::vector<std::string> protect = common.library_files;
    protect.insert(protect.end(), compounds.begin(), compounds.end());
    OutputTarget out(common.output, protect, common.format == "text");
    if (dose.empty()) throw InputError(SourceLocation{"--dose", 0, 0}, "give the dose (--dose AMOUNT, e.g. 5mg/mL)");
    if (target.empty()) throw InputError(SourceLocation{"--target-ph", 0, 0}, "give the pH to hold (--target-ph P)");

    ScreenOptions opt;
    opt.activity = activity_model_of(activity);
    opt.target_pH = option_number("--target-ph", target, 0.0, 14.0);
    opt.tolerance_pH = option_number("--tolerance", tolerance, -1e9, 1e9);
    if (!(opt.tolerance_pH > 0)) {
      throw InputError(SourceLocation{"--tolerance", 0, 0}, "tolerance " + tolerance + " must be > 0 (pH units)");
    }
    opt.temperature_C = option_temperature("--temp", temp);
    opt.route = route;
    if (route != "any" && route != "oral" && route != "parenteral" && route != "ophthalmic" && route != "topical") {
      throw InputError(SourceLocation{"--route", 0, 0},
                       "unknown route \"" + route + "\", expected oral, parenteral, ophthalmic, topical or any");
    }
    if (!dose_range.empty()) {
      try {
        opt.dose_range_fraction = parse_dose_range(dose_range);
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--dose-range", 0, 0}, e.message());
      }
    }
    if (preparation == "premade") opt.preparation = ScreenPreparation::kPremade;
    else if (preparation == "adjusted") opt.preparation = ScreenPreparation::kAdjusted;
    else throw InputError(SourceLocation{"--preparation", 0, 0}, "expected premade or adjusted, got \"" + preparation + "\"");
    // A strength in mol/L: a plain number is mol/L, or an amount in mM/M.
    auto strength = [](const char* option, const std::string& text) {
      try {
        const double v = parse_number(text, option);
        if (!(v >= 0)) throw InputError(SourceLocation{option, 0, 0}, "expected a value >= 0, got " + text);
        return v;
      } catch (const InputError&) {
      }
      const Amount a = option_amount(option, text);
      if (a.is_mass_based()) {
        throw InputError(SourceLocation{option, 0, 0}, "expected a concentration such as 1mM or 0.001, got " + text);
      }
      return a.to_mol_per_L(0.0, 25.0);
    };
    opt.challenge_mol_per_L = strength("--challenge", challenge);
    if (!(opt.challenge_mol_per_L < 10.0)) {
      throw InputError(SourceLocation{"--challenge", 0, 0}, "the challenge must be below 10 M");
    }
    if (!min_capacity.empty()) {
      opt.min_capacity_mol_per_L_per_pH = strength("--min-capacity", min_capacity);
      if (!(opt.min_capacity_mol_per_L_per_pH > 0)) {
        throw InputError(SourceLocation{"--min-capacity", 0, 0}, "the minimum capacity must be > 0");
      }
    }
    {
      const std::vector<std::string> ends = split_list(storage);
      if (ends.size() != 2) {
        throw InputError(SourceLocation{"--storage", 0, 0}, "expected two temperatures LOW,HIGH in °C, e.g. 5,40");
      }
      opt.low_temperature_C = option_temperature("--storage", ends[0]);
      opt.high_temperature_C = option_temperature("--storage", ends[1]);
      if (!(opt.low_temperature_C < opt.high_temperature_C)) {
        throw InputError(SourceLocation{"--storage", 0, 0}, "the first temperature must be the lower, e.g. 5,40");
      }
    }
    if (!max_drift.empty()) {
      opt.max_drift_pH = option_number("--max-drift", max_drift, -1e9, 1e9);
      if (!(*opt.max_drift_pH > 0)) throw InputError(SourceLocation{"--max-drift", 0, 0}, "the drift must be > 0 (pH units)");
    }
    if (!round.empty()) {
      opt.round_step_mol_per_L = strength("--round", round);
      if (!(opt.round_step_mol_per_L > 0)) throw InputError(SourceLocation{"--round", 0, 0}, "the step must be > 0");
    }
    const int samples = static_cast<int>(option_count("--uncertainty", uncertainty, 0, 1e6, "samples"));
    const long long seed_value = option_count("--seed", seed, 0, 9.007199254740992e15, "");  // 1.5 is no seed
    BatchOptions batch;
    batch.threads = static_cast<int>(option_count("--threads", threads, 0, 1024, "threads"));

    const Library lib = load_libraries(common);
    if (into.empty()) {
      if (route == "parenteral" && lib.media.count("plasma-7.4")) opt.dilution_medium = "plasma-7.4";
    } else if (into != "none") {
      check_medium_option(lib, "--into", into);
      opt.dilution_medium = into;
    }
    if (buffers != "all") {
      opt.buffers = split_list(buffers);
      if (opt.buffers.empty()) {
        throw InputError(SourceLocation{"--buffers", 0, 0}, "expected all or buffer ids separated by commas");
      }
      for (const std::string& id : opt.buffers) {
        try {
          lib.buffer(id);
        } catch (const InputError& e) {
          throw InputError(SourceLocation{"--buffers", 0, 0}, e.message());
        }
      }
    }
    if (screen_candidates(lib, opt).empty()) {
      throw InputError(SourceLocation{"--route", 0, 0},
                       "none of the selected buffers is listed for the " + route + " route");
    }
    const Amount dose_amount = option_amount("--dose", dose);
    if (!(dose_amount.value > 0)) throw InputError(SourceLocation{"--dose", 0, 0}, "the dose must be > 0");

    // Every input is read and checked before any work starts.
    std::vector<ScreenJob> jobs;
    const DoseBasis basis = option_dose_basis(dose_as);
    for (const std::string& path : compound_paths(compounds)) {
      ScreenJob job;
      job.compound = load_compound(path, lib);
      job.form = form;
      try {
        job.dose_mol_per_L = dose_conc_mol_per_L(lib, job.compound, form, dose_amount, opt.temperature_C, basis);
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--form", 0, 0}, path + ": " + e.message());
      }
      check_dose("--dose", job.compound, dose, job.dose_mol_per_L);
      jobs.push_back(std::move(job));
    }
    if (samples > 0 && jobs.size() != 1) {
      throw InputError(SourceLocation{"--uncertainty", 0, 0}, "bands are computed for one compound at a time");
    }

    const ProgressBar bar("screening");
    batch.progress = bar;
    std::vector<ScreenReport> reports = screen_batch(lib, jobs, opt, batch);
    bar.finish();
    for (ScreenReport& rep : reports) {
      rep.dose_text = dose;
      rep.dose_basis = dose_as;
      rep.library_files = common.library_files;
    }

    auto screen_json = [&reports](const ScreenBands* bands) {
      std::ostringstream doc;
      write_screen_json_document(reports, bands, doc);
      return doc.str();
    };
    if (samples == 0) {
      emit_tables(tables, common.format, screen_tables(reports, nullptr), compounds);
      if (common.format == "json") print_json(screen_json(nullptr));
      else if (common.format == "text") write_screen_text(reports, std::cout, wide);
      return out.done(0);
    }
    const ProgressBar band_bar("uncertainty");
    MonteCarloRun run;
    run.progress = band_bar;
    const ScreenBands bands =
        screen_bands(lib, jobs.front(), opt, samples, static_cast<std::uint64_t>(seed_value), run);
    band_bar.finish();
    emit_tables(tables, common.format, screen_tables(reports, &bands), compounds);
    if (common.format == "json") {
      print_json(screen_json(&bands));
    } else if (common.format == "text") {
      write_screen_text(reports, std::cout, wide);
      std::cout << "\n";
      write_screen_bands_text(bands, std::cout);
    }
    return out.done(0);
  });
}

}  // namespace pkarta::cli
