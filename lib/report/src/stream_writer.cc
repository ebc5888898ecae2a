// The report folder written while the study runs (porofit/report/stream.h).
#include <cmath>
#include <cstdio>
#include <fstream>
#include <map>
#include <memory>
#include <mutex>
#include <sstream>

#include "format.h"
#include "porofit/report/html.h"
#include "porofit/report/stream.h"

namespace porofit {
namespace {

namespace fs = std::filesystem;

// One report file in the staging folder, appended to sample by sample.
class Appender {
 public:
  explicit Appender(const fs::path& path) : path_(path), buffer_(1 << 16) {
    out_.rdbuf()->pubsetbuf(buffer_.data(), static_cast<std::streamsize>(buffer_.size()));
    out_.open(path, std::ios::binary | std::ios::trunc);
    if (!out_) throw OutputError("cannot create '" + path.string() + "'");
  }
  std::ostream& out() { return out_; }
  void Close() {
    out_.flush();
    out_.close();
    if (out_.fail()) throw OutputError("cannot write '" + path_.string() + "' (disk full?)");
  }

 private:
  fs::path path_;
  std::vector<char> buffer_;
  std::ofstream out_;
};

// Per-model counts for the summary of a large batch.
struct ModelTally {
  size_t fits = 0, converged = 0, flagged = 0, lowest_aicc = 0;
};

std::string Pad(const std::string& s, size_t w) { return s.size() >= w ? s : s + std::string(w - s.size(), ' '); }
std::string PadLeft(const std::string& s, size_t w) { return s.size() >= w ? s : std::string(w - s.size(), ' ') + s; }

class StreamWriter {
 public:
  StreamWriter(const fs::path& staging, const Study& study, const RunMetadata& meta,
               const std::vector<InputDigest>& inputs, const StreamReportOptions& options,
               std::shared_ptr<const ModelRegistry> registry)
      : staging_(staging), study_(study), meta_(meta), options_(options), inputs_(inputs),
        registry_(std::move(registry)),
        accumulator_(study.comparison.group_by, study.comparison.criterion),
        parameters_(staging / "parameters.csv"), fits_(staging / "fits.csv"), residuals_(staging / "residuals.csv"),
        alpha_(staging / "alpha.csv"), grain_(staging / "grain_modulus.csv"), vti_(staging / "alpha_vti.csv"),
        moduli_(staging / "moduli.csv"), strain_residuals_(staging / "strain_residuals.csv"),
        comparison_(staging / "comparison.csv"), nested_(staging / "nested_tests.csv"),
        json_(staging / "results.json"), html_(study, meta, inputs_, *registry_), html_file_(staging / "report.html") {
    options_.report.registry = registry_.get();
    WriteParametersCsvHeader(study, meta, parameters_.out());
    WriteFitsCsvHeader(study, meta, fits_.out());
    WriteResidualsCsvHeader(study, meta, residuals_.out());
    WriteAlphaCsvHeader(study, meta, alpha_.out());
    WriteGrainModulusCsvHeader(study, meta, grain_.out());
    WriteVtiAlphaCsvHeader(study, meta, vti_.out());
    WriteModuliCsvHeader(study, meta, moduli_.out());
    WriteStrainResidualsCsvHeader(study, meta, strain_residuals_.out());
    WriteComparisonCsvHeader(study, meta, comparison_.out());
    WriteNestedTestsCsvHeader(study, meta, nested_.out());
    for (const StudySample& ss : study.samples)
      if (!ss.grain.group.empty()) groups_[ss.grain.group].push_back(ss.sample.id);

    // results.json: everything before the samples is known now; the samples
    // go where the placeholder is, in the layout nlohmann's dump(2) gives
    // them; the across-sample sections after them are written by Finish().
    json_.out() << JsonAround(StudyRun{}).first;
    // report.html: head now, each sample's section as it is written, the
    // across-sample tables at the end; figure files as their sample is written.
    html_file_.out() << html_.Head();
    WriteHtmlFigureFiles(staging, {});
  }

  // Formats sample i's rows of every file. Thread-safe (reads only the
  // study and the sample's results), so the workers call it in parallel
  // through StreamOptions::prepare.
  void Render(size_t i, const SampleRun& sr) {
    Rendered r = RenderNow(i, sr);
    std::lock_guard<std::mutex> lock(mu_);
    rendered_[i] = std::move(r);
  }

  void Add(size_t i, const SampleRun& sr) {
    Rendered r;
    {
      std::unique_lock<std::mutex> lock(mu_);
      auto it = rendered_.find(i);
      if (it != rendered_.end()) {
        r = std::move(it->second);
        rendered_.erase(it);
      } else {
        lock.unlock();
        r = RenderNow(i, sr);
      }
    }
    parameters_.out() << r.parameters;
    fits_.out() << r.fits;
    residuals_.out() << r.residuals;
    alpha_.out() << r.alpha;
    grain_.out() << r.grain;
    vti_.out() << r.vti;
    moduli_.out() << r.moduli;
    strain_residuals_.out() << r.strain_residuals;
    comparison_.out() << r.comparison;
    nested_.out() << r.nested;
    json_.out() << (i == 0 ? "[\n" : ",\n") << r.json;
    html_file_.out() << r.html.html;
    WriteHtmlFigureFiles(staging_, r.html.figures);
    html_overview_ += r.html.overview_row;
    ++written_;
    const StudySample& ss = study_.samples[i];

    counts_.Add(ss, sr);
    if (i < options_.summary_sample_limit) {
      std::ostringstream s;
      WriteSummarySample(ss, sr, s);
      blocks_ += s.str();
    }
    Tally(ss, sr);
    accumulator_.Add(i, SampleFieldValues(ss.sample), sr.comparison);
    // Branch tests need the fits of every sample of a plug, depth tables those
    // of the samples they name; nothing else is kept.
    if (!ss.sample.plug.empty() || UsedByDepthTables(study_, i)) kept_fits_.emplace(i, sr.fits);
  }

  const SummaryCounts& counts() const { return counts_; }

  std::string Finish() {
    // The across-sample results, exactly as RunStudy() computes them: the
    // comparison summary from the accumulator, the branch tests from the kept
    // fits of plug samples, the joint fits (independent of the per-sample fits).
    StudyRun across;
    across.study = study_;
    across.metadata = meta_;
    across.registry = registry_;
    across.samples.resize(study_.samples.size());
    for (auto& [i, fits] : kept_fits_) across.samples[i].fits = std::move(fits);
    kept_fits_.clear();
    across.comparison_summary = accumulator_.Finish();
    across.branches = RunBranches(study_, across.samples, *registry_);
    for (const JointFitChoice& j : study_.joint_fits) across.joint_fits.push_back(RunJoint(study_, j, *registry_));
    for (const DepthTableChoice& t : study_.depth_tables)
      across.depth_tables.push_back(RunDepthTable(study_, t, across.samples, *registry_));
    auto whole = [&](const std::string& name, auto&& writer) {
      std::ostringstream o;
      writer(o);
      WriteFileDurably(staging_ / name, o.str());
    };
    whole("comparison_groups.csv", [&](std::ostream& o) { WriteComparisonGroupsCsv(across, o); });
    whole("branch_tests.csv", [&](std::ostream& o) { WriteBranchTestsCsv(across, o); });
    whole("hysteresis.csv", [&](std::ostream& o) { WriteHysteresisCsv(across, o); });
    whole("joint_fits.csv", [&](std::ostream& o) { WriteJointFitsCsv(across, o); });
    whole("joint_tests.csv", [&](std::ostream& o) { WriteJointTestsCsv(across, o); });
    whole("joint_alpha.csv", [&](std::ostream& o) { WriteJointAlphaCsv(across, o); });
    for (size_t t = 0; t < across.depth_tables.size(); ++t)
      whole(DepthTableFileName(study_.depth_tables[t]), [&](std::ostream& o) { WriteDepthTableCsv(across, t, o); });

    json_.out() << (written_ == 0 ? "[]" : "\n  ]") << JsonAround(across).second;
    std::vector<HtmlFigure> depth_figures;
    html_file_.out() << html_.Tail(across, html_overview_, &depth_figures);
    WriteHtmlFigureFiles(staging_, depth_figures);
    for (Appender* a : {&parameters_, &fits_, &residuals_, &alpha_, &grain_, &vti_, &moduli_, &strain_residuals_,
                        &comparison_, &nested_, &json_, &html_file_})
      a->Close();
    std::ostringstream s;
    WriteSummaryHead(study_, meta_, counts_, s);
    s << blocks_;
    if (study_.samples.size() > options_.summary_sample_limit) AggregateBlock(s);
    WriteSummaryAcross(across, s);
    WriteSummaryFoot(study_, s);
    WriteFileDurably(staging_ / "summary.txt", s.str());
    return s.str();
  }

 private:
  struct Rendered {
    std::string parameters, fits, residuals, alpha, grain, vti, moduli, strain_residuals, comparison, nested, json;
    HtmlSection html;
  };

  // results.json's text before and after the "samples" array, for the
  // across-sample results `across` (the part before does not depend on it).
  std::pair<std::string, std::string> JsonAround(const StudyRun& across) const {
    nlohmann::ordered_json j = ResultsJsonHead(study_, meta_, inputs_);
    const std::string placeholder = "porofit-samples-placeholder-7f3a";
    j["samples"] = placeholder;
    AddResultsJsonTail(across, j);
    const std::string text = Dump(j) + "\n";
    const std::string marker = "\n  \"samples\": \"" + placeholder + "\"";
    const size_t at = text.find(marker);
    POROFIT_CHECK(at != std::string::npos, "results.json placeholder not found");
    return {text.substr(0, at + marker.size() - placeholder.size() - 2), text.substr(at + marker.size())};
  }

  Rendered RenderNow(size_t i, const SampleRun& sr) const {
    const StudySample& ss = study_.samples[i];
    Rendered r;
    auto text = [&](auto&& write) {
      std::ostringstream s;
      write(s);
      return s.str();
    };
    r.parameters = text([&](std::ostream& o) { WriteParametersCsvRows(ss, sr, o); });
    r.fits = text([&](std::ostream& o) { WriteFitsCsvRows(ss, sr, o); });
    r.residuals = text([&](std::ostream& o) { WriteResidualsCsvRows(ss, sr, o); });
    r.alpha = text([&](std::ostream& o) { WriteAlphaCsvRows(ss, sr, o); });
    const std::vector<std::string> shared = SharedWith(ss);
    r.grain = text([&](std::ostream& o) { WriteGrainModulusCsvRow(ss, shared, o); });
    r.vti = text([&](std::ostream& o) { WriteVtiAlphaCsvRows(ss, sr, o); });
    r.moduli = text([&](std::ostream& o) { WriteModuliCsvRows(ss, sr, o); });
    r.strain_residuals = text([&](std::ostream& o) { WriteStrainResidualsCsvRows(ss, sr, o); });
    r.comparison = text([&](std::ostream& o) { WriteComparisonCsvRows(study_, ss, sr, o); });
    r.nested = text([&](std::ostream& o) { WriteNestedTestsCsvRows(ss, sr, o); });
    r.html = html_.Section(i, sr);
    const std::string block = Dump(SampleResultsJson(ss, &sr, shared, options_.report));
    r.json.reserve(block.size() + block.size() / 8 + 4);
    r.json = "    ";
    for (char c : block) {
      r.json += c;
      if (c == '\n') r.json += "    ";
    }
    return r;
  }

  static std::string Dump(const nlohmann::ordered_json& j) {
    return j.dump(2, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
  }

  std::vector<std::string> SharedWith(const StudySample& ss) const {
    std::vector<std::string> out;
    if (ss.grain.group.empty()) return out;
    for (const std::string& id : groups_.at(ss.grain.group))
      if (id != ss.sample.id) out.push_back(id);
    return out;
  }

  void Tally(const StudySample& ss, const SampleRun& sr) {
    const FitResult* best = nullptr;
    for (const FitResult& r : sr.fits) {
      auto it = tally_index_.find(r.model_id);
      if (it == tally_index_.end()) {
        it = tally_index_.emplace(r.model_id, tally_.size()).first;
        tally_.emplace_back(r.model_id, ModelTally{});
      }
      ModelTally& t = tally_[it->second].second;
      ++t.fits;
      t.converged += r.status == FitStatus::kConverged ? 1 : 0;
      t.flagged += detail::FitFlags(r, ss.options).empty() ? 0 : 1;
      if (r.status == FitStatus::kConverged && std::isfinite(r.aicc) && (best == nullptr || r.aicc < best->aicc))
        best = &r;
      if (r.status != FitStatus::kConverged && failed_.size() < 10)
        failed_.push_back(ss.sample.id + " (" + r.model_id + ": " + std::string(ToString(r.status)) + ")");
      if (r.status != FitStatus::kConverged) ++n_failed_;
    }
    if (best != nullptr) ++tally_[tally_index_.at(best->model_id)].second.lowest_aicc;
  }

  void AggregateBlock(std::ostream& out) const {
    const size_t shown = options_.summary_sample_limit, n = study_.samples.size();
    out << "\n" << (n - shown) << " more samples are not shown one by one (summary limit " << shown
        << "); every sample's results are in fits.csv, parameters.csv, residuals.csv and results.json.\n";
    out << "\nAll " << n << " samples, per model:\n";
    out << "  " << Pad("model", 15) << PadLeft("fits", 8) << PadLeft("converged", 11) << PadLeft("flagged", 9)
        << PadLeft("lowest AICc", 13) << "\n";
    for (const auto& [model, t] : tally_)
      out << "  " << Pad(model, 15) << PadLeft(std::to_string(t.fits), 8) << PadLeft(std::to_string(t.converged), 11)
          << PadLeft(std::to_string(t.flagged), 9) << PadLeft(std::to_string(t.lowest_aicc), 13) << "\n";
    if (n_failed_ > 0) {
      out << "  " << n_failed_ << " fits did not converge; first: " << detail::Join(failed_, ", ")
          << (n_failed_ > failed_.size() ? ", ..." : "") << "\n";
    }
  }

  fs::path staging_;
  const Study& study_;
  const RunMetadata& meta_;
  StreamReportOptions options_;
  std::vector<InputDigest> inputs_;
  std::shared_ptr<const ModelRegistry> registry_;
  compare::GroupAccumulator accumulator_;
  std::map<size_t, std::vector<FitResult>> kept_fits_;  // fits of plug samples, for the branch tests
  Appender parameters_, fits_, residuals_, alpha_, grain_, vti_, moduli_, strain_residuals_, comparison_, nested_,
      json_;
  HtmlReport html_;
  Appender html_file_;
  std::string html_overview_;  // one overview row per sample (about 0.3 kB each)
  std::mutex mu_;
  std::map<size_t, Rendered> rendered_;  // formatted by workers, waiting for their turn
  size_t written_ = 0;
  std::map<std::string, std::vector<std::string>> groups_;
  SummaryCounts counts_;
  std::string blocks_;
  std::vector<std::pair<std::string, ModelTally>> tally_;  // first-seen order
  std::map<std::string, size_t> tally_index_;
  std::vector<std::string> failed_;
  size_t n_failed_ = 0;
};

}  // namespace

StreamReportResult RunAndWriteReportFolder(const Study& study, const RunOptions& run_options,
                                           const std::filesystem::path& folder,
                                           const AtomicFolderOptions& folder_options,
                                           const StreamReportOptions& options, const StreamOptions& stream) {
  // Digest before writing anything: an unreadable input stops the run with
  // nothing on disk.
  const std::vector<InputDigest> inputs = DigestInputs(study);
  StreamReportResult result;
  result.metadata = StartRunMetadata(run_options);
  // The same catalogue RunStudyStreaming() fits with: built-ins plus the study's user models.
  const auto catalogue = std::make_shared<const ModelRegistry>(StudyRegistry(study, run_options.registry));
  // Checked (location, stale staging, existing folder) before any fitting.
  const AtomicFolderOptions checked = StudyFolderOptions(study, result.metadata, folder_options);
  WriteFolderAtomically(
      folder,
      [&](const fs::path& staging) {
        StreamWriter writer(staging, study, result.metadata, inputs, options, catalogue);
        StreamOptions with_render = stream;
        with_render.prepare = [&](size_t i, const SampleRun& sr) {
          if (stream.prepare) stream.prepare(i, sr);
          writer.Render(i, sr);
        };
        RunStudyStreaming(
            study, run_options, [&](size_t i, SampleRun&& sr) { writer.Add(i, sr); }, with_render,
            &result.metadata);
        result.summary = writer.Finish();
        result.fits = writer.counts().fits;
        result.converged_fits = writer.counts().converged;
      },
      checked);
  return result;
}

}  // namespace porofit
