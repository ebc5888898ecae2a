#include <cmath>

#include "format.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"
#include "porofit/report/stream.h"

namespace porofit {
using detail::CsvField;
using detail::CsvRow;
using detail::Num;

namespace {

// Statistics are meaningful only where the solver ran to an answer.
bool HasStatistics(const FitResult& r) {
  return r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
}

std::vector<std::string> SampleFields(const Sample& s) {
  return {CsvField(s.id), CsvField(s.lithology), std::string(ToString(s.kind)), std::string(ToString(s.branch)),
          std::to_string(s.cycle)};
}

std::string AtBound(const ParameterResult& p) {
  if (p.fixed) return {};
  if (p.at_lower && p.at_upper) return "both";
  if (p.at_lower) return "lower";
  if (p.at_upper) return "upper";
  return {};
}

}  // namespace

void WriteParametersCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "fitted parameters, one row per sample, model and parameter", study, meta.started_utc, meta.tool_version,
      {"estimate, std_error, lower and upper are in the row's unit (the model's working unit); "
       "std_error is 1 standard error (0 for fixed parameters); blank = not computed; "
       "rel_std_error_percent = 100 std_error/|estimate|; at_bound = lower|upper when the estimate sits on a bound"});
  out << "sample,lithology,kind,branch,cycle,model,status,parameter,unit,estimate,std_error,"
         "rel_std_error_percent,lower,upper,fixed,at_bound\n";
}

void WriteParametersCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  const Sample& s = ss.sample;
  {
    for (const FitResult& r : sr.fits) {
      const bool has = HasStatistics(r);
      for (const ParameterResult& p : r.parameters) {
        const double f = p.si_factor;
        std::vector<std::string> row = SampleFields(s);
        const double est = has ? p.estimate / f : std::nan("");
        const double se = has ? p.std_error / f : std::nan("");
        row.insert(row.end(),
                   {CsvField(r.model_id), std::string(ToString(r.status)), CsvField(p.name), CsvField(p.unit),
                    Num(est), Num(se), Num(detail::RelativeErrorPercent(est, se)), Num(p.lower / f),
                    Num(p.upper / f), p.fixed ? "true" : "false", has ? AtBound(p) : std::string()});
        out << CsvRow(row);
      }
    }
  }
}

void WriteParametersCsv(const StudyRun& run, std::ostream& out) {
  WriteParametersCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteParametersCsvRows(run.study.samples[i], run.samples[i], out);
}

void WriteFitsCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "fit statistics, one row per sample and model", study, meta.started_utc, meta.tool_version,
      {"ssr = sum of squared weighted residuals, in ssr_unit (1 when every point has a sigma, GPa^2 when "
       "unweighted); chi2_reduced = ssr/dof; rmse_GPa from raw residuals; aic, aicc, bic from the Gaussian "
       "log-likelihood; flags separated by ';' (see docs/outputs.md); blank = not computed; strain samples: "
       "ssr of strain residuals (strain^2 when unweighted), rmse_GPa blank (rmse_strain in results.json)"});
  out << "sample,lithology,kind,branch,cycle,model,status,n,p,dof,ssr,ssr_unit,chi2_reduced,rmse_GPa,"
         "r_squared,aic,aicc,bic,max_abs_correlation,flags,message,iterations,starts,starts_converged\n";
}

void WriteFitsCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  {
    const bool weighted = IsWeighted(ss.sample);
    const bool strain = IsStrainSample(ss);  // residuals in strain: rmse in results.json (rmse_strain)
    for (const FitResult& r : sr.fits) {
      const bool has = HasStatistics(r);
      auto stat = [&](double v) { return has ? Num(v) : std::string(); };
      std::vector<std::string> row = SampleFields(ss.sample);
      row.insert(row.end(),
                 {CsvField(r.model_id), std::string(ToString(r.status)), std::to_string(r.n), std::to_string(r.p),
                  std::to_string(r.dof), stat(r.ssr), weighted ? "1" : strain ? "strain^2" : "GPa^2",
                  stat(r.chi2_reduced), strain ? std::string() : stat(r.rmse / units::kGPa), stat(r.r_squared), stat(r.aic), stat(r.aicc), stat(r.bic),
                  has && r.covariance_ok ? Num(r.max_abs_correlation) : std::string(),
                  CsvField(detail::Join(detail::FitFlags(r, ss.options), ";")), CsvField(r.message),
                  std::to_string(r.iterations), std::to_string(r.starts_tried), std::to_string(r.starts_converged)});
      out << CsvRow(row);
    }
  }
}

void WriteFitsCsv(const StudyRun& run, std::ostream& out) {
  WriteFitsCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteFitsCsvRows(run.study.samples[i], run.samples[i], out);
}

void WriteResidualsCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "residuals, one row per sample, model and data point", study, meta.started_utc, meta.tool_version,
      {"pressure_MPa is the differential pressure P = P_c - n P_p; residual_GPa = observed - fitted; "
       "standardized_residual is internally studentised (residual / (s sigma sqrt(1 - leverage))); "
       "sigma_K_GPa blank when the data carry no uncertainty; point = 1-based index in the sample's data; "
       "robust_weight = weight the robust loss gave the point (1 without a robust loss); "
       "fits of strain samples are in strain_residuals.csv (residuals in strain units)"});
  out << "sample,model,point,location,pressure_MPa,observed_K_GPa,fitted_K_GPa,sigma_K_GPa,residual_GPa,"
         "standardized_residual,leverage,robust_weight\n";
}

void WriteResidualsCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  {
    const Sample& s = ss.sample;
    const bool weighted = IsWeighted(s);
    if (IsStrainSample(ss)) return;  // in strain units: strain_residuals.csv
    for (const FitResult& r : sr.fits) {
      if (!HasStatistics(r)) continue;
      const ResidualDiagnostics& d = r.residuals;
      const std::vector<int> point = detail::ResidualToPoint(r, s);
      for (Eigen::Index k = 0; k < d.x.size(); ++k) {
        const int j = point[static_cast<size_t>(k)];
        auto at = [&](const Eigen::VectorXd& v) { return k < v.size() ? v[k] : std::nan(""); };
        out << CsvRow({CsvField(s.id), CsvField(r.model_id), j >= 0 ? std::to_string(j + 1) : std::string(),
                       j >= 0 ? CsvField(s.points[static_cast<size_t>(j)].where.ToString()) : std::string(),
                       Num(at(d.x) / units::kMPa), Num(at(d.observed) / units::kGPa), Num(at(d.fitted) / units::kGPa),
                       weighted ? Num(at(d.sigma) / units::kGPa) : std::string(), Num(at(d.raw) / units::kGPa),
                       Num(at(d.standardized)), Num(at(d.leverage)), Num(at(d.robust_weight))});
      }
    }
  }
}

void WriteResidualsCsv(const StudyRun& run, std::ostream& out) {
  WriteResidualsCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteResidualsCsvRows(run.study.samples[i], run.samples[i], out);
}

}  // namespace porofit
