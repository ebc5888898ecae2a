#include "porofit/run/run.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <ctime>
#include <exception>
#include <optional>
#include <thread>

#include "porofit/core/error.h"
#include "porofit/models/strain_form.h"
#include "porofit/poro/poroelastic.h"
#include "porofit/version.h"

namespace porofit {

std::string RunOptions::Validate() const {
  if (threads < 1) return "threads = " + std::to_string(threads) + " must be >= 1";
  if (threads > kMaxRunThreads)
    return "threads = " + std::to_string(threads) + " exceeds the limit of " + std::to_string(kMaxRunThreads);
  return {};
}

std::string UtcTimestampNow() {
  const std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm tm{};
  gmtime_r(&now, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
  return buf;
}

namespace {

int CountSigmas(const Sample& s) {
  int k = 0;
  for (const DataPoint& p : s.points) k += p.sigma > 0 ? 1 : 0;
  return k;
}

FitResult FailedResult(const std::string& model_id, FitStatus status, std::string message) {
  FitResult r;
  r.model_id = model_id;
  r.status = status;
  r.message = std::move(message);
  return r;
}

}  // namespace

bool IsWeighted(const Sample& s) {
  return !s.points.empty() && CountSigmas(s) == static_cast<int>(s.points.size());
}

FitRequest MakeFitRequest(const StudySample& sample, const ModelChoice& choice, const ModelSpec* model) {
  FitRequest req;
  req.model = model;
  req.settings = choice.settings;
  req.options = sample.options;
  const Sample& s = sample.sample;
  const bool weighted = IsWeighted(s);
  req.data.x.reserve(s.points.size());
  req.data.y.reserve(s.points.size());
  for (const DataPoint& p : s.points) {
    req.data.x.push_back(p.pressure);
    req.data.y.push_back(s.response == Response::kStrain ? p.strain : p.modulus);
    if (weighted) req.data.sigma.push_back(p.sigma);
  }
  return req;
}

FitResult RunOne(const StudySample& sample, const ModelChoice& choice, const ModelRegistry& registry) {
  const ModelSpec* model = registry.Find(choice.model_id);
  if (model == nullptr) {
    return FailedResult(choice.model_id, FitStatus::kInvalidRequest,
                        "model '" + choice.model_id + "' is not in the catalogue");
  }
  const int with_sigma = CountSigmas(sample.sample);
  const int n = static_cast<int>(sample.sample.points.size());
  if (with_sigma != 0 && with_sigma != n) {
    return FailedResult(choice.model_id, FitStatus::kInvalidRequest,
                        "sigma is given for " + std::to_string(with_sigma) + " of " + std::to_string(n) +
                            " points; give it for all points or none");
  }
  if (IsStrainSample(sample)) return RunOneStrain(sample, choice, *model);
  // Fit() promises not to throw for a failing fit; an exception here would be
  // a library defect, but one sample must not take the whole study down, so it
  // is recorded as this fit's failure and reported.
  try {
    FitResult r = Fit(MakeFitRequest(sample, choice, model));
    if (r.model_id.empty()) r.model_id = choice.model_id;
    return r;
  } catch (const std::exception& e) {
    return FailedResult(choice.model_id, FitStatus::kNumericalFailure,
                        std::string("internal error during fit: ") + e.what());
  }
}

namespace {

// Adds (dX/dK_f sigma_K_f)^2 to a derived delta band, keeping its quantile.
void AddFluidVariance(bands::DerivedBand& b, const std::vector<double>& dx_dkf, double sigma_kf) {
  if (!b.computed) return;
  for (size_t i = 0; i < b.se.size() && i < dx_dkf.size(); ++i) {
    const double c = b.confidence.estimate[i];
    const double half = b.confidence.upper[i] - c;
    const double q = b.se[i] > 0 ? half / b.se[i] : 0.0;
    const double add = dx_dkf[i] * sigma_kf;
    const double se = std::sqrt(b.se[i] * b.se[i] + add * add);
    b.se[i] = se;
    b.confidence.lower[i] = c - q * se;
    b.confidence.upper[i] = c + q * se;
  }
}

bands::BandResult NotComputed(std::string message) {
  bands::BandResult r;
  r.computed = false;
  r.message = std::move(message);
  return r;
}

}  // namespace

bands::BandResult RunBands(const StudySample& sample, const ModelChoice& choice, const FitResult& fit,
                           const ModelRegistry& registry, const SampleProgress& progress) {
  if (!sample.grain.given) return NotComputed("no grain modulus");
  if (fit.status != FitStatus::kConverged)
    return NotComputed("fit status " + std::string(ToString(fit.status)) + ": no bands");
  const ModelSpec* model = registry.Find(choice.model_id);
  // A strain fit is refitted (bootstrap) in strain form but its bands are of K.
  std::optional<ModelSpec> strain_form;
  if (IsStrainSample(sample) && model != nullptr && HasStrainForm(*model)) strain_form = StrainForm(*model);
  const FitRequest request = MakeFitRequest(sample, choice, strain_form ? &*strain_form : model);
  bands::BandRequest br;
  br.fit_request = &request;
  br.fit = &fit;
  if (strain_form) br.curve_model = model;
  br.k_s = sample.grain.value.k_s;
  br.sigma_k_s = sample.grain.value.sigma_k_s;
  br.mu_s = sample.grain.value.mu_s;
  br.porosity = sample.sample.porosity;
  if (sample.fluid) br.fluid_modulus = sample.fluid->k_f;
  br.options = sample.bands.options;
  br.options.threads = 1;  // parallel over samples instead; results do not depend on it
  if (progress) {
    const std::string stage = "bootstrap " + choice.model_id;
    br.bootstrap_progress = [&progress, stage](size_t done, size_t total) { progress(stage, done, total); };
  }
  bands::BandResult out;
  try {
    br.grid = bands::MakeGrid(sample.bands.grid, request.data.x);
    out = bands::ComputeBands(br);
  } catch (const InputError& e) {
    return NotComputed(std::string("bands not computed: ") + e.what());
  }
  if (sample.fluid && sample.fluid->sigma > 0 && out.computed) {
    const double phi = sample.sample.porosity, ks = br.k_s, kf = sample.fluid->k_f;
    std::vector<double> dm(out.k.size()), dku(out.k.size()), db(out.k.size());
    for (size_t i = 0; i < out.k.size(); ++i) {
      // 1/M = (alpha - phi)/K_s + phi/K_f  =>  dM/dK_f = M^2 phi / K_f^2;
      // K_u = K + alpha^2 M; B = alpha M / K_u  =>  dB/dK_f = alpha K dM/dK_f / K_u^2.
      const double a = out.alpha[i];
      const double m = poro::BiotModulus(a, phi, ks, kf);
      const double ku = poro::UndrainedBulkModulus(out.k[i], a, m);
      dm[i] = m * m * phi / (kf * kf);
      dku[i] = a * a * dm[i];
      db[i] = a * out.k[i] * dm[i] / (ku * ku);
    }
    AddFluidVariance(out.biot_modulus, dm, sample.fluid->sigma);
    AddFluidVariance(out.undrained_modulus, dku, sample.fluid->sigma);
    AddFluidVariance(out.skempton, db, sample.fluid->sigma);
    out.notes.push_back("M, K_u and B bands include the fluid-modulus uncertainty (first order)");
  }
  if (sample.sample.kind == MeasurementKind::kDynamic)
    out.notes.push_back("K is a dynamic (ultrasonic) modulus, not the drained static tangent modulus Biot theory "
                        "needs; this alpha is indicative only");
  if (!sample.grain.group.empty())
    out.notes.push_back("K_s is shared by group '" + sample.grain.group +
                        "': alpha errors are correlated across every sample of the group");
  return out;
}

std::vector<VtiAlphaPoint> RunVti(const StudySample& s, const ModelRegistry& registry,
                                  std::vector<VtiStiffnessFit>& fits) {
  fits.clear();
  std::vector<VtiAlphaPoint> out;
  if (!s.grain.given || s.vti.empty()) return out;
  double pmin = INFINITY, pmax = -INFINITY;
  for (const DataPoint& p : s.sample.points) pmin = std::min(pmin, p.pressure), pmax = std::max(pmax, p.pressure);
  const double ks = s.grain.value.k_s, sks = s.grain.value.sigma_k_s;
  auto point = [&](double p, double c11, double c12, double c13, double c33) {
    const poro::AnisotropicBiot a = poro::BiotCoefficientVti({c11, c12, c13, c33}, ks);
    VtiAlphaPoint v;
    v.pressure = p;
    v.c11 = c11, v.c12 = c12, v.c13 = c13, v.c33 = c33;
    v.alpha_h = a.horizontal;
    v.alpha_v = a.vertical;
    v.sigma_h = (1 - a.horizontal) * sks / ks;
    v.sigma_v = (1 - a.vertical) * sks / ks;
    v.extrapolated = p < pmin || p > pmax;
    return v;
  };
  for (const VtiPoint& v : s.vti) out.push_back(point(v.pressure, v.c11, v.c12, v.c13, v.c33));
  if (s.vti_fit_model.empty()) return out;

  const ModelSpec* model = registry.Find(s.vti_fit_model);
  std::vector<double> pressure;
  for (const VtiPoint& v : s.vti) pressure.push_back(v.pressure);
  static const char* const kNames[] = {"C11", "C12", "C13", "C33"};
  bool usable = true;
  for (size_t j = 0; j < 4; ++j) {
    VtiStiffnessFit f;
    f.component = kNames[j];
    if (model == nullptr) {
      f.fit = FailedResult(s.vti_fit_model, FitStatus::kInvalidRequest,
                           "model '" + s.vti_fit_model + "' is not in the catalogue");
    } else {
      FitRequest req;
      req.model = model;
      req.options = s.options;
      req.data.x = pressure;
      for (const VtiPoint& v : s.vti)
        req.data.y.push_back(j == 0 ? v.c11 : j == 1 ? v.c12 : j == 2 ? v.c13 : v.c33);
      try {  // as in RunOne: a library defect must not take the study down
        f.fit = Fit(req);
        if (f.fit.model_id.empty()) f.fit.model_id = s.vti_fit_model;
      } catch (const std::exception& e) {
        f.fit = FailedResult(s.vti_fit_model, FitStatus::kNumericalFailure,
                             std::string("internal error during fit: ") + e.what());
      }
    }
    if (!(f.fit.IsUsable() && f.fit.covariance_ok)) {
      usable = false;
      if (f.fit.IsUsable()) f.fit.message += "; no covariance: fitted VTI alpha not computed";
    }
    fits.push_back(std::move(f));
  }
  if (!usable) return out;
  // The fitted stiffness curves at `at`, as points of `source`. Var C_j(P) =
  // g^T Cov g of fit j (free parameters, SI).
  auto fitted_points = [&](const std::vector<double>& at, const std::string& source) {
    std::vector<bands::CurveGradient> c(4);
    for (size_t j = 0; j < 4; ++j) c[j] = bands::EvaluateCurve(fits[j].fit, *model, at);
    auto variance = [&](size_t j, size_t i) {
      const Eigen::MatrixXd& cov = fits[j].fit.covariance;
      const std::vector<double>& g = c[j].gradient[i];
      double v = 0;
      for (size_t a = 0; a < g.size(); ++a)
        for (size_t b = 0; b < g.size(); ++b)
          v += g[a] * cov(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b)) * g[b];
      return std::max(v, 0.0);
    };
    for (size_t i = 0; i < at.size(); ++i) {
      VtiAlphaPoint v = point(at[i], c[0].value[i], c[1].value[i], c[2].value[i], c[3].value[i]);
      v.source = source;
      const double d = 3 * ks;
      const double var_h = (variance(0, i) + variance(1, i) + variance(2, i)) / (d * d);
      const double var_v = (4 * variance(2, i) + variance(3, i)) / (d * d);
      v.sigma_h_fit = std::sqrt(var_h);
      v.sigma_v_fit = std::sqrt(var_v);
      v.sigma_h = std::sqrt(v.sigma_h * v.sigma_h + var_h);
      v.sigma_v = std::sqrt(v.sigma_v * v.sigma_v + var_v);
      out.push_back(v);
    }
  };
  fitted_points(pressure, "fitted");
  // The sample's band grid (built from its K data as for the alpha bands); a
  // grid that cannot be built is already reported by the bands, so the grid
  // points are then left out.
  std::vector<double> data_p;
  for (const DataPoint& p : s.sample.points) data_p.push_back(p.pressure);
  std::vector<double> grid;
  try {
    if (!data_p.empty()) grid = bands::MakeGrid(s.bands.grid, data_p).pressure;
  } catch (const InputError&) {
    grid.clear();
  }
  if (!grid.empty()) fitted_points(grid, "fitted-grid");
  return out;
}

SampleRun RunSample(const StudySample& s, const ModelRegistry& registry, const compare::ComparisonOptions& comparison,
                    const SampleProgress& progress) {
  SampleRun out;
  out.fits.reserve(s.models.size());
  for (const ModelChoice& c : s.models) out.fits.push_back(RunOne(s, c, registry));
  if (s.grain.given) {
    for (size_t k = 0; k < out.fits.size(); ++k) out.bands.push_back(RunBands(s, s.models[k], out.fits[k], registry, progress));
  }
  out.vti = RunVti(s, registry, out.vti_fits);
  out.strain_moduli = RunStrainModuli(s, out.fits, registry);
  out.comparison = RunComparison(s, out.fits, comparison, registry);
  return out;
}

StudyRun RunStudy(const Study& study, const RunOptions& options) {
  const std::string bad = options.Validate();
  POROFIT_CHECK(bad.empty(), "RunOptions: " + bad);
  auto catalogue = std::make_shared<const ModelRegistry>(StudyRegistry(study, options.registry));
  const ModelRegistry& registry = *catalogue;

  StudyRun run;
  run.study = study;
  run.registry = catalogue;
  run.metadata.started_utc = options.timestamp_utc.empty() ? UtcTimestampNow() : options.timestamp_utc;
  run.metadata.tool_version = kVersion;
  run.metadata.build_type = POROFIT_BUILD_TYPE;
  run.metadata.command_line = options.command_line;
  run.metadata.threads = options.threads;

  const size_t n_samples = study.samples.size();
  run.samples.resize(n_samples);
  const auto t0 = std::chrono::steady_clock::now();

  // Each worker writes only its own slot.
  auto run_sample = [&](size_t i) { run.samples[i] = RunSample(study.samples[i], registry, study.comparison); };

  const size_t workers = std::min<size_t>(static_cast<size_t>(options.threads), n_samples);
  if (workers <= 1) {
    for (size_t i = 0; i < n_samples; ++i) run_sample(i);
  } else {
    std::atomic<size_t> next{0};
    std::vector<std::thread> pool;
    pool.reserve(workers);
    for (size_t w = 0; w < workers; ++w) {
      pool.emplace_back([&] {
        for (size_t i = next.fetch_add(1); i < n_samples; i = next.fetch_add(1)) run_sample(i);
      });
    }
    for (std::thread& t : pool) t.join();
  }
  run.comparison_summary = SummarizeComparisons(run);
  run.branches = RunBranches(study, run.samples, registry);  // after every per-sample fit
  for (const JointFitChoice& j : study.joint_fits) run.joint_fits.push_back(RunJoint(study, j, registry));
  for (const DepthTableChoice& t : study.depth_tables)
    run.depth_tables.push_back(RunDepthTable(study, t, run.samples, registry));
  run.metadata.wall_seconds =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return run;
}

}  // namespace porofit
