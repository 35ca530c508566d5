// `pkarta report`: the HTML preformulation report with its CSV tables.
#include <iostream>
#include <system_error>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/report/report.h"
#include "report_cli.h"

namespace pkarta::cli {

int run_report(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    ReportOptions r;
    po::options_description desc("report options");
    add_report_options(desc, r);
    add_common_options(desc, common);
    const po::variables_map vm = parse(args, desc);
    take_alias(vm, "target-ph", "ph", r.target_ph_alias, r.target_ph);
    if (common.help) {
      print_help(std::cout,
                 "pkarta report --compound FILE [--dose AMOUNT [--form free|SALT]] [--target-ph PH] [--route ROUTE] "
                 "[--temp CELSIUS] -o reports/NAME.html",
                 desc);
      std::cout << "\n" << tables_help({{"files", "one row per file written (--format csv; json lists them)"}});
      print_examples(std::cout, {"pkarta report --compound compounds/demo-base.xml --dose 2mg/mL --form hydrochloride --target-ph 5 -o reports/base-5.html",
                                 "pkarta report --compound compounds/demo-acid.xml --dose-mg 200 -o reports/acid.html --format json"});
      return 0;
    }
    check_format(common.format);
    if (r.compound_file.empty()) throw InputError(SourceLocation{"--compound", 0, 0}, "the report needs --compound FILE");
    if (r.output.empty()) throw InputError(SourceLocation{"--output", 0, 0}, "give the HTML file to write with -o FILE");
    const Library lib = load_libraries(common);
    std::vector<std::string> written;
    try {
      written = make_report(r, common, lib, "pkarta report" + report_arguments(r));
    } catch (const std::system_error& e) {
      error(e.what());
      return static_cast<int>(kExitRefused);
    }
    if (common.format == "json") {
      print_json(nlohmann::ordered_json{{"reports", nlohmann::ordered_json::array({report_files_json(r.compound_file, written)})}});
    } else if (common.format == "csv") {
      write_table_csv(report_files_table({{r.compound_file, written}}), std::cout);
    } else {
      // A status message: standard error, as every "wrote" of pkarta.
      std::cerr << "pkarta: wrote " << written.back() << " and " << written.size() - 1 << " CSV tables\n";
    }
    return 0;
  });
}

}  // namespace pkarta::cli
