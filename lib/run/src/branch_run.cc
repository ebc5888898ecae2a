#include <algorithm>
#include <cmath>
#include <exception>
#include <map>
#include <sstream>

#include "porofit/bands/bands.h"
#include "porofit/run/branches.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string Quote(const std::string& s) { return "'" + s + "'"; }

std::string Mpa(double pa) {
  std::ostringstream os;
  os.precision(6);
  os << pa / 1e6;
  return os.str();
}

bool SameSetting(const ParameterSetting& a, const ParameterSetting& b) {
  return a.fixed == b.fixed && a.lower == b.lower && a.upper == b.upper && a.start == b.start && a.free == b.free;
}

bool SameSettings(const std::map<std::string, ParameterSetting>& a, const std::map<std::string, ParameterSetting>& b) {
  if (a.size() != b.size()) return false;
  for (auto ia = a.begin(), ib = b.begin(); ia != a.end(); ++ia, ++ib)
    if (ia->first != ib->first || !SameSetting(ia->second, ib->second)) return false;
  return true;
}

// The first choice of `model_id` in a sample's model list, or -1.
int ChoiceIndex(const StudySample& s, const std::string& model_id) {
  for (size_t k = 0; k < s.models.size(); ++k)
    if (s.models[k].model_id == model_id) return static_cast<int>(k);
  return -1;
}

const FitResult* SeparateFit(const std::vector<SampleRun>& fits, size_t i, int k) {
  if (k < 0 || i >= fits.size() || static_cast<size_t>(k) >= fits[i].fits.size()) return nullptr;
  return &fits[i].fits[static_cast<size_t>(k)];
}

double Aic(double rss, int n, int k, bool noise_estimated) {
  if (!(rss >= 0) || !std::isfinite(rss)) return kNaN;
  if (noise_estimated) return rss > 0 ? n * std::log(rss / n) + 2.0 * k : kNaN;
  return rss + 2.0 * k;
}

double Variance(const FitResult& fit, const std::vector<double>& g) {
  double v = 0;
  for (size_t a = 0; a < g.size(); ++a)
    for (size_t b = 0; b < g.size(); ++b)
      v += g[a] * fit.covariance(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b)) * g[b];
  return std::max(v, 0.0);
}

std::pair<double, double> PressureRange(const Sample& s) {
  double lo = INFINITY, hi = -INFINITY;
  for (const DataPoint& p : s.points) lo = std::min(lo, p.pressure), hi = std::max(hi, p.pressure);
  return {lo, hi};
}

// The compared pairs of a set (see BranchSetRun::hysteresis), with labels.
struct Pair {
  size_t a, b;
  std::string label;
  bool loading_unloading;
};

std::vector<Pair> ComparedPairs(const Study& study, const BranchSet& set) {
  std::vector<Pair> out;
  const auto& m = set.members;
  auto sample = [&](size_t i) -> const Sample& { return study.samples[i].sample; };
  for (size_t i = 0; i < m.size(); ++i)
    for (size_t j = 0; j < m.size(); ++j) {
      const Sample &a = sample(m[i]), &b = sample(m[j]);
      if (a.cycle == b.cycle && a.branch == Branch::kLoading && b.branch == Branch::kUnloading)
        out.push_back({m[i], m[j], "unloading - loading, cycle " + std::to_string(a.cycle), true});
    }
  for (Branch br : {Branch::kLoading, Branch::kUnloading}) {
    int first = -1;  // members are ordered by cycle: the first one of this branch is its first cycle
    for (size_t i = 0; i < m.size(); ++i) {
      if (sample(m[i]).branch != br) continue;
      if (first < 0) {
        first = static_cast<int>(i);
        continue;
      }
      const Sample& a = sample(m[static_cast<size_t>(first)]);
      out.push_back({m[static_cast<size_t>(first)], m[i],
                     "cycle " + std::to_string(sample(m[i]).cycle) + " - cycle " + std::to_string(a.cycle) + ", " +
                         std::string(ToString(br)),
                     false});
    }
  }
  if (out.empty() && m.size() == 2)
    out.push_back({m[0], m[1], BranchLabel(sample(m[1])) + " - " + BranchLabel(sample(m[0])), false});
  return out;
}

}  // namespace

std::string BranchLabel(const Sample& s) {
  return std::string(ToString(s.branch)) + ", cycle " + std::to_string(s.cycle);
}

std::vector<BranchSet> FindBranchSets(const Study& study) {
  std::vector<BranchSet> sets;
  for (size_t i = 0; i < study.samples.size(); ++i) {
    const Sample& s = study.samples[i].sample;
    if (s.plug.empty()) continue;
    auto it = std::find_if(sets.begin(), sets.end(),
                           [&](const BranchSet& b) { return b.plug == s.plug && b.kind == s.kind; });
    if (it == sets.end()) {
      sets.push_back({s.plug, s.kind, {}});
      it = sets.end() - 1;
    }
    it->members.push_back(i);
  }
  std::vector<BranchSet> out;
  for (BranchSet& b : sets) {
    if (b.members.size() < 2) continue;
    std::stable_sort(b.members.begin(), b.members.end(), [&](size_t x, size_t y) {
      const Sample &a = study.samples[x].sample, &c = study.samples[y].sample;
      if (a.cycle != c.cycle) return a.cycle < c.cycle;
      return a.branch == Branch::kLoading && c.branch == Branch::kUnloading;
    });
    out.push_back(std::move(b));
  }
  return out;
}

FitResult FitPooled(const Study& study, const std::vector<size_t>& members, const ModelChoice& choice,
                    const ModelSpec& model) {
  FitRequest pooled;
  for (size_t i : members) {
    const FitRequest r = MakeFitRequest(study.samples[i], choice, &model);
    if (pooled.model == nullptr) pooled = r;  // model, settings and the first member's options
    else {
      pooled.data.x.insert(pooled.data.x.end(), r.data.x.begin(), r.data.x.end());
      pooled.data.y.insert(pooled.data.y.end(), r.data.y.begin(), r.data.y.end());
      pooled.data.sigma.insert(pooled.data.sigma.end(), r.data.sigma.begin(), r.data.sigma.end());
    }
  }
  try {  // as in RunOne: a library defect must not take the study down
    FitResult f = Fit(pooled);
    if (f.model_id.empty()) f.model_id = choice.model_id;
    return f;
  } catch (const std::exception& e) {
    FitResult f;
    f.model_id = choice.model_id;
    f.status = FitStatus::kNumericalFailure;
    f.message = std::string("internal error during fit: ") + e.what();
    return f;
  }
}

BranchTest TestBranches(const Study& study, const std::vector<SampleRun>& fits, const std::vector<size_t>& members,
                        const std::string& model_id, const ModelRegistry& registry) {
  BranchTest t;
  t.model_id = model_id;
  t.members = members;
  t.scope = "set";
  auto fail = [&](std::string why) {
    t.reason = std::move(why);
    return t;
  };
  if (members.size() < 2) return fail("fewer than two members");
  const ModelSpec* model = registry.Find(model_id);
  if (model == nullptr) return fail("model " + Quote(model_id) + " is not in the catalogue");
  const StudySample& first = study.samples[members[0]];
  const int k0 = ChoiceIndex(first, model_id);
  if (k0 < 0) return fail("model " + Quote(model_id) + " is not fitted to " + Quote(first.sample.id));
  const ModelChoice& choice = first.models[static_cast<size_t>(k0)];
  t.noise_estimated = first.options.scale_covariance;
  double rss = 0;
  int n = 0, p = 0;
  for (size_t i : members) {
    const StudySample& s = study.samples[i];
    const int k = ChoiceIndex(s, model_id);
    if (k < 0) return fail("model " + Quote(model_id) + " is not fitted to every member (not to " + Quote(s.sample.id) + ")");
    if (!SameSettings(s.models[static_cast<size_t>(k)].settings, choice.settings))
      return fail("parameter settings of " + Quote(model_id) + " differ between " + Quote(first.sample.id) + " and " +
                  Quote(s.sample.id) + ": joint and separate fits would not be nested");
    if (IsWeighted(s.sample) != IsWeighted(first.sample))
      return fail(Quote(first.sample.id) + " and " + Quote(s.sample.id) +
                  " differ in weighting (one gives sigma, the other not)");
    if (s.options.scale_covariance != first.options.scale_covariance)
      return fail(Quote(first.sample.id) + " and " + Quote(s.sample.id) +
                  " differ in whether sigma is absolute (uncertainty.calibrated)");
    if (s.options.loss != RobustLoss::kNone)
      return fail(Quote(s.sample.id) + " uses a robust loss: the F test on residual sums of squares does not apply");
    const FitResult* f = SeparateFit(fits, i, k);
    if (f == nullptr) return fail("no separate fit of " + Quote(s.sample.id));
    if (!f->IsUsable())
      return fail("separate fit of " + Quote(s.sample.id) + " is not usable (" + std::string(ToString(f->status)) +
                  ": " + f->message + ")");
    rss += f->ssr;
    n += f->n;
    p += f->p;
  }
  t.n = n;
  t.p_separate = p;
  t.rss_separate = rss;
  t.joint = FitPooled(study, members, choice, *model);
  if (!t.joint.IsUsable())
    return fail("joint fit failed (" + std::string(ToString(t.joint.status)) + "): " + t.joint.message);
  t.p_joint = t.joint.p;
  t.rss_joint = t.joint.ssr;
  t.f_test = compare::NestedFTest(t.rss_joint, t.p_joint, t.rss_separate, t.p_separate, n, study.branch_tests.level);
  const int extra = t.noise_estimated ? 1 : 0;
  t.k_joint = t.p_joint + extra;
  t.k_separate = t.p_separate + extra;
  t.aicc_joint = Aic(t.rss_joint, n, t.k_joint, t.noise_estimated) + compare::AiccCorrection(n, t.k_joint);
  t.aicc_separate = Aic(t.rss_separate, n, t.k_separate, t.noise_estimated) + compare::AiccCorrection(n, t.k_separate);
  if (!t.f_test.computed) return fail("F test not computed: " + t.f_test.reason);
  t.tested = true;
  t.decision = t.f_test.reject ? "branches differ" : "no evidence of difference";
  return t;
}

Hysteresis CompareBranches(const Study& study, const std::vector<SampleRun>& fits, size_t a, size_t b,
                           const std::string& model_id, const ModelRegistry& registry, int grid_points) {
  Hysteresis h;
  h.model_id = model_id;
  h.a = a;
  h.b = b;
  const Sample &sa = study.samples[a].sample, &sb = study.samples[b].sample;
  h.loading_unloading =
      sa.cycle == sb.cycle && sa.branch == Branch::kLoading && sb.branch == Branch::kUnloading;
  h.pair = BranchLabel(sb) + " - " + BranchLabel(sa);
  auto fail = [&](std::string why) {
    h.reason = std::move(why);
    return h;
  };
  const ModelSpec* model = registry.Find(model_id);
  if (model == nullptr) return fail("model " + Quote(model_id) + " is not in the catalogue");
  const FitResult* fa = SeparateFit(fits, a, ChoiceIndex(study.samples[a], model_id));
  const FitResult* fb = SeparateFit(fits, b, ChoiceIndex(study.samples[b], model_id));
  if (fa == nullptr || fb == nullptr)
    return fail("model " + Quote(model_id) + " is not fitted to both " + Quote(sa.id) + " and " + Quote(sb.id));
  for (const FitResult* f : {fa, fb})
    if (!f->IsUsable())
      return fail("fit of " + Quote(f == fa ? sa.id : sb.id) + " is not usable (" + std::string(ToString(f->status)) +
                  ")");
  const auto [alo, ahi] = PressureRange(sa);
  const auto [blo, bhi] = PressureRange(sb);
  const double lo = std::max(alo, blo), hi = std::min(ahi, bhi);
  if (!(hi > lo))
    return fail("pressure ranges do not overlap (" + Quote(sa.id) + " " + Mpa(alo) + "-" + Mpa(ahi) + " MPa, " +
                Quote(sb.id) + " " + Mpa(blo) + "-" + Mpa(bhi) + " MPa)");
  const int n = std::max(grid_points, 2);
  for (int i = 0; i < n; ++i) h.pressure.push_back(i == n - 1 ? hi : lo + (hi - lo) * i / (n - 1));
  const bands::CurveGradient ca = bands::EvaluateCurve(*fa, *model, h.pressure);
  const bands::CurveGradient cb = bands::EvaluateCurve(*fb, *model, h.pressure);
  const bool with_sigma = fa->covariance_ok && fb->covariance_ok;
  if (!with_sigma) h.note = "no covariance for one of the fits: sigma of dK not computed";
  double best = -1;
  for (size_t i = 0; i < h.pressure.size(); ++i) {
    const double ka = ca.value[i], kb = cb.value[i], d = kb - ka;
    const double s = with_sigma ? std::sqrt(Variance(*fa, ca.gradient[i]) + Variance(*fb, cb.gradient[i])) : kNaN;
    h.k_a.push_back(ka);
    h.k_b.push_back(kb);
    h.dk.push_back(d);
    h.sigma_dk.push_back(s);
    const double rel = d / ka;
    if (std::isfinite(rel) && std::fabs(rel) > best) {
      best = std::fabs(rel);
      h.max_relative = rel;
      h.max_relative_pressure = h.pressure[i];
    }
    if (h.loading_unloading && d + 2 * (std::isfinite(s) ? s : 0.0) < 0) ++h.softer_points;
  }
  h.unexpected_sign = h.softer_points > 0;
  if (h.unexpected_sign) {
    const std::string flag = "unloading softer than loading (beyond 2 sigma) at " + std::to_string(h.softer_points) +
                             " of " + std::to_string(n) + " grid points; unloading is usually stiffer: check the data";
    h.note = h.note.empty() ? flag : h.note + "; " + flag;
  }
  h.computed = true;
  return h;
}

BranchSetRun RunBranchSet(const Study& study, const std::vector<SampleRun>& fits, const BranchSet& set,
                          const ModelRegistry& registry) {
  BranchSetRun out;
  out.set = set;
  std::vector<std::string> models;
  for (size_t i : set.members)
    for (const ModelChoice& c : study.samples[i].models)
      if (std::find(models.begin(), models.end(), c.model_id) == models.end()) models.push_back(c.model_id);
  const std::vector<Pair> pairs = ComparedPairs(study, set);
  for (const std::string& id : models) {
    out.tests.push_back(TestBranches(study, fits, set.members, id, registry));
    if (set.members.size() >= 3) {
      for (const Pair& pr : pairs) {
        BranchTest t = TestBranches(study, fits, {pr.a, pr.b}, id, registry);
        t.scope = "pair";
        out.tests.push_back(std::move(t));
      }
    }
    for (const Pair& pr : pairs) {
      Hysteresis h = CompareBranches(study, fits, pr.a, pr.b, id, registry, study.branch_tests.grid_points);
      h.pair = pr.label;
      out.hysteresis.push_back(std::move(h));
    }
  }
  return out;
}

std::vector<BranchSetRun> RunBranches(const Study& study, const std::vector<SampleRun>& fits,
                                      const ModelRegistry& registry) {
  std::vector<BranchSetRun> out;
  for (const BranchSet& s : FindBranchSets(study)) out.push_back(RunBranchSet(study, fits, s, registry));
  return out;
}

}  // namespace porofit
