// Strain samples: fits in strain form and the tangent, secant and chord moduli.
#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <utility>

#include "porofit/bands/bands.h"
#include "porofit/core/error.h"
#include "porofit/models/strain_form.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

FitResult Failed(const std::string& id, FitStatus status, std::string message) {
  FitResult r;
  r.model_id = id;
  r.status = status;
  r.message = std::move(message);
  return r;
}

// Distinct data pressures, ascending, with the mean strain of repeats.
std::vector<std::pair<double, double>> MergedSeries(const Sample& s) {
  std::vector<std::pair<double, double>> pts;
  for (const DataPoint& p : s.points) pts.emplace_back(p.pressure, p.strain);
  std::stable_sort(pts.begin(), pts.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
  std::vector<std::pair<double, double>> out;
  for (size_t i = 0; i < pts.size();) {
    size_t j = i;
    double sum = 0;
    while (j < pts.size() && pts[j].first == pts[i].first) sum += pts[j++].second;
    out.emplace_back(pts[i].first, sum / static_cast<double>(j - i));
    i = j;
  }
  return out;
}

}  // namespace

bool IsStrainSample(const StudySample& sample) {
  return sample.sample.kind == MeasurementKind::kStatic && sample.sample.response == Response::kStrain;
}

FitResult RunOneStrain(const StudySample& sample, const ModelChoice& choice, const ModelSpec& k_model) {
  if (!HasStrainForm(k_model))
    return Failed(choice.model_id, FitStatus::kInvalidRequest,
                  "model '" + k_model.id + "' has no strain form; it cannot be fitted to strain data");
  try {  // as in RunOne: a library defect must not take the study down
    const ModelSpec strain_form = StrainForm(k_model);
    FitResult r = Fit(MakeFitRequest(sample, choice, &strain_form));
    if (r.model_id.empty()) r.model_id = choice.model_id;
    return r;
  } catch (const std::exception& e) {
    return Failed(choice.model_id, FitStatus::kNumericalFailure, std::string("internal error during fit: ") + e.what());
  }
}

std::vector<StrainModulusPoint> RunStrainModuli(const StudySample& sample, const std::vector<FitResult>& fits,
                                                const ModelRegistry& registry) {
  std::vector<StrainModulusPoint> out;
  if (!IsStrainSample(sample) || sample.sample.points.empty()) return out;
  const double level = sample.bands.options.confidence;
  const std::vector<std::pair<double, double>> series = MergedSeries(sample.sample);

  // Data chords: differences of measured strain, labelled as such.
  for (size_t i = 0; i + 1 < series.size(); ++i) {
    StrainModulusPoint c;
    c.source = "data-chord";
    c.pressure_from = series[i].first;
    c.pressure_to = series[i + 1].first;
    c.pressure = 0.5 * (c.pressure_from + c.pressure_to);
    c.chord = (c.pressure_to - c.pressure_from) / (series[i + 1].second - series[i].second);
    c.confidence = level;
    out.push_back(c);
  }

  std::vector<double> data_p;
  for (const DataPoint& p : sample.sample.points) data_p.push_back(p.pressure);
  bands::PressureGrid grid;
  try {
    grid = bands::MakeGrid(sample.bands.grid, data_p);
  } catch (const InputError&) {
    grid = {};  // reported by the bands; the fitted rows are then at the data pressures only
  }
  std::vector<double> at = grid.pressure;
  if (at.empty())
    for (const auto& s : series) at.push_back(s.first);

  for (size_t k = 0; k < fits.size() && k < sample.models.size(); ++k) {
    const FitResult& f = fits[k];
    const ModelSpec* model = registry.Find(sample.models[k].model_id);
    if (model == nullptr || !HasStrainForm(*model) || !f.IsUsable() ||
        f.parameters.size() != model->parameters.size())
      continue;
    std::vector<double> th(model->parameters.size());
    for (size_t j = 0; j < th.size(); ++j) th[j] = f.parameters[j].estimate / model->parameters[j].si_factor;
    const double eps_si = model->x_si_factor / model->y_si_factor;  // plain strain per working unit
    auto strain_at = [&](double p) { return model->strain(th.data(), p / model->x_si_factor) * eps_si; };

    // Tangent K_t = K(P; theta_hat) and its delta-method band.
    const bands::CurveGradient cg = bands::EvaluateCurve(f, *model, at);
    const auto np = static_cast<Eigen::Index>(f.free_index.size());
    const bool have_cov = f.covariance_ok && f.covariance.rows() == np && f.covariance.cols() == np;
    const double q = bands::TwoSidedT(level, f.covariance_scaled && f.dof > 0 ? static_cast<double>(f.dof) : kInf);
    for (size_t i = 0; i < at.size(); ++i) {
      StrainModulusPoint r;
      r.model_id = f.model_id;
      r.source = "fitted";
      r.pressure = at[i];
      r.strain = strain_at(at[i]);
      r.tangent = cg.value[i];
      r.confidence = level;
      if (have_cov) {
        double v = 0;
        for (Eigen::Index a = 0; a < np; ++a)
          for (Eigen::Index b = 0; b < np; ++b)
            v += cg.gradient[i][static_cast<size_t>(a)] * f.covariance(a, b) * cg.gradient[i][static_cast<size_t>(b)];
        r.tangent_se = std::sqrt(std::max(v, 0.0));
        r.tangent_lower = r.tangent - q * r.tangent_se;
        r.tangent_upper = r.tangent + q * r.tangent_se;
      }
      r.secant = at[i] > 0 ? at[i] / r.strain : kNaN;
      r.extrapolated = i < grid.extrapolated.size() && grid.extrapolated[i];
      out.push_back(r);
    }
    // Chords of the fitted curve over the data steps.
    for (size_t i = 0; i + 1 < series.size(); ++i) {
      StrainModulusPoint c;
      c.model_id = f.model_id;
      c.source = "fitted-chord";
      c.pressure_from = series[i].first;
      c.pressure_to = series[i + 1].first;
      c.pressure = 0.5 * (c.pressure_from + c.pressure_to);
      c.chord = (c.pressure_to - c.pressure_from) / (strain_at(c.pressure_to) - strain_at(c.pressure_from));
      c.confidence = level;
      out.push_back(c);
    }
  }
  return out;
}

}  // namespace porofit
