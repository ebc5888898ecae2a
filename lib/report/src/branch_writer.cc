// Branch (hysteresis) test tables: branch_tests.csv, hysteresis.csv, the
// "branches" section of results.json and the summary lines.
#include "branch_writer.h"

#include <cmath>
#include <cstdio>

#include "format.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"

namespace porofit {
using detail::CsvField;
using detail::CsvRow;
using detail::Num;

namespace {

using Json = nlohmann::ordered_json;

constexpr const char* kPooledNote =
    "the joint fit is pooled for the test only: one parameter set on the concatenated data of the members, each point "
    "with its own weight; it is never a sample result (each sample keeps its own fit)";

Json Number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

std::string MemberIds(const Study& study, const std::vector<size_t>& members) {
  std::vector<std::string> ids;
  for (size_t i : members) ids.push_back(study.samples[i].sample.id);
  return detail::Join(ids, ";");
}

std::string Kind(const BranchSetRun& b) { return std::string(ToString(b.set.kind)); }

// Working unit of an SSR: dimensionless when weighted by sigma, GPa^2 otherwise.
std::string RssUnit(const Study& study, const BranchTest& t) {
  return !t.members.empty() && IsWeighted(study.samples[t.members[0]].sample) ? "1" : "GPa^2";
}

std::string Fmt(const char* f, double v) {
  if (!std::isfinite(v)) return "-";
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

}  // namespace

void WriteBranchTestsCsv(const StudyRun& run, std::ostream& out) {
  out << detail::CsvPreamble(
      "branch tests: joint (pooled) against separate fits of the samples of one plug, per model", run.study,
      run.metadata.started_utc, run.metadata.tool_version,
      {kPooledNote,
       "F = [(RSS_joint - RSS_separate)/df1] / [RSS_separate/df2], df1 = p_separate - p_joint, df2 = N - p_separate; "
       "p_value = P(F(df1, df2) >= F); decision 'branches differ' when F > critical at `level`",
       "RSS is the weighted sum of squared residuals (unit 1 with sigma, GPa^2 without); AICc on the pooled data: "
       "noise_estimated true: N ln(RSS/N) + 2k + 2k(k+1)/(N-k-1), one common noise variance counted in k; false "
       "(absolute sigma): RSS + 2k + 2k(k+1)/(N-k-1)",
       "scope set: every member of the plug's set; scope pair: two members (sets of 3 or more), levels not "
       "corrected for multiple tests; empty numbers were not computed, `reason` says why"});
  out << "plug,kind,model,scope,members,N,p_joint,p_separate,RSS_joint,RSS_separate,RSS_unit,F,df1,df2,p_value,"
         "critical,level,decision,noise_estimated,k_joint,k_separate,AICc_joint,AICc_separate,joint_status,reason\n";
  for (const BranchSetRun& b : run.branches) {
    for (const BranchTest& t : b.tests) {
      const bool f = t.f_test.computed;
      out << CsvRow({CsvField(b.set.plug), Kind(b), CsvField(t.model_id), t.scope,
                     CsvField(MemberIds(run.study, t.members)), t.n > 0 ? std::to_string(t.n) : "",
                     t.p_joint > 0 ? std::to_string(t.p_joint) : "", t.p_separate > 0 ? std::to_string(t.p_separate) : "",
                     Num(t.rss_joint), Num(t.rss_separate), RssUnit(run.study, t), f ? Num(t.f_test.f) : "",
                     f ? std::to_string(t.f_test.df1) : "", f ? std::to_string(t.f_test.df2) : "",
                     f ? Num(t.f_test.p_value) : "", f ? Num(t.f_test.critical) : "", Num(run.study.branch_tests.level),
                     t.decision, t.noise_estimated ? "true" : "false", t.k_joint > 0 ? std::to_string(t.k_joint) : "",
                     t.k_separate > 0 ? std::to_string(t.k_separate) : "", Num(t.aicc_joint), Num(t.aicc_separate),
                     std::string(ToString(t.joint.status)), CsvField(t.reason)});
    }
  }
}

void WriteHysteresisCsv(const StudyRun& run, std::ostream& out) {
  out << detail::CsvPreamble(
      "hysteresis: dK = K_b - K_a between two branches or cycles of one plug, from the separate fits", run.study,
      run.metadata.started_utc, run.metadata.tool_version,
      {"P_MPa on a linear grid over the overlap of the two data pressure ranges; moduli in GPa; rel_dK = dK/K_a (1)",
       "sigma_dK_GPa: delta-method 1-sigma from each fit's covariance, the two fits independent (variances add); "
       "empty when a fit has no covariance",
       "flag unloading-softer: an unloading curve below the loading curve of its cycle beyond 2 sigma (unloading is "
       "usually stiffer); one row without numbers, with `reason`, per pair that was not compared"});
  out << "plug,kind,model,pair,sample_a,sample_b,P_MPa,K_a_GPa,K_b_GPa,dK_GPa,sigma_dK_GPa,rel_dK,flag,reason\n";
  const double G = units::kGPa, M = units::kMPa;
  for (const BranchSetRun& b : run.branches) {
    for (const Hysteresis& h : b.hysteresis) {
      const std::vector<std::string> head = {CsvField(b.set.plug), Kind(b), CsvField(h.model_id), CsvField(h.pair),
                                             CsvField(run.study.samples[h.a].sample.id),
                                             CsvField(run.study.samples[h.b].sample.id)};
      if (!h.computed) {
        std::vector<std::string> row = head;
        for (int k = 0; k < 7; ++k) row.emplace_back();
        row.push_back(CsvField(h.reason));
        out << CsvRow(row);
        continue;
      }
      for (size_t i = 0; i < h.pressure.size(); ++i) {
        const double s = h.sigma_dk[i];
        const bool softer = h.loading_unloading && h.dk[i] + 2 * (std::isfinite(s) ? s : 0.0) < 0;
        std::vector<std::string> row = head;
        for (const std::string& x : {Num(h.pressure[i] / M), Num(h.k_a[i] / G), Num(h.k_b[i] / G), Num(h.dk[i] / G),
                                     Num(s / G), Num(h.dk[i] / h.k_a[i])})
          row.push_back(x);
        row.push_back(softer ? "unloading-softer" : "");
        row.emplace_back();
        out << CsvRow(row);
      }
    }
  }
}

namespace detail {

nlohmann::ordered_json BranchesJson(const StudyRun& run) {
  Json sets = Json::array();
  const double G = units::kGPa, M = units::kMPa;
  for (const BranchSetRun& b : run.branches) {
    Json members = Json::array();
    for (size_t i : b.set.members) {
      const Sample& s = run.study.samples[i].sample;
      members.push_back({{"sample", s.id}, {"branch", std::string(ToString(s.branch))}, {"cycle", s.cycle}});
    }
    Json tests = Json::array();
    for (const BranchTest& t : b.tests) {
      Json joint = {{"label", "pooled, for the test only"},
                    {"status", std::string(ToString(t.joint.status))},
                    {"message", t.joint.message}};
      if (t.joint.IsUsable()) {
        Json params = Json::array();
        for (const ParameterResult& p : t.joint.parameters)
          params.push_back({{"name", p.name},
                            {"unit", p.unit},
                            {"estimate", Number(p.estimate / p.si_factor)},
                            {"std_error", Number(p.std_error / p.si_factor)},
                            {"fixed", p.fixed}});
        joint["parameters"] = params;
      }
      tests.push_back({{"model", t.model_id},
                       {"scope", t.scope},
                       {"unit", "1 (counts, F, p_value, critical, level, AICc; RSS in rss_unit)"},
                       {"members", MemberIds(run.study, t.members)},
                       {"tested", t.tested},
                       {"reason", t.reason},
                       {"N", t.n},
                       {"p_joint", t.p_joint},
                       {"p_separate", t.p_separate},
                       {"rss_joint", Number(t.rss_joint)},
                       {"rss_separate", Number(t.rss_separate)},
                       {"rss_unit", RssUnit(run.study, t)},
                       {"F", Number(t.f_test.computed ? t.f_test.f : NAN)},
                       {"df1", t.f_test.computed ? Json(t.f_test.df1) : Json(nullptr)},
                       {"df2", t.f_test.computed ? Json(t.f_test.df2) : Json(nullptr)},
                       {"p_value", Number(t.f_test.computed ? t.f_test.p_value : NAN)},
                       {"critical", Number(t.f_test.computed ? t.f_test.critical : NAN)},
                       {"level", Number(run.study.branch_tests.level)},
                       {"decision", t.decision},
                       {"noise_estimated", t.noise_estimated},
                       {"k_joint", t.k_joint},
                       {"k_separate", t.k_separate},
                       {"aicc_joint", Number(t.aicc_joint)},
                       {"aicc_separate", Number(t.aicc_separate)},
                       {"joint_fit", joint}});
    }
    Json hyst = Json::array();
    for (const Hysteresis& h : b.hysteresis) {
      Json points = Json::array();
      for (size_t i = 0; i < h.pressure.size(); ++i)
        points.push_back({{"P_MPa", Number(h.pressure[i] / M)},
                          {"K_a_GPa", Number(h.k_a[i] / G)},
                          {"K_b_GPa", Number(h.k_b[i] / G)},
                          {"dK_GPa", Number(h.dk[i] / G)},
                          {"sigma_dK_GPa", Number(h.sigma_dk[i] / G)}});
      hyst.push_back({{"model", h.model_id},
                      {"pair", h.pair},
                      {"unit", "1 (max_relative_dK = dK/K_a); pressures in MPa, moduli in GPa"},
                      {"sample_a", run.study.samples[h.a].sample.id},
                      {"sample_b", run.study.samples[h.b].sample.id},
                      {"loading_unloading", h.loading_unloading},
                      {"computed", h.computed},
                      {"reason", h.reason},
                      {"max_relative_dK", Number(h.max_relative)},
                      {"max_relative_dK_P_MPa", Number(h.max_relative_pressure / M)},
                      {"unexpected_sign", h.unexpected_sign},
                      {"note", h.note},
                      {"points", points}});
    }
    sets.push_back({{"plug", b.set.plug},
                    {"kind", Kind(b)},
                    {"members", members},
                    {"tests", tests},
                    {"hysteresis", hyst}});
  }
  return {{"note", kPooledNote},
          {"unit", "1 (level, grid_points)"},
          {"level", Number(run.study.branch_tests.level)},
          {"grid_points", run.study.branch_tests.grid_points},
          {"sets", sets}};
}

void WriteBranchSummary(const StudyRun& run, std::ostream& out) {
  if (run.branches.empty()) return;
  out << "\nBranch tests (joint fit pooled for the test only; every sample keeps its own fit; level "
      << Fmt("%.3g", run.study.branch_tests.level) << "):\n";
  for (const BranchSetRun& b : run.branches) {
    out << "  Plug " << b.set.plug << " (" << Kind(b) << "):";
    for (size_t k = 0; k < b.set.members.size(); ++k) {
      const Sample& s = run.study.samples[b.set.members[k]].sample;
      out << (k ? "; " : " ") << s.id << " " << BranchLabel(s);
    }
    out << "\n";
    for (const BranchTest& t : b.tests) {
      out << "    " << t.model_id << " [" << t.scope;
      if (t.scope == "pair") out << " " << MemberIds(run.study, t.members);
      out << "]: ";
      if (t.tested)
        out << t.decision << " (F = " << Fmt("%.3g", t.f_test.f) << ", p = " << Fmt("%.3g", t.f_test.p_value)
            << ", AICc joint " << Fmt("%.2f", t.aicc_joint) << " vs separate " << Fmt("%.2f", t.aicc_separate) << ")";
      else
        out << "not tested: " << t.reason;
      out << "\n";
    }
    for (const Hysteresis& h : b.hysteresis) {
      out << "    hysteresis " << h.model_id << ", " << h.pair << ": ";
      if (!h.computed) {
        out << "not computed: " << h.reason << "\n";
        continue;
      }
      out << "max dK/K_a = " << Fmt("%+.1f", 100 * h.max_relative) << " % at "
          << Fmt("%.3g", h.max_relative_pressure / units::kMPa) << " MPa";
      if (!h.note.empty()) out << " [" << h.note << "]";
      out << "\n";
    }
  }
}

}  // namespace detail
}  // namespace porofit
