// porofit: fit crack-closure models to a study's plugs and write the report.
//
//   porofit fit STUDY.yaml --out DIR [--overwrite] [--threads N] [--quiet]
//   porofit check STUDY.yaml
//   porofit models [STUDY.yaml]
//   porofit minerals [STUDY.yaml]
//
// Exit status (kExitStatusHelp below, printed by --help):
//   0  the run completed and at least one fit converged (is usable);
//   1  the run completed, its report folder is written, but no fit converged;
//   2  bad input (study file, data, command line) or a refused output location
//      (an existing folder, one porofit did not write, or one that would harm
//      an input: porofit/report/output_folder.h); nothing written;
//   3  internal error; nothing written.
// A fit that does not converge is a result, reported in every output, not an
// error. Environment: POROFIT_FIXED_TIMESTAMP (ISO-8601 UTC,
// "YYYY-MM-DDThh:mm:ssZ") replaces the run's start time in every output, so
// that runs can be compared byte for byte. POROFIT_TEST_FAIL_STEP is a test
// hook: naming a step of the output-folder write ("stage", "sync", "exchange",
// "rename-in", ...; AtomicFolderOptions::before_step) makes that step fail
// with an internal error, so tests can check exit status 3 and that a failed
// run leaves nothing behind.
#include <boost/program_options.hpp>
#include <glog/logging.h>

#include <unistd.h>

#include <cctype>
#include <cstdlib>
#include <optional>
#include <filesystem>
#include <functional>
#include <iostream>
#include <stdexcept>
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
constexpr int kExitNoUsableFit = 1;
constexpr int kExitInput = 2;
constexpr int kExitInternal = 3;

const char* kExitStatusHelp =
    "exit status:\n"
    "  0  the run completed and at least one fit converged\n"
    "  1  the run completed and wrote its report, but no fit converged\n"
    "  2  bad input (study file, data, command line) or a refused output folder; nothing written\n"
    "  3  internal error; nothing written\n";

const std::string kUsage = std::string(
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
    "\n") + kExitStatusHelp + "\n"
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

// POROFIT_TEST_FAIL_STEP (test hook, see the header comment): a step of the
// output-folder write that throws an internal error.
std::function<void(std::string_view)> FailStepHook() {
  const char* env = std::getenv("POROFIT_TEST_FAIL_STEP");
  if (env == nullptr || *env == '\0') return {};
  const std::string step = env;
  return [step](std::string_view s) {
    if (s == step) throw std::logic_error("test hook POROFIT_TEST_FAIL_STEP: simulated failure at step '" + step + "'");
  };
}

void PrintFitHelp(const po::options_description& opts) {
  std::cout << opts << "\nWrites summary.txt, parameters.csv, fits.csv, residuals.csv, alpha.csv, grain_modulus.csv,\n"
                          "alpha_vti.csv, results.json, branch_tests.csv, hysteresis.csv, report.html and more\n"
                          "(see docs/outputs.md). Nothing is written when loading fails.\n"
                          "\n"
                          "DIR must be a new folder, or with --overwrite one that porofit wrote (it holds\n"
                          "a .porofit-output file). Refused: the current folder or its ancestors, a folder\n"
                          "holding an input, and any folder inside one that holds a data file (the study\n"
                          "file's own folder is allowed). Inputs are only read.\n"
                          "\n"
                       << kExitStatusHelp;
}

// Prints the summary and what was written; the exit status of a completed run.
int FinishFit(const porofit::Study& study, const porofit::StreamReportResult& result, const std::string& out_dir,
              bool quiet) {
  if (!quiet) {
    std::cout << result.summary;
    std::cout << "\nwrote";
    const auto names = porofit::ReportFileNames(study);
    for (size_t i = 0; i < names.size(); ++i) std::cout << (i ? ", " : " ") << names[i];
    std::cout << " to " << out_dir << "\n";
  }
  if (result.converged_fits == 0) {
    std::cerr << "porofit: no usable fit: none of the " << result.fits << " fits converged (see " << out_dir
              << "/summary.txt); exit status " << kExitNoUsableFit << "\n";
    return kExitNoUsableFit;
  }
  return kExitOk;
}

int CmdFit(const std::vector<std::string>& args, const std::string& command_line) {
  po::options_description opts("porofit fit STUDY.yaml --out DIR [options]");
  std::string study_path, out_dir;
  int threads = 1;
  int summary_limit = 100;
  opts.add_options()
      ("help,h", "show this help")
      ("out,o", po::value<std::string>(&out_dir)->required(), "output folder: a new one, or with --overwrite one porofit wrote")
      ("overwrite", "replace the output folder if it exists and porofit wrote it (atomically)")
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
      PrintFitHelp(opts);
      return kExitOk;
    }
  }
  const po::variables_map vm = Parse(args, all, pos);
  if (threads < 1) throw UsageError{"--threads = " + std::to_string(threads) + " must be at least 1"};
  if (threads > porofit::kMaxRunThreads)
    throw UsageError{"--threads = " + std::to_string(threads) + " exceeds the limit of " +
                     std::to_string(porofit::kMaxRunThreads)};
  if (summary_limit < 0) throw UsageError{"--summary-limit = " + std::to_string(summary_limit) + " must be >= 0"};
  const bool overwrite = vm.count("overwrite") > 0;
  const bool quiet = vm.count("quiet") > 0;
  const std::string timestamp = FixedTimestamp();

  const porofit::Study study = porofit::LoadStudy(study_path);
  porofit::RunOptions ro;
  ro.threads = threads;
  ro.command_line = command_line;
  ro.timestamp_utc = timestamp;

  // Samples are written to the output folder as they finish (bounded memory);
  // progress on stderr: a bar on a terminal, occasional lines otherwise.
  porofit::AtomicFolderOptions fo;
  fo.overwrite = overwrite;
  fo.before_step = FailStepHook();
  // Fail before fitting if the folder is in the way or would harm an input
  // (checked again when writing).
  porofit::PrepareOutputFolder(out_dir, porofit::StudyFolderOptions(study, {}, fo));
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
  return FinishFit(study, result, out_dir, quiet);
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
      std::cout << opts << "\nLoads and validates the study and its data files; fits nothing, writes nothing.\n"
                           "Lists the samples, user models and depth tables on stdout; warnings go to stderr.\n";
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
  for (const porofit::DepthTableChoice& t : study.depth_tables) {
    std::cout << "  depth table " << t.spec.name << ": " << t.spec.curves.size() << " fitted curve"
              << (t.spec.curves.size() == 1 ? "" : "s") << ", written as " << porofit::DepthTableFileName(t) << "\n";
  }
  // Warnings go to stderr, so that stdout stays the plain validation record.
  for (const std::string& w : study.warnings) std::cerr << w << "\n";
  for (const porofit::DepthTableChoice& t : study.depth_tables) {
    for (const std::string& w : t.spec.warnings) std::cerr << w << "\n";
  }
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
