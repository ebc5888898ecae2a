// Model-comparison outputs: comparison.csv, nested_tests.csv,
// comparison_groups.csv, the results.json sections and the summary lines.
#include "comparison_writer.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "format.h"
#include "porofit/report/stream.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"

namespace porofit {
using detail::CsvField;
using detail::CsvRow;
using detail::Num;

namespace {

using Json = nlohmann::ordered_json;

Json Number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

std::string CriterionLabel(compare::Criterion c) {
  switch (c) {
    case compare::Criterion::kAicc: return "AICc";
    case compare::Criterion::kAic: return "AIC";
    case compare::Criterion::kBic: return "BIC";
  }
  return "?";
}

std::string Fmt(const char* f, double v) {
  if (!std::isfinite(v)) return "-";
  char b[64];
  std::snprintf(b, sizeof b, f, v);
  return b;
}

std::string Pad(const std::string& s, size_t w) { return s.size() >= w ? s + " " : s + std::string(w - s.size(), ' '); }
std::string PadLeft(const std::string& s, size_t w) { return s.size() >= w ? " " + s : std::string(w - s.size(), ' ') + s; }

std::string Rank(int r) { return r > 0 ? std::to_string(r) : std::string(); }

double Weight(const compare::ModelScore& s, compare::Criterion c) {
  return c == compare::Criterion::kAicc ? s.weight_aicc : c == compare::Criterion::kAic ? s.weight_aic : s.weight_bic;
}

std::vector<std::string> CvFields(const compare::CrossValidationScore& c, bool with_points) {
  std::vector<std::string> f{Num(c.rmse / units::kGPa), Num(c.mean_error / units::kGPa), Num(c.rms_standardized),
                             std::to_string(c.folds), std::to_string(c.refits_failed)};
  if (with_points) f.push_back(std::to_string(c.points_predicted));
  f.push_back(Rank(c.rank));
  f.push_back(CsvField(c.reason));
  return f;
}

Json CvJson(const compare::CrossValidationScore& c) {
  return {{"computed", c.computed},
          {"reason", c.reason},
          {"unit", "counts; rms_standardized in sigma units (1)"},
          {"refits", c.folds},
          {"refits_failed", c.refits_failed},
          {"points_predicted", c.points_predicted},
          {"rmse_GPa", Number(c.rmse / units::kGPa)},
          {"mean_error_GPa", Number(c.mean_error / units::kGPa)},
          {"rms_standardized", Number(c.rms_standardized)},
          {"rank", c.rank > 0 ? Json(c.rank) : Json(nullptr)}};
}

std::string Joined(const std::vector<std::string>& v, const std::string& sep) { return detail::Join(v, sep); }

}  // namespace

void WriteComparisonCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "model comparison, one row per sample and model", study, meta.started_utc, meta.tool_version,
      {"aic, aicc, bic and their delta_* are dimensionless (Gaussian log-likelihood, constants shared by the "
       "sample's models dropped); weight_* are Akaike weights (dimensionless, sum 1 over the included models); "
       "k counts the free parameters plus the noise variance when it is estimated; rank by `criterion`, 1 = best; "
       "blank = not computed",
       "cross-validation (loo_ = leave-one-out, holdout_ = leave-highest-pressure-out): *_rmse_GPa and "
       "*_mean_error_GPa (observed - predicted) in GPa; *_rms_standardized = sqrt(mean (e/sigma)^2) in the "
       "sample's declared sigma (dimensionless; blank when unweighted); *_rank among models with no failed refit"});
  out << "sample,lithology,kind,branch,cycle,model,status,included,excluded_reason,n,k,aic,aicc,bic,delta_aic,"
         "delta_aicc,delta_bic,weight_aic,weight_aicc,weight_bic,criterion,rank,"
         "loo_rmse_GPa,loo_mean_error_GPa,loo_rms_standardized,loo_refits,loo_refits_failed,loo_rank,loo_note,"
         "holdout_points,holdout_rmse_GPa,holdout_mean_error_GPa,holdout_rms_standardized,holdout_refits,"
         "holdout_refits_failed,holdout_points_predicted,holdout_rank,holdout_note\n";
}

void WriteComparisonCsvRows(const Study& study, const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  const int h = study.comparison.cross_validation.holdout_points;
  {
    const Sample& s = ss.sample;
    const compare::SampleComparison& c = sr.comparison;
    for (size_t k = 0; k < c.models.size(); ++k) {
      const compare::ModelScore& m = c.models[k];
      const std::string status =
          k < sr.fits.size() ? std::string(ToString(sr.fits[k].status)) : std::string();
      std::vector<std::string> row{CsvField(s.id), CsvField(s.lithology), std::string(ToString(s.kind)),
                                   std::string(ToString(s.branch)), std::to_string(s.cycle), CsvField(m.model_id),
                                   status, m.included ? "true" : "false", CsvField(m.excluded_reason),
                                   m.n > 0 ? std::to_string(m.n) : std::string(),
                                   m.n > 0 ? std::to_string(m.k) : std::string(), Num(m.aic), Num(m.aicc), Num(m.bic),
                                   Num(m.delta_aic), Num(m.delta_aicc), Num(m.delta_bic), Num(m.weight_aic),
                                   Num(m.weight_aicc), Num(m.weight_bic), std::string(compare::ToString(c.criterion)),
                                   Rank(m.rank)};
      for (const std::string& f : CvFields(m.leave_one_out, false)) row.push_back(f);
      row.push_back(std::to_string(h));
      for (const std::string& f : CvFields(m.holdout, true)) row.push_back(f);
      out << CsvRow(row);
    }
  }
}

void WriteNestedTestsCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "nested F tests, one row per sample and pair of models", study, meta.started_utc, meta.tool_version,
      {"F = [(SSR_restricted - SSR_fuller)/df1] / [SSR_fuller/df2] (dimensionless), df1 = p_fuller - "
       "p_restricted, df2 = n - p_fuller; p_value = P(F(df1, df2) >= F); critical = F quantile at `level`; "
       "tested only for regular nestings (relation = regular); otherwise `reason` says why; blank = not computed"});
  out << "sample,restricted,fuller,relation,restriction,tested,F,df1,df2,p_value,critical,level,decision,reason\n";
}

void WriteNestedTestsCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  {
    const Sample& s = ss.sample;
    const compare::SampleComparison& c = sr.comparison;
    for (const compare::NestedTest& t : c.tests) {
      out << CsvRow({CsvField(s.id), CsvField(t.restricted), CsvField(t.fuller),
                     std::string(compare::ToString(t.kind)), CsvField(t.restriction), t.tested ? "true" : "false",
                     t.tested ? Num(t.f.f) : std::string(), t.tested ? std::to_string(t.f.df1) : std::string(),
                     t.tested ? std::to_string(t.f.df2) : std::string(), t.tested ? Num(t.f.p_value) : std::string(),
                     t.tested ? Num(t.f.critical) : std::string(), Num(c.f_test_level), CsvField(t.decision),
                     CsvField(t.reason)});
    }
  }
}

void WriteComparisonCsv(const StudyRun& run, std::ostream& out) {
  WriteComparisonCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteComparisonCsvRows(run.study, run.study.samples[i], run.samples[i], out);
}

void WriteNestedTestsCsv(const StudyRun& run, std::ostream& out) {
  WriteNestedTestsCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteNestedTestsCsvRows(run.study.samples[i], run.samples[i], out);
}

void WriteComparisonGroupsCsv(const StudyRun& run, std::ostream& out) {
  const compare::ComparisonSummary& s = run.comparison_summary;
  out << detail::CsvPreamble(
      "model comparison across samples, one row per group and model", run.study, run.metadata.started_utc,
      run.metadata.tool_version,
      {"criterion scores are dimensionless; wins = samples where the model ranked first; summed_score is over "
       "the group's complete_samples only (samples where every model of the group fitted; blank if none); "
       "median_weight and mean_delta are over samples_usable (the model's usable fits)"});
  out << "group_by,group,samples,samples_compared,complete_samples,criterion,model,samples_with_model,"
         "samples_usable,wins,summed_score,median_weight,mean_delta\n";
  const std::string by = s.group_by.empty() ? std::string("(all)") : Joined(s.group_by, ";");
  for (const compare::GroupSummary& g : s.groups) {
    for (const compare::GroupModelSummary& m : g.models) {
      out << CsvRow({CsvField(by), CsvField(g.label), std::to_string(g.samples), std::to_string(g.samples_compared),
                     std::to_string(g.complete_samples), std::string(compare::ToString(s.criterion)),
                     CsvField(m.model_id), std::to_string(m.samples_with_model), std::to_string(m.samples_usable),
                     std::to_string(m.wins), Num(m.summed_score), Num(m.median_weight), Num(m.mean_delta)});
    }
  }
}

namespace detail {

nlohmann::ordered_json SampleComparisonJson(const compare::SampleComparison& c) {
  Json j;
  j["computed"] = c.computed;
  j["criterion"] = std::string(compare::ToString(c.criterion));
  j["best"] = c.best.empty() ? Json(nullptr) : Json(c.best);
  j["unit"] = "criteria dimensionless; prediction errors in GPa";
  Json models = Json::array();
  for (const compare::ModelScore& m : c.models) {
    models.push_back({{"model", m.model_id},
                      {"unit", "1 (criteria, differences, weights dimensionless; n, k counts)"},
                      {"included", m.included},
                      {"excluded_reason", m.excluded_reason},
                      {"n", m.n},
                      {"k", m.k},
                      {"aic", Number(m.aic)},
                      {"aicc", Number(m.aicc)},
                      {"bic", Number(m.bic)},
                      {"aicc_defined", m.aicc_defined},
                      {"delta", {{"aic", Number(m.delta_aic)}, {"aicc", Number(m.delta_aicc)}, {"bic", Number(m.delta_bic)}}},
                      {"weight", {{"aic", Number(m.weight_aic)}, {"aicc", Number(m.weight_aicc)}, {"bic", Number(m.weight_bic)}}},
                      {"rank", m.rank > 0 ? Json(m.rank) : Json(nullptr)},
                      {"leave_one_out", CvJson(m.leave_one_out)},
                      {"high_pressure_holdout", CvJson(m.holdout)}});
  }
  j["models"] = models;
  Json tests = Json::array();
  for (const compare::NestedTest& t : c.tests) {
    Json tj{{"restricted", t.restricted},
            {"fuller", t.fuller},
            {"relation", std::string(compare::ToString(t.kind))},
            {"unit", "1 (F, p, critical and level dimensionless; df counts)"},
            {"restriction", t.restriction},
            {"tested", t.tested}};
    if (t.tested) {
      tj["F"] = Number(t.f.f);
      tj["df1"] = t.f.df1;
      tj["df2"] = t.f.df2;
      tj["p_value"] = Number(t.f.p_value);
      tj["critical"] = Number(t.f.critical);
      tj["level"] = Number(t.f.level);
      tj["decision"] = t.decision;
    } else {
      tj["reason"] = t.reason;
    }
    tests.push_back(tj);
  }
  j["nested_tests"] = tests;
  j["cross_validation"] = {{"unit", "points"},
                           {"leave_one_out", c.cross_validation.leave_one_out},
                           {"high_pressure_holdout", c.cross_validation.high_pressure_holdout},
                           {"holdout_points", c.cross_validation.holdout_points}};
  j["notes"] = c.notes;
  return j;
}

nlohmann::ordered_json ComparisonSummaryJson(const StudyRun& run) {
  const compare::ComparisonSummary& s = run.comparison_summary;
  const compare::ComparisonOptions& o = run.study.comparison;
  Json j;
  j["criterion"] = std::string(compare::ToString(s.criterion));
  j["unit"] = "1 (criterion scores, weights and the level dimensionless; counts)";
  j["group_by"] = s.group_by;
  j["f_test_level"] = Number(o.f_test_level);
  j["cross_validation"] = {{"unit", "points"},
                           {"leave_one_out", o.cross_validation.leave_one_out},
                           {"high_pressure_holdout", o.cross_validation.high_pressure_holdout},
                           {"holdout_points", o.cross_validation.holdout_points}};
  j["samples"] = s.samples;
  Json groups = Json::array();
  for (const compare::GroupSummary& g : s.groups) {
    Json models = Json::array();
    for (const compare::GroupModelSummary& m : g.models)
      models.push_back({{"model", m.model_id},
                        {"unit", "1 (criterion scores and weights dimensionless; counts)"},
                        {"samples_with_model", m.samples_with_model},
                        {"samples_usable", m.samples_usable},
                        {"wins", m.wins},
                        {"summed_score", Number(m.summed_score)},
                        {"median_weight", Number(m.median_weight)},
                        {"mean_delta", Number(m.mean_delta)}});
    groups.push_back({{"key", g.key},
                      {"unit", "samples"},
                      {"label", g.label},
                      {"samples", g.samples},
                      {"samples_compared", g.samples_compared},
                      {"complete_samples", g.complete_samples},
                      {"models", models}});
  }
  j["groups"] = groups;
  return j;
}

void WriteSampleComparisonLines(const compare::SampleComparison& c, std::ostream& out) {
  if (!c.computed) return;
  const std::string crit = CriterionLabel(c.criterion);
  // Ranked models with their weights, then the excluded ones.
  std::vector<const compare::ModelScore*> ranked;
  for (const compare::ModelScore& m : c.models)
    if (m.rank > 0) ranked.push_back(&m);
  std::sort(ranked.begin(), ranked.end(), [](auto* a, auto* b) { return a->rank < b->rank; });
  out << "  Ranking (" << crit << " weight):";
  if (ranked.empty()) out << " none";
  for (size_t r = 0; r < ranked.size(); ++r)
    out << (r ? ", " : " ") << r + 1 << ". " << ranked[r]->model_id << " " << Fmt("%.2f", Weight(*ranked[r], c.criterion));
  std::vector<std::string> excluded;
  for (const compare::ModelScore& m : c.models)
    if (!m.included) excluded.push_back(m.model_id);
  if (!excluded.empty()) out << "; not ranked: " << Joined(excluded, ", ");
  out << "\n";
  // F tests of the regular nestings; other pairs are counted.
  std::vector<std::string> lines;
  int others = 0;
  for (const compare::NestedTest& t : c.tests) {
    if (t.kind != compare::NestingKind::kRegular) {
      ++others;
      continue;
    }
    std::string s = t.restricted + " in " + t.fuller + " (" + t.restriction + "): ";
    if (t.tested)
      s += "F " + Fmt("%.3g", t.f.f) + ", p " + Fmt("%.3g", t.f.p_value) + " -> " + t.decision;
    else
      s += "not tested, " + t.reason;
    lines.push_back(s);
  }
  if (!lines.empty() || others > 0) {
    out << "  F tests: " << (lines.empty() ? std::string("no regular nesting among these models") : Joined(lines, "; "));
    if (others > 0) out << " (" << others << " other pair" << (others > 1 ? "s" : "") << " not tested: see nested_tests.csv)";
    out << ".\n";
  }
  std::vector<std::string> cv;
  for (const compare::ModelScore& m : c.models)
    if (m.holdout.computed)
      cv.push_back(m.model_id + " " + Fmt("%.3g", m.holdout.rmse / units::kGPa) +
                   (m.holdout.refits_failed ? " (refit failed)" : ""));
  if (!cv.empty())
    out << "  High-P hold-out (" << c.cross_validation.holdout_points << " pt) RMSE GPa: " << Joined(cv, ", ") << "\n";
  cv.clear();
  for (const compare::ModelScore& m : c.models)
    if (m.leave_one_out.computed)
      cv.push_back(m.model_id + " " + Fmt("%.3g", m.leave_one_out.rmse / units::kGPa) +
                   (m.leave_one_out.refits_failed ? " (" + std::to_string(m.leave_one_out.refits_failed) + " failed)" : ""));
  if (!cv.empty()) out << "  Leave-one-out RMSE GPa: " << Joined(cv, ", ") << "\n";
  for (const std::string& n : c.notes) out << "      note: " << n << "\n";
}

void WriteComparisonGroupTable(const StudyRun& run, std::ostream& out) {
  const compare::ComparisonSummary& s = run.comparison_summary;
  if (s.groups.empty()) return;
  const std::string crit = CriterionLabel(s.criterion);
  out << "\nModel comparison across samples (" << crit << ", grouped by "
      << (s.group_by.empty() ? std::string("nothing: all samples") : Joined(s.group_by, ", ")) << "):\n";
  for (const compare::GroupSummary& g : s.groups) {
    out << "  " << g.label << ": " << g.samples << " sample" << (g.samples == 1 ? "" : "s") << ", "
        << g.complete_samples << " with every model fitted\n";
    out << "    " << Pad("model", 16) << PadLeft("wins", 6) << PadLeft("summed " + crit, 14) << PadLeft("median w", 10)
        << PadLeft("mean delta", 12) << PadLeft("usable", 8) << "\n";
    for (const compare::GroupModelSummary& m : g.models)
      out << "    " << Pad(m.model_id, 16) << PadLeft(std::to_string(m.wins), 6)
          << PadLeft(Fmt("%.2f", m.summed_score), 14) << PadLeft(Fmt("%.3f", m.median_weight), 10)
          << PadLeft(Fmt("%.2f", m.mean_delta), 12)
          << PadLeft(std::to_string(m.samples_usable) + "/" + std::to_string(m.samples_with_model), 8) << "\n";
  }
}

}  // namespace detail
}  // namespace porofit
