// rigcal_detector_study: the run-length study of the drift detectors (see study.hpp), writing its
// report, summary table, CSV and figure into one directory.
#include <boost/program_options.hpp>
#include <cstdio>
#include <exception>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <string>

#include "report.hpp"
#include "study.hpp"

namespace {

namespace po = boost::program_options;

// Exit statuses as the rigcal tool's (tools/rigcal/command.hpp).
constexpr int exit_ok = 0, exit_usage = 64, exit_software = 70, exit_io = 74;

bool write_file(const std::filesystem::path& path, const std::string& text) {
  std::ofstream out(path, std::ios::binary);
  out << text;
  out.close();
  if (!out) {
    std::fprintf(stderr, "rigcal_detector_study: cannot write %s\n", path.c_str());
    return false;
  }
  return true;
}

}  // namespace

int main(int argc, char** argv) {
  rigcal::study::StudyOptions options;
  std::string output_dir, invoked_as;
  po::options_description desc(
      "usage: rigcal_detector_study --output-dir DIR [--quick]\n\n"
      "Simulates the drift detectors through the channel engine at equal in-control ARL0 and writes\n"
      "detector_study.md, summary_table.md, detector_study.csv and delays.svg into DIR.\n\noptions");
  desc.add_options()("help,h", "show this help")(
      "output-dir", po::value(&output_dir)->required(), "directory for the results (created if missing)")(
      "quick", po::bool_switch(&options.quick), "few replicates, two changes, three conditions (CI smoke run)")(
      "seed", po::value(&options.seed)->default_value(options.seed), "base seed of every simulated stream")(
      "invoked-as", po::value(&invoked_as), "the command that ran this program, for the report's header")(
      "quiet", "no progress lines on stderr");
  po::variables_map vm;
  try {
    po::store(po::parse_command_line(argc, argv, desc), vm);
    if (vm.count("help")) {
      std::cout << desc << "\n";
      return exit_ok;
    }
    po::notify(vm);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "rigcal_detector_study: %s\n", e.what());
    return exit_usage;
  }
  options.progress = !vm.count("quiet");
  try {
    const std::filesystem::path dir(output_dir);
    std::filesystem::create_directories(dir);
    const auto results = rigcal::study::run_study(options);
    const auto run = rigcal::study::describe_run(argc, argv, invoked_as);
    const bool written = write_file(dir / "detector_study.md", rigcal::study::markdown_report(results, run)) &&
                         write_file(dir / "summary_table.md", rigcal::study::summary_table(results)) &&
                         write_file(dir / "detector_study.csv", rigcal::study::csv_cells(results)) &&
                         write_file(dir / "delays.svg", rigcal::study::delay_figure_svg(results));
    return written ? exit_ok : exit_io;
  } catch (const std::filesystem::filesystem_error& e) {
    std::fprintf(stderr, "rigcal_detector_study: %s\n", e.what());
    return exit_io;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "rigcal_detector_study: %s\n", e.what());
    return exit_software;
  }
}
