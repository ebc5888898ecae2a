// porofit: fit crack-closure models to a study's plugs and write the report.
//
//   porofit fit STUDY.yaml --out DIR [--overwrite] [--threads N] [--quiet]
//   porofit check STUDY.yaml
//   porofit models [STUDY.yaml]
//   porofit minerals [STUDY.yaml]
//
// Exit status: 0 success; 2 bad input (study file, data, command line, output
// location); 3 internal error. A fit that does not converge is a result, not
// an error. Environment: POROFIT_FIXED_TIMESTAMP (ISO-8601 UTC,
// "YYYY-MM-DDThh:mm:ssZ") replaces the run's start time in every output, so
// that runs can be compared byte for byte.
#include <boost/program_options.hpp>
#include <glog/logging.h>

#include <unistd.h>

#include <cctype>
#include <cstdlib>
#include <optional>
#include <filesystem>
#include <iostream>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/io/study_loader.h"
#include "porofit/models/describe.h"
#include "porofit/models/registry.h"
#include "porofit/poro/minerals.h"
#include "porofit/report/report.h"
#include "porofit/report/stream.h"
#include "porofit/run/progress.h"
#include "porofit/run/run.h"
#include "porofit/version.h"

namespace po = boost::program_options;

namespace {

constexpr int kExitOk = 0;
constexpr int kExitInput = 2;
constexpr int kExitInternal = 3;

const char* kUsage =
    "usage: porofit <command> [options]\n"
    "\n"
    "commands:\n"
    "  fit STUDY.yaml --out DIR   fit every model to every sample and write the report folder\n"
    "  check STUDY.yaml           validate a study file without fitting\n"
    "  models [STUDY.yaml]        print the model catalogue (with a study: and its user models)\n"
    "  minerals [STUDY.yaml]      print the mineral table: moduli, sigmas, sources (with a study: and its minerals)\n"
    "\n"
    "options:\n"
    "  -h [ --help ]              show this help (or a command's: porofit fit --help)\n"
    "  --version                  print the version\n"
    "\n"
    "Results are decision support only; they must be reviewed by qualified engineers.\n";

// A usage problem the user can fix; message is printed after "porofit: error: ".
struct UsageError {
  std::string message;
};

std::string ShellQuote(const std::string& a) {
  if (!a.empty() && a.find_first_not_of("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_./=:+,@%") ==
                        std::string::npos) {
    return a;
  }
  std::string q = "'";
  for (char c : a) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

std::string CommandLine(int argc, char** argv) {
  std::string s;
  for (int i = 0; i < argc; ++i) {
    if (i) s += ' ';
    s += ShellQuote(argv[i]);
  }
  return s;
}

po::variables_map Parse(const std::vector<std::string>& args, const po::options_description& opts,
                        const po::positional_options_description& pos) {
  po::variables_map vm;
  po::store(po::command_line_parser(args).options(opts).positional(pos).run(), vm);
  po::notify(vm);
  return vm;
}

std::string FixedTimestamp() {
  const char* env = std::getenv("POROFIT_FIXED_TIMESTAMP");
  if (env == nullptr || *env == '\0') return {};
  // Shape "YYYY-MM-DDThh:mm:ssZ" (std::regex is avoided: GCC 12 warns inside it under sanitizers).
  const std::string t = env;
  const std::string shape = "dddd-dd-ddTdd:dd:ddZ";
  bool ok = t.size() == shape.size();
  for (size_t i = 0; ok && i < t.size(); ++i) {
    ok = shape[i] == 'd' ? std::isdigit(static_cast<unsigned char>(t[i])) != 0 : t[i] == shape[i];
  }
  if (!ok) {
    throw UsageError{"POROFIT_FIXED_TIMESTAMP = '" + std::string(env) +
                     "' is not an ISO-8601 UTC time like 2026-01-31T12:00:00Z"};
  }
  return env;
}

int CmdFit(const std::vector<std::string>& args, const std::string& command_line) {
  po::options_description opts("porofit fit STUDY.yaml --out DIR [options]");
  std::string study_path, out_dir;
  int threads = 1;
  int summary_limit = 100;
  opts.add_options()
      ("help,h", "show this help")
      ("out,o", po::value<std::string>(&out_dir)->required(), "output folder to create (must not exist)")
      ("overwrite", "replace the output folder if it exists (atomically)")
      ("threads,j", po::value<int>(&threads)->default_value(1), "worker threads over samples (>= 1); output does not depend on it")
      ("summary-limit", po::value<int>(&summary_limit)->default_value(100),
       "samples shown one by one in the summary; beyond, counts per model (full results are in the files)")
      ("quiet,q", "print no summary and no progress, only errors");
  po::options_description hidden;
  hidden.add_options()("study", po::value<std::string>(&study_path)->required(), "study file");
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("study", 1);

  // --help must work without the required arguments.
  for (const std::string& a : args) {
    if (a == "--help" || a == "-h") {
      std::cout << opts << "\nWrites summary.txt, parameters.csv, fits.csv, residuals.csv, alpha.csv, grain_modulus.csv,\n"
                              "alpha_vti.csv, results.json, branch_tests.csv and hysteresis.csv "
                              "(see docs/outputs.md). Nothing is written when loading fails.\n";
      return kExitOk;
    }
  }
  const po::variables_map vm = Parse(args, all, pos);
  if (threads < 1) throw UsageError{"--threads = " + std::to_string(threads) + " must be at least 1"};
  if (summary_limit < 0) throw UsageError{"--summary-limit = " + std::to_string(summary_limit) + " must be >= 0"};
  const bool overwrite = vm.count("overwrite") > 0;
  const bool quiet = vm.count("quiet") > 0;
  const std::string timestamp = FixedTimestamp();

  // Fail before fitting if the folder is in the way (checked again when writing).
  std::error_code ec;
  if (!overwrite && std::filesystem::exists(std::filesystem::symlink_status(out_dir, ec))) {
    throw porofit::OutputError("output folder '" + out_dir + "' already exists; pass --overwrite to replace it");
  }

  const porofit::Study study = porofit::LoadStudy(study_path);
  porofit::RunOptions ro;
  ro.threads = threads;
  ro.command_line = command_line;
  ro.timestamp_utc = timestamp;

  // Samples are written to the output folder as they finish (bounded memory);
  // progress on stderr: a bar on a terminal, occasional lines otherwise.
  porofit::AtomicFolderOptions fo;
  fo.overwrite = overwrite;
  porofit::StreamReportOptions so;
  so.summary_sample_limit = static_cast<size_t>(summary_limit);
  porofit::StreamOptions stream;
  std::optional<porofit::ProgressMeter> meter;
  if (!quiet) {
    meter.emplace(std::cerr, ::isatty(STDERR_FILENO) != 0, study.samples.size());
    stream.progress = [&](size_t done, size_t) { meter->Update(done); };
    stream.sample_progress = [&](size_t i, std::string_view stage, size_t done, size_t total) {
      meter->Inner(i, study.samples[i].sample.id + ": " + std::string(stage), done, total);
    };
  }
  const porofit::StreamReportResult result = porofit::RunAndWriteReportFolder(study, ro, out_dir, fo, so, stream);
  if (meter) meter->Finish();

  if (!quiet) {
    std::cout << result.summary;
    std::cout << "\nwrote";
    const auto names = porofit::ReportFileNames(study);
    for (size_t i = 0; i < names.size(); ++i) std::cout << (i ? ", " : " ") << names[i];
    std::cout << " to " << out_dir << "\n";
  }
  return kExitOk;
}

int CmdCheck(const std::vector<std::string>& args) {
  po::options_description opts("porofit check STUDY.yaml");
  std::string study_path;
  opts.add_options()("help,h", "show this help");
  po::options_description hidden;
  hidden.add_options()("study", po::value<std::string>(&study_path)->required(), "study file");
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("study", 1);
  for (const std::string& a : args) {
    if (a == "--help" || a == "-h") {
      std::cout << opts << "\nLoads and validates the study and its data files; fits nothing, writes nothing.\n";
      return kExitOk;
    }
  }
  Parse(args, all, pos);
  const porofit::Study study = porofit::LoadStudy(study_path);
  size_t n_fits = 0, n_points = 0;
  for (const porofit::StudySample& s : study.samples) {
    n_fits += s.models.size();
    n_points += s.sample.points.size();
  }
  std::cout << study_path << ": ok - study \"" << study.name << "\", " << study.samples.size() << " samples, "
            << n_points << " data points, " << n_fits << " fits requested, " << study.inputs.size()
            << " input files\n";
  for (const porofit::StudySample& s : study.samples) {
    std::cout << "  " << s.sample.id << ": " << porofit::ToString(s.sample.kind) << ", "
              << porofit::ToString(s.sample.branch) << ", cycle " << s.sample.cycle << ", "
              << s.sample.points.size() << " points; models:";
    for (const porofit::ModelChoice& m : s.models) std::cout << " " << m.model_id;
    std::cout << "\n";
  }
  for (const porofit::ModelSpec& m : study.user_models) std::cout << "  user model " << m.id << ": " << m.formula << "\n";
  for (const std::string& w : study.warnings) std::cout << w << "\n";
  const std::string invented = porofit::InventedNotice(study);
  if (!invented.empty()) std::cout << invented << "\n";
  return kExitOk;
}

int CmdModels(const std::vector<std::string>& args) {
  po::options_description opts("porofit models [STUDY.yaml]");
  std::string study_path;
  opts.add_options()("help,h", "show this help");
  po::options_description hidden;
  hidden.add_options()("study", po::value<std::string>(&study_path), "study file");
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("study", 1);
  const po::variables_map vm = Parse(args, all, pos);
  if (vm.count("help")) {
    std::cout << opts << "\nPrints every model: formula, parameters with units and bounds, reference.\n"
                         "With a study file, its user models are listed after the built-in ones.\n";
    return kExitOk;
  }
  if (study_path.empty()) {
    std::cout << porofit::DescribeCatalogue(porofit::ModelRegistry::Builtin());
  } else {
    std::cout << porofit::DescribeCatalogue(porofit::StudyRegistry(porofit::LoadStudy(study_path)));
  }
  return kExitOk;
}

int CmdMinerals(const std::vector<std::string>& args) {
  po::options_description opts("porofit minerals [STUDY.yaml]");
  std::string study_path;
  opts.add_options()("help,h", "show this help");
  po::options_description hidden;
  hidden.add_options()("study", po::value<std::string>(&study_path), "study file");
  po::options_description all;
  all.add(opts).add(hidden);
  po::positional_options_description pos;
  pos.add("study", 1);
  const po::variables_map vm = Parse(args, all, pos);
  if (vm.count("help")) {
    std::cout << opts << "\nPrints the built-in mineral table (K, mu, density, sigmas, source, how each was checked).\n"
                         "With a study file, the study's 'minerals:' entries are merged in and marked.\n";
    return kExitOk;
  }
  namespace poro = porofit::poro;
  if (study_path.empty()) {
    std::cout << poro::DescribeMineralTable(poro::MineralTable::Builtin());
    return kExitOk;
  }
  poro::MineralTable table = poro::MineralTable::Builtin();
  std::vector<std::string> ours;
  for (const poro::Mineral& m : porofit::LoadStudy(study_path).mineral_overrides) {
    table.Set(m);
    ours.push_back(m.name);
  }
  std::cout << poro::DescribeMineralTable(table, ours);
  return kExitOk;
}

}  // namespace

int main(int argc, char** argv) {
  // Ceres logs through glog (e.g. a rank-deficient covariance at ERROR level).
  // porofit reports those conditions itself as fit flags, so the solver's own
  // log stays quiet and never writes log files.
  FLAGS_logtostderr = true;
  FLAGS_minloglevel = google::GLOG_FATAL;
  google::InitGoogleLogging(argv[0]);
  try {
    if (argc < 2) {
      std::cerr << kUsage;
      return kExitInput;
    }
    const std::string cmd = argv[1];
    if (cmd == "--help" || cmd == "-h" || cmd == "help") {
      std::cout << kUsage;
      return kExitOk;
    }
    if (cmd == "--version") {
      std::cout << "porofit " << porofit::kVersion << "\n";
      return kExitOk;
    }
    const std::vector<std::string> rest(argv + 2, argv + argc);
    if (cmd == "fit") return CmdFit(rest, CommandLine(argc, argv));
    if (cmd == "check") return CmdCheck(rest);
    if (cmd == "models") return CmdModels(rest);
    if (cmd == "minerals") return CmdMinerals(rest);
    const std::vector<std::string> commands = {"fit", "check", "models", "minerals"};
    std::string hint = porofit::NearestWord(cmd, commands);
    if (cmd.rfind("-", 0) == 0) {
      throw UsageError{"unknown option '" + cmd + "' (expected a command: fit, check, models or minerals)"};
    }
    throw UsageError{"unknown command '" + cmd + "'" + (hint.empty() ? "" : " (did you mean '" + hint + "'?)") +
                     "; commands: fit, check, models, minerals"};
  } catch (const UsageError& e) {
    std::cerr << "porofit: error: " << e.message << "\n";
    return kExitInput;
  } catch (const po::error& e) {
    std::cerr << "porofit: error: " << e.what() << " (see porofit " << (argc > 1 ? argv[1] : "") << " --help)\n";
    return kExitInput;
  } catch (const porofit::InputError& e) {
    std::cerr << e.what() << "\n";
    return kExitInput;
  } catch (const porofit::OutputError& e) {
    std::cerr << "porofit: error: " << e.what() << "\n";
    return kExitInput;
  } catch (const std::exception& e) {
    std::cerr << "porofit: internal error: " << e.what() << "\n";
    return kExitInternal;
  } catch (...) {
    std::cerr << "porofit: internal error: unknown exception\n";
    return kExitInternal;
  }
}
