// Report files of joint fits across samples (Study::joint_fits): parameter
// table, joint-against-separate tests, member alpha bands, the results.json
// section and the summary lines.
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

Json Number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }
double At(const std::vector<double>& v, size_t i) { return i < v.size() ? v[i] : std::nan(""); }

// Summary numbers: 4 significant digits (the files carry full precision).
std::string Sig(double v) {
  if (!std::isfinite(v)) return std::isnan(v) ? "nan" : (v > 0 ? "inf" : "-inf");
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", v);
  return buf;
}

bool HasStatistics(FitStatus s) { return s == FitStatus::kConverged || s == FitStatus::kMaxIterations; }

bool IsShared(const JointFitChoice& c, const std::string& name) {
  for (const auto& s : c.shared)
    if (s == name) return true;
  return false;
}

std::string Members(const Study& study, const JointFitChoice& c) {
  std::vector<std::string> ids;
  for (size_t i : c.samples) ids.push_back(study.samples[i].sample.id);
  return detail::Join(ids, ";");
}

// Working-unit factor of joint coordinate c (SI = factor * working).
double FactorOf(const JointFitResult& f, size_t c) {
  if (c >= f.coordinates.size() || f.datasets.empty()) return 1.0;
  const auto j = static_cast<size_t>(f.coordinates[c].model_index);
  return f.datasets.front().parameters[j].si_factor;
}

const char* const kCorrelationNote =
    "member samples of a joint fit are correlated through its shared parameters: their estimates and alpha "
    "must not be combined as independent";

}  // namespace

void WriteJointFitsCsv(const StudyRun& run, std::ostream& out) {
  out << detail::CsvPreamble(
      "joint fits across samples, one row per joint fit, parameter and member sample", run.study,
      run.metadata.started_utc, run.metadata.tool_version,
      {"estimate and std_error are in the row's unit (the model's working unit); std_error is 1 standard error "
       "from the joint covariance (0 for fixed parameters); shared = yes: one value for every member of the joint "
       "fit (the same estimate and std_error on each member's row); blank = not computed",
       kCorrelationNote});
  out << "joint_fit,model,status,sample,parameter,unit,shared,estimate,std_error,fixed,at_bound\n";
  for (size_t q = 0; q < run.study.joint_fits.size() && q < run.joint_fits.size(); ++q) {
    const JointFitChoice& c = run.study.joint_fits[q];
    const JointFitResult& f = run.joint_fits[q].fit;
    const bool has = HasStatistics(f.status);
    for (size_t k = 0; k < f.datasets.size() && k < c.samples.size(); ++k) {
      const FitResult& v = f.datasets[k];
      for (const ParameterResult& p : v.parameters) {
        const double s = p.si_factor;
        const std::string bound = p.fixed ? "" : p.at_lower ? "lower" : p.at_upper ? "upper" : "";
        out << CsvRow({CsvField(c.name), CsvField(c.model_id), std::string(ToString(f.status)),
                       CsvField(run.study.samples[c.samples[k]].sample.id), CsvField(p.name), CsvField(p.unit),
                       IsShared(c, p.name) ? "yes" : "no", Num(has ? p.estimate / s : std::nan("")),
                       Num(has ? p.std_error / s : std::nan("")), p.fixed ? "true" : "false", bound});
      }
    }
    if (f.datasets.empty()) {  // failed before any view: one row says so
      out << CsvRow({CsvField(c.name), CsvField(c.model_id), std::string(ToString(f.status)), CsvField(Members(run.study, c)),
                     "", "", "", "", "", "", ""});
    }
  }
}

void WriteJointTestsCsv(const StudyRun& run, std::ostream& out) {
  out << detail::CsvPreamble(
      "joint fit against separate per-sample fits of the same model, one row per joint fit", run.study,
      run.metadata.started_utc, run.metadata.tool_version,
      {"all statistics on the pooled points of the members (n); ssr = weighted residual sum of squares "
       "(dimensionless with sigma, GPa^2 unweighted); p = free parameters; F test: extra sum of squares, "
       "F(df1 = p_separate - p_joint, df2 = n - p_separate), decision 'shared rejected' when p_value < 1 - level",
       "aicc: N ln(ssr/N) + 2k + 2k(k+1)/(N-k-1) with k = p + 1 (one common noise variance) when sigma is relative; "
       "ssr + 2k + ... with k = p when sigma is absolute; aicc_prefers = the lower of the two",
       kCorrelationNote});
  out << "joint_fit,model,samples,shared,status,n,p_joint,dof_joint,ssr_joint,chi2_nu_joint,k_joint,aicc_joint,"
         "p_separate,ssr_separate,k_separate,aicc_separate,F,df1,df2,p_value,critical,level,decision,aicc_prefers,"
         "note\n";
  for (size_t q = 0; q < run.study.joint_fits.size() && q < run.joint_fits.size(); ++q) {
    const JointFitChoice& c = run.study.joint_fits[q];
    const JointRun& jr = run.joint_fits[q];
    const JointFitResult& f = jr.fit;
    const compare::JointVsSeparate& t = jr.comparison;
    const bool has = HasStatistics(f.status);
    const bool ft = t.computed;
    out << CsvRow({CsvField(c.name), CsvField(c.model_id), CsvField(Members(run.study, c)),
                   CsvField(detail::Join(c.shared, ";")), std::string(ToString(f.status)), std::to_string(f.n),
                   std::to_string(f.p), std::to_string(f.dof), Num(has ? f.ssr : std::nan("")),
                   Num(has ? f.chi2_reduced : std::nan("")), std::to_string(t.k_joint), Num(t.aicc_joint),
                   std::to_string(t.p_separate), Num(t.rss_separate), std::to_string(t.k_separate),
                   Num(t.aicc_separate), Num(ft ? t.f_test.f : std::nan("")), ft ? std::to_string(t.f_test.df1) : "",
                   ft ? std::to_string(t.f_test.df2) : "", Num(ft ? t.f_test.p_value : std::nan("")),
                   Num(ft ? t.f_test.critical : std::nan("")), Num(ft ? t.f_test.level : std::nan("")),
                   CsvField(t.decision), CsvField(t.aicc_prefers), CsvField(ft ? "" : t.reason)});
  }
}

void WriteJointAlphaCsv(const StudyRun& run, std::ostream& out) {
  out << detail::CsvPreamble(
      "alpha = 1 - K_dry/K_s of member samples from joint fits, one row per joint fit, member, method and pressure",
      run.study, run.metadata.started_utc, run.metadata.tool_version,
      {"pressure_MPa is the differential pressure; K in GPa; alpha dimensionless; method delta: pointwise "
       "confidence (conf) and prediction (pred) bands from the member's view of the joint covariance (shared "
       "parameters' variance included; t quantile on the joint dof); monte-carlo: percentile bands of draws from "
       "that covariance; bootstrap is not available for joint fits",
       kCorrelationNote, detail::CorrelationCaveat()});
  out << "joint_fit,sample,model,method,pressure_MPa,K_GPa,K_lo_GPa,K_hi_GPa,alpha,alpha_conf_lo,alpha_conf_hi,"
         "alpha_pred_lo,alpha_pred_hi,flags\n";
  const double G = units::kGPa, M = units::kMPa, nan = std::nan("");
  for (size_t q = 0; q < run.study.joint_fits.size() && q < run.joint_fits.size(); ++q) {
    const JointFitChoice& c = run.study.joint_fits[q];
    const JointRun& jr = run.joint_fits[q];
    for (size_t k = 0; k < jr.bands.size() && k < c.samples.size(); ++k) {
      const bands::BandResult& b = jr.bands[k];
      if (!b.computed) continue;
      const std::string& id = run.study.samples[c.samples[k]].sample.id;
      auto emit = [&](const char* method, size_t j, double klo, double khi, double clo, double chi, double plo,
                      double phi) {
        const std::vector<std::string> flags =
            j < b.flags.size() ? detail::PointFlagNames(b.flags[j]) : std::vector<std::string>{};
        out << CsvRow({CsvField(c.name), CsvField(id), CsvField(c.model_id), method, Num(At(b.grid.pressure, j) / M),
                       Num(At(b.k, j) / G), Num(klo / G), Num(khi / G), Num(At(b.alpha, j)), Num(clo), Num(chi),
                       Num(plo), Num(phi), CsvField(detail::Join(flags, ";"))});
      };
      if (b.delta.computed) {
        const bands::DeltaResult& x = b.delta;
        for (size_t j = 0; j < b.grid.size(); ++j)
          emit("delta", j, At(x.k_confidence.lower, j), At(x.k_confidence.upper, j), At(x.alpha_confidence.lower, j),
               At(x.alpha_confidence.upper, j), At(x.alpha_prediction.lower, j), At(x.alpha_prediction.upper, j));
      }
      if (b.monte_carlo.computed) {
        const bands::MonteCarloResult& x = b.monte_carlo;
        for (size_t j = 0; j < b.grid.size(); ++j)
          emit("monte-carlo", j, At(x.k.lower, j), At(x.k.upper, j), At(x.alpha.lower, j), At(x.alpha.upper, j), nan,
               nan);
      }
    }
  }
}

nlohmann::ordered_json JointFitsJson(const StudyRun& run) {
  Json all = Json::array();
  for (size_t q = 0; q < run.study.joint_fits.size() && q < run.joint_fits.size(); ++q) {
    const JointFitChoice& c = run.study.joint_fits[q];
    const JointRun& jr = run.joint_fits[q];
    const JointFitResult& f = jr.fit;
    const bool has = HasStatistics(f.status);
    Json j;
    j["name"] = c.name;
    j["model"] = c.model_id;
    j["requested_at"] = c.where.ToString();
    Json ids = Json::array();
    for (size_t i : c.samples) ids.push_back(run.study.samples[i].sample.id);
    j["samples"] = ids;
    j["shared"] = c.shared;
    j["allow_mixed_branches"] = c.allow_mixed_branches;
    j["mixed_branches"] = c.mixed_branches;
    j["status"] = std::string(ToString(f.status));
    j["message"] = f.message;
    j["iterations"] = f.iterations;
    j["starts_tried"] = f.starts_tried;
    j["starts_converged"] = f.starts_converged;
    j["statistics"] = {{"n", f.n},
                       {"p", f.p},
                       {"dof", f.dof},
                       {"ssr", Number(has ? f.ssr : std::nan(""))},
                       {"chi2_reduced", Number(has ? f.chi2_reduced : std::nan(""))},
                       {"aic", Number(has ? f.aic : std::nan(""))},
                       {"aicc", Number(has ? f.aicc : std::nan(""))},
                       {"bic", Number(has ? f.bic : std::nan(""))},
                       {"covariance_scaled", f.covariance_scaled},
                       {"information_criteria_k", f.p + (f.covariance_scaled ? 1 : 0)}};
    Json coords = Json::array(), labels = Json::array();
    for (size_t a = 0; a < f.coordinates.size(); ++a) {
      const JointCoordinate& x = f.coordinates[a];
      const double s = FactorOf(f, a);
      const std::string unit = f.datasets.empty() ? "" : f.datasets.front().parameters[static_cast<size_t>(x.model_index)].unit;
      coords.push_back({{"label", x.label},
                        {"parameter", x.name},
                        {"sample", x.dataset < 0 ? Json(nullptr) : Json(ids[static_cast<size_t>(x.dataset)])},
                        {"shared", x.dataset < 0},
                        {"unit", unit},
                        {"estimate", Number(has ? x.estimate / s : std::nan(""))},
                        {"std_error", Number(has ? x.std_error / s : std::nan(""))}});
      labels.push_back(x.label);
    }
    j["coordinates"] = coords;
    Json cov = Json::array(), cor = Json::array();
    const auto nc = static_cast<Eigen::Index>(f.coordinates.size());
    if (f.covariance.rows() == nc && f.correlation.rows() == nc) {
      for (Eigen::Index a = 0; a < nc; ++a) {
        Json rc = Json::array(), rr = Json::array();
        for (Eigen::Index b = 0; b < nc; ++b) {
          rc.push_back(Number(f.covariance(a, b) / (FactorOf(f, static_cast<size_t>(a)) * FactorOf(f, static_cast<size_t>(b)))));
          rr.push_back(Number(f.correlation(a, b)));
        }
        cov.push_back(rc);
        cor.push_back(rr);
      }
    }
    j["covariance"] = {{"available", f.covariance_ok},
                       {"labels", labels},
                       {"unit", "product of the two coordinates' units"},
                       {"matrix", cov}};
    j["correlation"] = {{"labels", labels}, {"matrix", cor}};
    Json members = Json::array();
    for (size_t k = 0; k < f.datasets.size() && k < f.info.size(); ++k) {
      const FitResult& v = f.datasets[k];
      const JointDatasetInfo& in = f.info[k];
      Json params = Json::array();
      for (const ParameterResult& p : v.parameters)
        params.push_back({{"name", p.name},
                          {"unit", p.unit},
                          {"shared", IsShared(c, p.name)},
                          {"fixed", p.fixed},
                          {"estimate", Number(has ? p.estimate / p.si_factor : std::nan(""))},
                          {"std_error", Number(has ? p.std_error / p.si_factor : std::nan(""))}});
      Json m;
      m["sample"] = in.label;
      m["n"] = in.n;
      m["p_own"] = in.p_own;
      m["dof_share"] = Number(in.dof_share);
      m["chi2_share"] = Number(in.chi2_share);
      m["ssr"] = Number(v.ssr);
      m["rmse_GPa"] = Number(v.rmse / units::kGPa);
      m["parameters"] = params;
      m["warnings"] = v.warnings;
      if (k < jr.bands.size()) {
        const bands::BandResult& b = jr.bands[k];
        Json alpha;
        alpha["computed"] = b.computed;
        alpha["message"] = b.message;
        if (b.computed && b.delta.computed) {
          Json pr = Json::array(), al = Json::array(), lo = Json::array(), hi = Json::array();
          for (size_t g = 0; g < b.grid.size(); ++g) {
            pr.push_back(Number(At(b.grid.pressure, g) / units::kMPa));
            al.push_back(Number(At(b.alpha, g)));
            lo.push_back(Number(At(b.delta.alpha_confidence.lower, g)));
            hi.push_back(Number(At(b.delta.alpha_confidence.upper, g)));
          }
          alpha["delta"] = {{"pressure_MPa", pr}, {"alpha", al}, {"conf_lo", lo}, {"conf_hi", hi}};
        }
        alpha["notes"] = b.notes;
        m["alpha"] = alpha;
      }
      members.push_back(m);
    }
    j["members"] = members;
    const compare::JointVsSeparate& t = jr.comparison;
    Json sep = Json::array();
    for (size_t k = 0; k < t.separate.size(); ++k)
      sep.push_back({{"sample", k < ids.size() ? ids[k] : Json(nullptr)},
                     {"status", std::string(ToString(t.separate[k].status))},
                     {"ssr", Number(t.separate[k].ssr)},
                     {"p", t.separate[k].p}});
    j["joint_vs_separate"] = {{"computed", t.computed},
                              {"reason", t.reason},
                              {"n", t.n},
                              {"ssr_joint", Number(t.rss_joint)},
                              {"p_joint", t.p_joint},
                              {"ssr_separate", Number(t.rss_separate)},
                              {"p_separate", t.p_separate},
                              {"f", Number(t.computed ? t.f_test.f : std::nan(""))},
                              {"df1", t.f_test.df1},
                              {"df2", t.f_test.df2},
                              {"p_value", Number(t.computed ? t.f_test.p_value : std::nan(""))},
                              {"level", Number(t.f_test.level)},
                              {"decision", t.decision},
                              {"k_joint", t.k_joint},
                              {"k_separate", t.k_separate},
                              {"aicc_joint", Number(t.aicc_joint)},
                              {"aicc_separate", Number(t.aicc_separate)},
                              {"aicc_prefers", t.aicc_prefers},
                              {"separate_fits", sep}};
    j["warnings"] = f.warnings;
    j["notes"] = jr.notes;
    all.push_back(j);
  }
  return all;
}

void WriteJointSummary(const StudyRun& run, std::ostream& out) {
  if (run.study.joint_fits.empty()) return;
  out << "\nJoint fits across samples (shared parameters; members correlated through them):\n";
  for (size_t q = 0; q < run.study.joint_fits.size() && q < run.joint_fits.size(); ++q) {
    const JointFitChoice& c = run.study.joint_fits[q];
    const JointRun& jr = run.joint_fits[q];
    const JointFitResult& f = jr.fit;
    out << "  " << c.name << ": " << c.model_id << " on " << Members(run.study, c) << ", shared "
        << detail::Join(c.shared, ", ") << " - " << ToString(f.status);
    if (!HasStatistics(f.status)) {
      out << " (" << f.message << ")\n";
      continue;
    }
    out << ", n = " << f.n << ", p = " << f.p << ", chi2_nu = " << Sig(f.chi2_reduced) << "\n";
    for (size_t a = 0; a < f.coordinates.size(); ++a) {
      const JointCoordinate& x = f.coordinates[a];
      if (x.dataset >= 0) continue;
      const double s = FactorOf(f, a);
      const std::string unit = f.datasets.front().parameters[static_cast<size_t>(x.model_index)].unit;
      out << "    " << x.name << " = " << Sig(x.estimate / s) << " +- " << Sig(x.std_error / s) << " " << unit
          << " (shared)\n";
    }
    const compare::JointVsSeparate& t = jr.comparison;
    if (t.computed) {
      out << "    joint vs separate: F(" << t.f_test.df1 << ", " << t.f_test.df2 << ") = " << Sig(t.f_test.f)
          << ", p = " << Sig(t.f_test.p_value) << " -> " << t.decision << "; AICc joint " << Sig(t.aicc_joint)
          << " vs separate " << Sig(t.aicc_separate) << "\n";
    } else {
      out << "    joint vs separate: not tested (" << t.reason << ")\n";
    }
    for (const std::string& n : jr.notes) out << "    note: " << n << "\n";
  }
}

}  // namespace porofit
