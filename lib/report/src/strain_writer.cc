// moduli.csv, strain_residuals.csv and the strain fields of results.json.
#include "strain_writer.h"

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

using Json = nlohmann::ordered_json;

Json Number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

bool HasStatistics(const FitResult& r) {
  return r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
}

}  // namespace

void WriteModuliCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "tangent, secant and chord bulk moduli of strain samples (data column eps_v), one row per sample, model, "
      "source and pressure",
      study, meta.started_utc, meta.tool_version,
      {"source = fitted: the fitted strain curve at a band-grid pressure; K_tangent_GPa = K(P) from the fitted "
       "model (the derivative dP/deps of the fitted curve, not a difference of data), with its delta-method "
       "confidence band (K_tangent_lower/upper_GPa at `confidence`, 1-sigma K_tangent_se_GPa); "
       "K_secant_GPa = P / eps_v_fitted (blank at P = 0)",
       "source = fitted-chord: Delta P / Delta eps of the fitted curve between consecutive data pressures; "
       "source = data-chord: Delta P / Delta eps of the measured strain (no model; model blank; repeated "
       "pressures averaged); P_MPa is the chord midpoint, P_from_MPa and P_to_MPa its ends",
       "eps_v is volumetric strain, compression positive, plain (dimensionless); Biot's alpha needs the tangent "
       "modulus, never the secant or chord"});
  out << "sample,model,source,P_MPa,P_from_MPa,P_to_MPa,eps_v_fitted,K_tangent_GPa,K_tangent_se_GPa,"
         "K_tangent_lower_GPa,K_tangent_upper_GPa,confidence,K_secant_GPa,K_chord_GPa,extrapolated\n";
}

void WriteModuliCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  const double G = units::kGPa, M = units::kMPa;
  {
    const Sample& s = ss.sample;
    for (const StrainModulusPoint& p : sr.strain_moduli) {
      out << CsvRow({CsvField(s.id), CsvField(p.model_id), p.source, Num(p.pressure / M), Num(p.pressure_from / M),
                     Num(p.pressure_to / M), Num(p.strain), Num(p.tangent / G), Num(p.tangent_se / G),
                     Num(p.tangent_lower / G), Num(p.tangent_upper / G),
                     p.source == "fitted" ? Num(p.confidence) : std::string(), Num(p.secant / G), Num(p.chord / G),
                     p.source == "fitted" ? (p.extrapolated ? "true" : "false") : std::string()});
    }
  }
}

void WriteStrainResidualsCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "residuals of strain-form fits (strain samples), one row per sample, model and data point", study,
      meta.started_utc, meta.tool_version,
      {"residuals are in volumetric strain (plain, dimensionless; compression positive): residual_eps_v = "
       "observed_eps_v - fitted_eps_v; sigma_eps_v blank when the data carry no uncertainty; "
       "standardized_residual, leverage and robust_weight as in residuals.csv (which lists modulus fits only)"});
  out << "sample,model,point,location,pressure_MPa,observed_eps_v,fitted_eps_v,sigma_eps_v,residual_eps_v,"
         "standardized_residual,leverage,robust_weight\n";
}

void WriteStrainResidualsCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  {
    if (!IsStrainSample(ss)) return;
    const Sample& s = ss.sample;
    const bool weighted = IsWeighted(s);
    for (const FitResult& r : sr.fits) {
      if (!HasStatistics(r)) continue;
      const ResidualDiagnostics& d = r.residuals;
      const std::vector<int> point = detail::ResidualToPoint(r, s);
      for (Eigen::Index k = 0; k < d.x.size(); ++k) {
        const int j = point[static_cast<size_t>(k)];
        auto at = [&](const Eigen::VectorXd& v) { return k < v.size() ? v[k] : std::nan(""); };
        out << CsvRow({CsvField(s.id), CsvField(r.model_id), j >= 0 ? std::to_string(j + 1) : std::string(),
                       j >= 0 ? CsvField(s.points[static_cast<size_t>(j)].where.ToString()) : std::string(),
                       Num(at(d.x) / units::kMPa), Num(at(d.observed)), Num(at(d.fitted)),
                       weighted ? Num(at(d.sigma)) : std::string(), Num(at(d.raw)), Num(at(d.standardized)),
                       Num(at(d.leverage)), Num(at(d.robust_weight))});
      }
    }
  }
}

void WriteModuliCsv(const StudyRun& run, std::ostream& out) {
  WriteModuliCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteModuliCsvRows(run.study.samples[i], run.samples[i], out);
}

void WriteStrainResidualsCsv(const StudyRun& run, std::ostream& out) {
  WriteStrainResidualsCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteStrainResidualsCsvRows(run.study.samples[i], run.samples[i], out);
}

namespace detail {

void AddStrainJson(const StudySample& ss, const SampleRun& sr, Json& js) {
  if (!IsStrainSample(ss)) return;
  const Sample& s = ss.sample;
  const bool weighted = IsWeighted(s);
  js["response"] = "strain";
  Json& data = js["data"];
  for (size_t k = 0; k < data.size() && k < s.points.size(); ++k) {
    data[k]["K_GPa"] = nullptr;
    data[k]["sigma_K_GPa"] = nullptr;
    data[k]["eps_v"] = Number(s.points[k].strain);
    data[k]["sigma_eps_v"] = s.points[k].sigma > 0 ? Number(s.points[k].sigma) : Json(nullptr);
  }
  Json& fits = js["fits"];
  for (size_t k = 0; k < fits.size() && k < sr.fits.size(); ++k) {
    const FitResult& r = sr.fits[k];
    const bool has = HasStatistics(r);
    Json points = Json::array();
    if (has) {
      const ResidualDiagnostics& d = r.residuals;
      const std::vector<int> map = ResidualToPoint(r, s);
      for (Eigen::Index q = 0; q < d.x.size(); ++q) {
        auto at = [&](const Eigen::VectorXd& v) { return q < v.size() ? v[q] : std::nan(""); };
        const int pt = map[static_cast<size_t>(q)];
        points.push_back({{"point", pt >= 0 ? Json(pt + 1) : Json(nullptr)},
                          {"pressure_MPa", Number(at(d.x) / units::kMPa)},
                          {"observed_eps_v", Number(at(d.observed))},
                          {"fitted_eps_v", Number(at(d.fitted))},
                          {"sigma_eps_v", weighted ? Number(at(d.sigma)) : Json(nullptr)},
                          {"residual_eps_v", Number(at(d.raw))},
                          {"standardized_residual", Number(at(d.standardized))},
                          {"leverage", Number(at(d.leverage))},
                          {"robust_weight", Number(at(d.robust_weight))}});
      }
    }
    // The K-named residual fields would mislabel strain: the strain object carries them.
    Json& fj = fits[k];
    if (fj.contains("residuals")) fj["residuals"]["points"] = Json::array();
    if (fj.contains("statistics")) {
      fj["statistics"]["rmse_GPa"] = nullptr;
      if (!weighted) {
        fj["statistics"]["ssr_unit"] = "1 (strain^2)";
        fj["statistics"]["chi2_reduced_unit"] = "1 (strain^2)";
        fj["statistics"]["residual_scale_unit"] = "1 (strain)";
        fj["statistics"]["covariance_variance_factor_unit"] = "1 (strain^2)";
      }
    }
    Json moduli = Json::array();
    for (const StrainModulusPoint& p : sr.strain_moduli) {
      if (p.model_id != r.model_id) continue;
      moduli.push_back({{"source", p.source},
                        {"P_MPa", Number(p.pressure / units::kMPa)},
                        {"P_from_MPa", Number(p.pressure_from / units::kMPa)},
                        {"P_to_MPa", Number(p.pressure_to / units::kMPa)},
                        {"eps_v_fitted", Number(p.strain)},
                        {"K_tangent_GPa", Number(p.tangent / units::kGPa)},
                        {"K_tangent_se_GPa", Number(p.tangent_se / units::kGPa)},
                        {"K_tangent_lower_GPa", Number(p.tangent_lower / units::kGPa)},
                        {"K_tangent_upper_GPa", Number(p.tangent_upper / units::kGPa)},
                        {"K_secant_GPa", Number(p.secant / units::kGPa)},
                        {"K_chord_GPa", Number(p.chord / units::kGPa)},
                        {"extrapolated", p.extrapolated}});
    }
    fj["strain"] = {{"response", "eps_v"},
                    {"note", "fitted in strain form eps_v(P) = integral_0^P dP'/K(P'); the parameters are the "
                             "K-model's; residuals are in volumetric strain (plain, compression positive); the "
                             "tangent K comes from the fitted model"},
                    {"fit_working_unit", "millistrain"},
                    {"residual_unit", "1 (strain)"},
                    {"rmse_strain", has ? Number(r.rmse) : Json(nullptr)},
                    {"confidence", Number(ss.bands.options.confidence)},
                    {"residuals", points},
                    {"moduli", moduli}};
  }
}

}  // namespace detail
}  // namespace porofit
