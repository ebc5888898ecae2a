#include <cmath>

#include "branch_writer.h"
#include "comparison_writer.h"
#include "format.h"
#include "strain_writer.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"
#include "user_models_report.h"
#include "porofit/report/stream.h"

namespace porofit {
namespace {

using Json = nlohmann::ordered_json;

// nlohmann dumps non-finite doubles as null; spelling it out keeps the rule
// visible and covers values stored before dumping.
Json Number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

bool HasStatistics(const FitResult& r) {
  return r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
}

Json OptionsJson(const FitOptions& o) {
  Json j;
  j["loss"] = std::string(ToString(o.loss));
  j["loss_scale_sigma"] = Number(o.loss_scale);
  j["multistart"] = o.multistart;
  j["start_spread"] = Number(o.start_spread);
  j["seed"] = o.seed;
  j["max_iterations"] = o.max_iterations;
  j["function_tolerance"] = Number(o.function_tolerance);
  j["gradient_tolerance"] = Number(o.gradient_tolerance);
  j["parameter_tolerance"] = Number(o.parameter_tolerance);
  j["covariance"] = o.covariance;
  j["scale_covariance"] = o.scale_covariance;
  j["min_reciprocal_condition"] = Number(o.min_reciprocal_condition);
  j["correlation_threshold"] = Number(o.correlation_threshold);
  j["closure_range_factor"] = Number(o.closure_range_factor);
  j["unit"] = "1 (all dimensionless; loss_scale in multiples of sigma)";
  return j;
}

// Working-unit factor of a parameter, from the fit result or the catalogue.
double ParameterFactor(const FitResult& r, const ModelSpec* spec, const std::string& name, std::string* unit) {
  for (const ParameterResult& p : r.parameters) {
    if (p.name == name) {
      *unit = p.unit;
      return p.si_factor;
    }
  }
  if (spec != nullptr) {
    const int k = spec->ParameterIndex(name);
    if (k >= 0) {
      *unit = spec->parameters[static_cast<size_t>(k)].unit;
      return spec->parameters[static_cast<size_t>(k)].si_factor;
    }
  }
  *unit = "SI";
  return 1.0;
}

Json SettingsJson(const ModelChoice& c, const FitResult& r, const ModelSpec* spec) {
  Json j = Json::object();
  for (const auto& [name, s] : c.settings) {
    std::string unit;
    const double f = ParameterFactor(r, spec, name, &unit);
    Json e;
    e["unit"] = unit;
    if (s.fixed) e["fixed"] = Number(*s.fixed / f);
    if (s.lower) e["lower"] = Number(*s.lower / f);
    if (s.upper) e["upper"] = Number(*s.upper / f);
    if (s.start) e["start"] = Number(*s.start / f);
    if (s.free) e["free"] = true;
    j[name] = e;
  }
  return j;
}

Json DataJson(const Sample& s) {
  Json arr = Json::array();
  for (size_t i = 0; i < s.points.size(); ++i) {
    const DataPoint& p = s.points[i];
    Json d;
    d["point"] = i + 1;
    d["location"] = p.where.ToString();
    d["confining_MPa"] = Number(p.confining / units::kMPa);
    d["pore_MPa"] = Number(p.pore / units::kMPa);
    d["pressure_MPa"] = Number(p.pressure / units::kMPa);
    d["K_GPa"] = Number(p.modulus / units::kGPa);
    d["sigma_K_GPa"] = p.sigma > 0 ? Number(p.sigma / units::kGPa) : Json(nullptr);
    if (p.waves) {
      const WaveData& w = *p.waves;
      d["waves"] = {{"vp_m_per_s", Number(w.vp)},           {"vs_m_per_s", Number(w.vs)},
                    {"density_kg_per_m3", Number(w.rho)},    {"sigma_vp_m_per_s", Number(w.sigma_vp)},
                    {"sigma_vs_m_per_s", Number(w.sigma_vs)}, {"sigma_density_kg_per_m3", Number(w.sigma_rho)}};
    }
    if (p.dynamic) {
      const DynamicModuli& m = *p.dynamic;
      d["dynamic"] = {{"K_GPa", Number(m.bulk / units::kGPa)},
                      {"shear_GPa", Number(m.shear / units::kGPa)},
                      {"poisson_ratio", Number(m.poisson)},
                      {"sigma_K_GPa", Number(m.sigma_bulk / units::kGPa)},
                      {"sigma_shear_GPa", Number(m.sigma_shear / units::kGPa)},
                      {"vp_vs_ratio", Number(m.vp_vs)},
                      {"negative_bulk", m.negative_bulk},
                      {"negative_poisson", m.negative_poisson}};
    }
    arr.push_back(d);
  }
  return arr;
}

Json MatrixJson(const Eigen::MatrixXd& m, const std::vector<double>& scale) {
  Json rows = Json::array();
  for (Eigen::Index i = 0; i < m.rows(); ++i) {
    Json row = Json::array();
    for (Eigen::Index j = 0; j < m.cols(); ++j) {
      const double s = scale.empty() ? 1.0 : scale[static_cast<size_t>(i)] * scale[static_cast<size_t>(j)];
      row.push_back(Number(m(i, j) / s));
    }
    rows.push_back(row);
  }
  return rows;
}

Json FitJson(const StudySample& ss, const ModelChoice& choice, const FitResult& r, const ModelRegistry& registry) {
  const ModelSpec* spec = registry.Find(r.model_id);
  const bool has = HasStatistics(r);
  const bool weighted = IsWeighted(ss.sample);
  Json j;
  j["model"] = r.model_id;
  if (spec) {
    j["model_name"] = spec->name;
    j["formula"] = spec->formula;
    j["reference"] = spec->reference;
    j["x"] = {{"symbol", spec->x_symbol}, {"unit", spec->x_unit}, {"si_factor", spec->x_si_factor}};
    j["y"] = {{"symbol", spec->y_symbol}, {"unit", spec->y_unit}, {"si_factor", spec->y_si_factor}};
  }
  j["status"] = std::string(ToString(r.status));
  j["converged"] = r.status == FitStatus::kConverged;
  j["message"] = r.message;
  j["iterations"] = r.iterations;
  j["starts_tried"] = r.starts_tried;
  j["starts_converged"] = r.starts_converged;
  j["settings"] = SettingsJson(choice, r, spec);
  if (choice.where.known()) j["requested_at"] = choice.where.ToString();

  Json params = Json::array();
  for (const ParameterResult& p : r.parameters) {
    const double f = p.si_factor;
    const double est = has ? p.estimate / f : std::nan("");
    const double se = has ? p.std_error / f : std::nan("");
    Json e;
    e["name"] = p.name;
    e["unit"] = p.unit;
    e["si_factor"] = Number(f);
    e["estimate"] = Number(est);
    e["std_error"] = Number(se);
    e["rel_std_error_percent"] = Number(detail::RelativeErrorPercent(est, se));
    e["start"] = Number(p.start / f);
    e["lower"] = Number(p.lower / f);
    e["upper"] = Number(p.upper / f);
    e["fixed"] = p.fixed;
    e["at_lower"] = p.at_lower;
    e["at_upper"] = p.at_upper;
    params.push_back(e);
  }
  j["parameters"] = params;

  // Covariance and correlation over the free parameters, in working units.
  Json names = Json::array(), punits = Json::array();
  std::vector<double> scale;
  for (int k : r.free_index) {
    if (k < 0 || k >= static_cast<int>(r.parameters.size())) continue;
    const ParameterResult& p = r.parameters[static_cast<size_t>(k)];
    names.push_back(p.name);
    punits.push_back(p.unit);
    scale.push_back(p.si_factor);
  }
  const bool cov_shape_ok = r.covariance.rows() == static_cast<Eigen::Index>(scale.size()) &&
                            r.covariance.cols() == static_cast<Eigen::Index>(scale.size());
  j["covariance"] = {{"available", r.covariance_ok && has && cov_shape_ok},
                     {"method", r.covariance_method},
                     {"scaled_by_residual_variance", r.covariance_scaled},
                     {"parameters", names},
                     {"units", punits},
                     {"entry_unit", "units[i]*units[j]"},
                     {"matrix", cov_shape_ok && has ? MatrixJson(r.covariance, scale) : Json::array()}};
  const bool corr_shape_ok = r.correlation.rows() == static_cast<Eigen::Index>(scale.size()) &&
                             r.correlation.cols() == static_cast<Eigen::Index>(scale.size());
  j["correlation"] = {{"parameters", names},
                      {"unit", "1"},
                      {"matrix", corr_shape_ok && has ? MatrixJson(r.correlation, {}) : Json::array()}};

  auto stat = [&](double v) { return has ? Number(v) : Json(nullptr); };
  j["statistics"] = {{"n", r.n},
                     {"p", r.p},
                     {"dof", r.dof},
                     {"ssr", stat(r.ssr)},
                     {"ssr_unit", weighted ? "1" : "GPa^2"},
                     {"chi2_reduced", stat(r.chi2_reduced)},
                     {"chi2_reduced_unit", weighted ? "1" : "GPa^2"},
                     {"chi2_reduced_robust", stat(r.chi2_reduced_robust)},
                     {"residual_scale", stat(r.residual_scale)},
                     {"residual_scale_unit", weighted ? "1 (sigma units)" : "GPa"},
                     {"covariance_variance_factor", stat(r.variance_factor)},
                     {"covariance_variance_factor_unit", weighted ? "1" : "GPa^2"},
                     {"rmse_GPa", stat(r.rmse / units::kGPa)},
                     {"r_squared", stat(r.r_squared)},
                     {"aic", stat(r.aic)},
                     {"aicc", stat(r.aicc)},
                     {"bic", stat(r.bic)},
                     {"max_abs_correlation", has && r.covariance_ok ? Number(r.max_abs_correlation) : Json(nullptr)},
                     {"unit", "1 unless named"}};
  j["flags"] = {{"rank_deficient", r.rank_deficient},
                {"high_correlation", r.high_correlation},
                {"closure_outside_range", r.closure_outside_range},
                {"list", detail::FitFlags(r, ss.options)}};
  j["warnings"] = r.warnings;

  const ResidualDiagnostics& d = r.residuals;
  Json res;
  Json points = Json::array();
  if (has) {
    const std::vector<int> map = detail::ResidualToPoint(r, ss.sample);
    for (Eigen::Index k = 0; k < d.x.size(); ++k) {
      auto at = [&](const Eigen::VectorXd& v) { return k < v.size() ? v[k] : std::nan(""); };
      const int pt = map[static_cast<size_t>(k)];
      points.push_back({{"point", pt >= 0 ? Json(pt + 1) : Json(nullptr)},
                        {"pressure_MPa", Number(at(d.x) / units::kMPa)},
                        {"observed_K_GPa", Number(at(d.observed) / units::kGPa)},
                        {"fitted_K_GPa", Number(at(d.fitted) / units::kGPa)},
                        {"sigma_K_GPa", weighted ? Number(at(d.sigma) / units::kGPa) : Json(nullptr)},
                        {"residual_GPa", Number(at(d.raw) / units::kGPa)},
                        {"standardized_residual", Number(at(d.standardized))},
                        {"leverage", Number(at(d.leverage))},
                        {"robust_weight", Number(at(d.robust_weight))}});
    }
  }
  res["points"] = points;
  res["runs_test"] = {{"runs", has ? Json(d.runs) : Json(nullptr)},
                      {"n_positive", has ? Json(d.n_positive) : Json(nullptr)},
                      {"n_negative", has ? Json(d.n_negative) : Json(nullptr)},
                      {"z", stat(d.runs_z)},
                      {"p_value", stat(d.runs_p)},
                      {"unit", "1"},
                      {"note", "Wald-Wolfowitz runs test on residual signs; normal approximation, weak when n < 10"}};
  res["durbin_watson"] = stat(d.durbin_watson);
  j["residuals"] = res;
  return j;
}

Json Vec(const std::vector<double>& v, double scale) {
  Json a = Json::array();
  for (double x : v) a.push_back(Number(x / scale));
  return a;
}

Json BandJson(const bands::Band& b, double scale) {
  return {{"estimate", Vec(b.estimate, scale)}, {"lower", Vec(b.lower, scale)}, {"upper", Vec(b.upper, scale)}};
}

Json GrainJson(const StudySample& ss, const std::vector<std::string>& shared_with) {
  const GrainModulusChoice& g = ss.grain;
  Json j;
  if (!g.given) {
    j["method"] = "none";
    j["note"] = "no grain modulus: alpha not computed for this sample";
    return j;
  }
  const poro::GrainModulus& v = g.value;
  const double G = units::kGPa;
  j["method"] = std::string(poro::ToString(v.method));
  j["group"] = g.group.empty() ? Json(nullptr) : Json(g.group);
  j["shared_with"] = shared_with;
  if (g.where.known()) j["given_at"] = g.where.ToString();
  j["unit"] = "GPa unless named";
  j["K_s"] = Number(v.k_s / G);
  j["sigma_K_s"] = Number(v.sigma_k_s / G);
  j["mu_s"] = Number(v.mu_s / G);
  j["sigma_mu_s"] = Number(v.sigma_mu_s / G);
  if (v.method == poro::GrainModulusMethod::kMineralogy) {
    j["K"] = {{"voigt", Number(v.k_voigt / G)},       {"reuss", Number(v.k_reuss / G)},
              {"hill", Number(v.k_hill / G)},         {"hs_lower", Number(v.k_hs_lower / G)},
              {"hs_upper", Number(v.k_hs_upper / G)}, {"sigma_spread", Number(v.sigma_k_s_spread / G)},
              {"sigma_table", Number(v.sigma_k_s_table / G)}};
    j["mu"] = {{"voigt", Number(v.mu_voigt / G)},       {"reuss", Number(v.mu_reuss / G)},
               {"hill", Number(v.mu_hill / G)},         {"hs_lower", Number(v.mu_hs_lower / G)},
               {"hs_upper", Number(v.mu_hs_upper / G)}, {"sigma_spread", Number(v.sigma_mu_s_spread / G)},
               {"sigma_table", Number(v.sigma_mu_s_table / G)}};
    j["basis"] = std::string(poro::ToString(g.basis));
    Json comp = Json::array();
    for (size_t k = 0; k < v.minerals.size(); ++k)
      comp.push_back({{"mineral", v.minerals[k]},
                      {"fraction_as_given", Number(k < g.fractions.size() ? g.fractions[k] : std::nan(""))},
                      {"volume_fraction", Number(k < v.volume_fractions.size() ? v.volume_fractions[k] : std::nan(""))}});
    j["composition"] = comp;
    j["clay_volume_fraction"] = Number(v.clay_volume_fraction);
    j["central_value"] = "Hill average; sigma^2 = sigma_spread^2 + sigma_table^2, sigma_spread = (V - R)/(2 sqrt 3)";
  }
  j["sources"] = g.sources;
  if (v.method == poro::GrainModulusMethod::kMineralogy) j["checked"] = g.checked;
  return j;
}

Json AlphaJson(const bands::BandResult& b) {
  Json j;
  j["computed"] = b.computed;
  j["message"] = b.message;
  if (!b.computed) return j;
  const double G = units::kGPa;
  j["confidence"] = Number(b.confidence);
  j["pressure_MPa"] = Vec(b.grid.pressure, units::kMPa);
  j["data_range_MPa"] = {Number(b.grid.data_min / units::kMPa), Number(b.grid.data_max / units::kMPa)};
  j["K_GPa"] = Vec(b.k, G);
  j["alpha"] = Vec(b.alpha, 1);
  Json flags = Json::array();
  for (const auto& f : b.flags) flags.push_back(detail::PointFlagNames(f));
  j["flags"] = flags;
  const bands::DeltaResult& d = b.delta;
  Json dj = {{"computed", d.computed}, {"message", d.message}};
  if (d.computed) {
    dj["quantile_rule"] = std::string(bands::ToString(d.quantile_rule));
    dj["K_se_GPa"] = Vec(d.k_se, G);
    dj["alpha_se"] = Vec(d.alpha_se, 1);
    dj["ks_variance_share"] = Vec(d.grain_share, 1);
    dj["alpha_dof"] = Vec(d.alpha_dof, 1);
    dj["K_confidence_GPa"] = BandJson(d.k_confidence, G);
    dj["alpha_confidence"] = BandJson(d.alpha_confidence, 1);
    dj["K_prediction_GPa"] = BandJson(d.k_prediction, G);
    dj["alpha_prediction"] = BandJson(d.alpha_prediction, 1);
    dj["K_simultaneous_GPa"] = BandJson(d.k_simultaneous, G);
    dj["alpha_simultaneous"] = BandJson(d.alpha_simultaneous, 1);
  }
  j["delta"] = dj;
  const bands::MonteCarloResult& m = b.monte_carlo;
  Json mj = {{"computed", m.computed}, {"message", m.message}};
  if (m.computed || m.draws > 0) {
    mj["distribution"] = std::string(bands::ToString(m.distribution));
    mj["draws"] = m.draws;
    mj["accepted"] = m.accepted;
    mj["rejected"] = {{"grain", m.rejected_grain}, {"bounds", m.rejected_bounds}, {"curve", m.rejected_curve}};
    mj["K_GPa"] = BandJson(m.k, G);
    mj["alpha"] = BandJson(m.alpha, 1);
  }
  j["monte_carlo"] = mj;
  const bands::BootstrapResult& t = b.bootstrap;
  Json tj = {{"computed", t.computed}, {"message", t.message}};
  if (t.computed || t.replicates > 0) {
    tj["kind"] = std::string(bands::ToString(t.kind));
    tj["replicates"] = t.replicates;
    tj["succeeded"] = t.succeeded;
    tj["failed"] = {{"status", t.failed_status}, {"curve", t.failed_curve}};
    tj["K_GPa"] = BandJson(t.k, G);
    tj["alpha"] = BandJson(t.alpha, 1);
  }
  j["bootstrap"] = tj;
  Json derived = Json::object();
  for (const bands::DerivedBand* x : {&b.biot_modulus, &b.undrained_modulus, &b.skempton}) {
    const double scale = x->unit == "Pa" ? G : 1.0;
    Json e = {{"computed", x->computed}, {"message", x->message}, {"unit", x->unit == "Pa" ? "GPa" : "1"}};
    if (x->computed) {
      e["se"] = Vec(x->se, scale);
      e["confidence"] = BandJson(x->confidence, scale);
    }
    derived[x->name] = e;
  }
  j["derived"] = derived;
  j["notes"] = b.notes;
  return j;
}

}  // namespace

Json ResultsJsonHead(const Study& study, const RunMetadata& metadata, const std::vector<InputDigest>& inputs) {
  const RunMetadata& m = metadata;
  Json j;
  j["caution"] = CautionText();
  if (IsInventedStudy(study)) j["invented_data"] = InventedNotice(study);
  j["schema"] = "porofit-results";
  j["schema_version"] = kResultsSchemaVersion;

  Json prov;
  prov["tool"] = "porofit";
  prov["tool_version"] = m.tool_version;
  prov["build_type"] = m.build_type;
  prov["started_utc"] = m.started_utc;
  prov["command_line"] = m.command_line;
  prov["threads"] = m.threads;
  Json files = Json::array();
  for (const InputDigest& f : inputs) {
    files.push_back({{"path", f.path}, {"role", f.role}, {"sha256", f.sha256}, {"size_bytes", f.size_bytes}});
  }
  prov["input_files"] = files;
  prov["loader_warnings"] = study.warnings;
  j["provenance"] = prov;

  j["study"] = {{"name", study.name}, {"description", study.description}, {"path", study.path}};
  if (!study.user_models.empty()) j["user_models"] = detail::UserModelsJson(study);
  return j;
}

Json SampleResultsJson(const StudySample& ss, const SampleRun* sr, const std::vector<std::string>& shared_with,
                       const ReportOptions& options) {
  const ModelRegistry& registry = options.registry ? *options.registry : ModelRegistry::Builtin();
  {
    const Sample& s = ss.sample;
    Json js;
    js["id"] = s.id;
    js["lithology"] = s.lithology;
    js["location"] = s.where.ToString();
    js["porosity_fraction"] = Number(s.porosity);
    js["bulk_density_kg_per_m3"] = Number(s.bulk_density);
    js["orientation"] = std::string(ToString(s.orientation));
    js["kind"] = std::string(ToString(s.kind));
    js["branch"] = std::string(ToString(s.branch));
    js["cycle"] = s.cycle;
    js["effective_pressure_coefficient"] = Number(s.effective_pressure_coefficient);
    js["sigma_absolute"] = s.sigma_absolute;
    js["weighted"] = IsWeighted(s);
    if (!ss.fields.empty()) {  // extra sample_table columns, only for batch samples
      Json fields = Json::object();
      for (const auto& [name, value] : ss.fields) fields[name] = value;
      js["fields"] = fields;
    }
    js["options"] = OptionsJson(ss.options);
    js["data"] = DataJson(s);
    Json fits = Json::array();
    if (sr != nullptr) {
      const auto& results = sr->fits;
      for (size_t k = 0; k < results.size() && k < ss.models.size(); ++k) {
        Json fj = FitJson(ss, ss.models[k], results[k], registry);
        if (k < sr->bands.size()) fj["alpha"] = AlphaJson(sr->bands[k]);
        fits.push_back(fj);
      }
    }
    js["fits"] = fits;
    if (sr != nullptr) detail::AddStrainJson(ss, *sr, js);  // strain samples: units of data, residuals, moduli
    js["grain_modulus"] = GrainJson(ss, shared_with);
    if (ss.fluid) {
      js["fluid_modulus"] = {{"K_f_GPa", Number(ss.fluid->k_f / units::kGPa)},
                             {"sigma_GPa", Number(ss.fluid->sigma / units::kGPa)},
                             {"source", ss.fluid->source}};
    } else {
      js["fluid_modulus"] = nullptr;
    }
    if (ss.grain.given) {
      const bands::BandOptions& bo = ss.bands.options;
      Json methods = Json::array();
      if (bo.delta) methods.push_back("delta");
      if (bo.monte_carlo) methods.push_back("monte-carlo");
      if (bo.bootstrap) methods.push_back("bootstrap");
      js["band_settings"] = {{"confidence", Number(bo.confidence)},
                             {"methods", methods},
                             {"monte_carlo_draws", bo.monte_carlo_draws},
                             {"bootstrap_replicates", bo.bootstrap_replicates},
                             {"bootstrap_kind", std::string(bands::ToString(bo.bootstrap_kind))},
                             {"seed", bo.seed}};
    }
    Json vti = Json::array();
    if (sr != nullptr) {
      for (const VtiAlphaPoint& a : sr->vti)
        vti.push_back({{"pressure_MPa", Number(a.pressure / units::kMPa)},
                       {"alpha_h", Number(a.alpha_h)},
                       {"sigma_alpha_h", Number(a.sigma_h)},
                       {"alpha_v", Number(a.alpha_v)},
                       {"sigma_alpha_v", Number(a.sigma_v)},
                       {"sigma_alpha_h_fit", Number(a.sigma_h_fit)},
                       {"sigma_alpha_v_fit", Number(a.sigma_v_fit)},
                       {"extrapolated", a.extrapolated},
                       {"source", a.source}});
    }
    js["vti_alpha"] = vti;
    if (!ss.vti_fit_model.empty()) {
      Json stiffness_fits = Json::array();
      if (sr != nullptr) {
        for (const VtiStiffnessFit& f : sr->vti_fits) {
          Json params = Json::array();
          for (const ParameterResult& p : f.fit.parameters)
            params.push_back({{"name", p.name}, {"estimate_si", Number(p.estimate)}, {"std_error_si", Number(p.std_error)}});
          stiffness_fits.push_back({{"component", f.component},
                          {"status", std::string(ToString(f.fit.status))},
                          {"message", f.fit.message},
                          {"covariance_ok", f.fit.covariance_ok},
                          {"rmse_GPa", Number(f.fit.rmse / units::kGPa)},
                          {"parameters", params}});
        }
      }
      js["vti_fit"] = {{"model", ss.vti_fit_model}, {"stiffness_fits", stiffness_fits}};
    }
    if (sr != nullptr) js["comparison"] = detail::SampleComparisonJson(sr->comparison);
    return js;
  }
}

void AddResultsJsonTail(const StudyRun& run, Json& j) {
  const Study& study = run.study;
  j["comparison_summary"] = detail::ComparisonSummaryJson(run);
  Json overrides = Json::array();
  for (const poro::Mineral& m : study.mineral_overrides)
    overrides.push_back({{"name", m.name},
                         {"bulk_GPa", Number(m.bulk / units::kGPa)},
                         {"shear_GPa", Number(m.shear / units::kGPa)},
                         {"density_kg_per_m3", Number(m.density)},
                         {"sigma_bulk_GPa", Number(m.sigma_bulk / units::kGPa)},
                         {"sigma_shear_GPa", Number(m.sigma_shear / units::kGPa)},
                         {"clay", m.clay},
                         {"source", m.source},
                         {"checked", m.checked.empty() ? Json(nullptr) : Json(m.checked)},
                         {"location", m.where.ToString()}});
  j["mineral_overrides"] = overrides;
  j["alpha_notes"] = {detail::CorrelationCaveat()};
  j["branches"] = detail::BranchesJson(run);
  j["joint_fits"] = JointFitsJson(run);
  j["depth_tables"] = DepthTablesJson(run);
}

Json ResultsJson(const StudyRun& run, const std::vector<InputDigest>& inputs, const ReportOptions& options) {
  ReportOptions with_catalogue = options;  // the run's catalogue knows the study's user models
  if (with_catalogue.registry == nullptr && run.registry) with_catalogue.registry = run.registry.get();
  Json j = ResultsJsonHead(run.study, run.metadata, inputs);
  Json samples = Json::array();
  for (size_t i = 0; i < run.study.samples.size(); ++i)
    samples.push_back(SampleResultsJson(run.study.samples[i], i < run.samples.size() ? &run.samples[i] : nullptr,
                                        detail::SharedWith(run.study, i), with_catalogue));
  j["samples"] = samples;
  AddResultsJsonTail(run, j);
  return j;
}

void WriteResultsJson(const StudyRun& run, const std::vector<InputDigest>& inputs, std::ostream& out,
                      const ReportOptions& options) {
  out << ResultsJson(run, inputs, options).dump(2, ' ', false, nlohmann::ordered_json::error_handler_t::replace) << "\n";
}

}  // namespace porofit
