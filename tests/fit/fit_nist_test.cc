// NIST StRD nonlinear-regression reference problems through porofit::Fit.
//
// Every file in tests/data/nist is fitted from Start 1 and from Start 2 with
// only those starts (no heuristic, no perturbation) and scored by the log
// relative error LRE = -log10(|estimate - certified| / |certified|):
// estimates >= 6, standard errors >= 4, residual sum of squares >= 6
// (pass criteria of the StRD accuracy studies, tests/data/nist/README.md).
// All certified numbers come from the files themselves: "NIST StRD <name>,
// certified values".
//
// Misra1a and BoxBOD (y = b1 (1 - exp(-b2 x))) run through the built-in
// exp-modulus model with K_0 = 0 (K_inf = b1, P_close = 1/b2), DanWood
// (y = b1 x^b2) through power-ref with P_ref = 1; the others through test-only
// model functors on the same engine.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <functional>
#include <iostream>
#include <limits>
#include <string>
#include <vector>

#include "nist_reader.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace porofit {
namespace {

using testing::NistProblem;
using testing::ReadNist;

double Lre(double estimate, double certified) {
  const double err = certified != 0 ? std::abs(estimate - certified) / std::abs(certified)
                                    : std::abs(estimate - certified);
  if (err == 0) return 15.0;  // exact to every printed digit
  return std::isnan(err) ? 0.0 : -std::log10(err);
}

NistProblem Load(const std::string& name) {
  return ReadNist(std::string(POROFIT_TEST_DATA_DIR) + "/nist/" + name + ".dat", name);
}

// ---- test-only models (NIST notation, b1..bk in order), si_factor 1 throughout.

double Scalar(double v) { return v; }
template <int N>
double Scalar(const ceres::Jet<double, N>& v) { return v.a; }

struct Misra1a { static constexpr int kNumParameters = 2;
  template <typename T> static T Eval(const T* b, const T& x) { using std::exp; return b[0] * (1.0 - exp(-b[1] * x)); } };
struct Misra1b { static constexpr int kNumParameters = 2;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::pow; return b[0] * (1.0 - pow(1.0 + b[1] * x / 2.0, -2.0)); } };
struct Misra1c { static constexpr int kNumParameters = 2;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::pow; return b[0] * (1.0 - pow(1.0 + 2.0 * b[1] * x, -0.5)); } };
struct Misra1d { static constexpr int kNumParameters = 2;
  template <typename T> static T Eval(const T* b, const T& x) { return b[0] * b[1] * x / (1.0 + b[1] * x); } };
struct DanWood { static constexpr int kNumParameters = 2;
  template <typename T> static T Eval(const T* b, const T& x) { using std::pow; return b[0] * pow(x, b[1]); } };
struct Chwirut { static constexpr int kNumParameters = 3;
  template <typename T> static T Eval(const T* b, const T& x) { using std::exp; return exp(-b[0] * x) / (b[1] + b[2] * x); } };
struct Rat42 { static constexpr int kNumParameters = 3;
  template <typename T> static T Eval(const T* b, const T& x) { using std::exp; return b[0] / (1.0 + exp(b[1] - b[2] * x)); } };
struct MGH10 { static constexpr int kNumParameters = 3;
  template <typename T> static T Eval(const T* b, const T& x) { using std::exp; return b[0] * exp(b[1] / (x + b[2])); } };
struct Lanczos3 { static constexpr int kNumParameters = 6;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::exp; return b[0] * exp(-b[1] * x) + b[2] * exp(-b[3] * x) + b[4] * exp(-b[5] * x); } };
struct Hahn1 { static constexpr int kNumParameters = 7;
  template <typename T> static T Eval(const T* b, const T& x) {
    return (b[0] + b[1] * x + b[2] * x * x + b[3] * x * x * x) / (1.0 + b[4] * x + b[5] * x * x + b[6] * x * x * x); } };
struct Kirby2 { static constexpr int kNumParameters = 5;
  template <typename T> static T Eval(const T* b, const T& x) {
    return (b[0] + b[1] * x + b[2] * x * x) / (1.0 + b[3] * x + b[4] * x * x); } };
struct Gauss1 { static constexpr int kNumParameters = 8;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::exp;
    return b[0] * exp(-b[1] * x) + b[2] * exp(-(x - b[3]) * (x - b[3]) / (b[4] * b[4])) +
           b[5] * exp(-(x - b[6]) * (x - b[6]) / (b[7] * b[7])); } };
struct Enso { static constexpr int kNumParameters = 9;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::cos; using std::sin;
    const double pi = 3.14159265358979323846;
    return b[0] + b[1] * cos(2 * pi * x / 12.0) + b[2] * sin(2 * pi * x / 12.0) + b[4] * cos(2 * pi * x / b[3]) +
           b[5] * sin(2 * pi * x / b[3]) + b[7] * cos(2 * pi * x / b[6]) + b[8] * sin(2 * pi * x / b[6]); } };
// Roszman1 with the file's pi and the one-argument arctangent (see tests/data/nist/README.md).
struct Roszman1 { static constexpr int kNumParameters = 4;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::atan;
    const double pi = 3.141592653589793238462643383279;
    return b[0] - b[1] * x - atan(b[2] / (x - b[3])) / pi; } };
// Nelson has two predictors; the engine's x is the row index into this table.
std::vector<double> g_nelson_x1, g_nelson_x2;
struct Nelson { static constexpr int kNumParameters = 3;
  template <typename T> static T Eval(const T* b, const T& x) {
    using std::exp;
    const size_t i = static_cast<size_t>(Scalar(x));
    return b[0] - b[1] * g_nelson_x1[i] * exp(-b[2] * g_nelson_x2[i]); } };

template <class F>
ModelSpec GenericSpec(const std::string& id, std::vector<int> log_parameters = {}) {
  ModelSpec s;
  s.id = id;
  s.name = "NIST " + id;
  s.x_unit = s.y_unit = "1";
  s.x_si_factor = s.y_si_factor = 1.0;
  for (int k = 0; k < F::kNumParameters; ++k) {
    ParameterSpec p;
    p.name = "b" + std::to_string(k + 1);
    p.unit = "1";
    s.parameters.push_back(p);
  }
  for (int k : log_parameters) {
    s.parameters[static_cast<size_t>(k)].transform = ParameterTransform::kLog;
    s.parameters[static_cast<size_t>(k)].lower = 0.0;
  }
  AttachAutodiff<F>(s);
  return s;
}

struct Scores {
  double estimate = 0, std_error = 0, rss = 0;
  std::string report;
};

void PrintScores(const std::string& label, int start, const Scores& s) {
  std::printf("[nist] %-20s start %d  LRE estimates %5.2f  std errors %5.2f  RSS %5.2f\n", label.c_str(), start,
              s.estimate, s.std_error, s.rss);
}

// Fits a NIST problem with a generic spec and returns the minimum LREs.
Scores FitGeneric(const NistProblem& p, const ModelSpec& spec, int start, const FitOptions& options = {}) {
  FitRequest req;
  req.model = &spec;
  if (p.x.size() == 1) {
    req.data.x = p.x[0];
  } else {
    for (size_t i = 0; i < p.y.size(); ++i) req.data.x.push_back(static_cast<double>(i));
  }
  req.data.y = p.y;
  req.options = options;
  req.extra_starts = {start == 1 ? p.start1 : p.start2};
  req.only_extra_starts = true;
  const FitResult r = Fit(req);
  Scores s;
  s.report = r.BriefReport();
  if (r.status != FitStatus::kConverged) return s;
  s.estimate = s.std_error = std::numeric_limits<double>::infinity();
  for (size_t k = 0; k < p.certified.size(); ++k) {
    s.estimate = std::min(s.estimate, Lre(r.parameters[k].estimate, p.certified[k]));
    s.std_error = std::min(s.std_error, Lre(r.parameters[k].std_error, p.certified_sd[k]));
  }
  s.rss = Lre(r.ssr, p.rss);
  return s;
}

struct GenericCase {
  const char* file;
  std::function<ModelSpec()> make;
  bool log_y = false;
};

class NistGeneric : public ::testing::TestWithParam<std::tuple<int, int>> {};

const std::vector<GenericCase>& Cases() {
  static const std::vector<GenericCase> cases = {
      {"Misra1a", [] { return GenericSpec<Misra1a>("Misra1a"); }},
      {"Misra1b", [] { return GenericSpec<Misra1b>("Misra1b"); }},
      {"Misra1c", [] { return GenericSpec<Misra1c>("Misra1c"); }},
      {"Misra1d", [] { return GenericSpec<Misra1d>("Misra1d"); }},
      // BoxBOD runs only through exp-modulus (NistCatalogue below), which solves
      // ln P_close = -ln b2. In b2 or ln b2, Start 1 (b2 = 1) runs onto the
      // b2 -> infinity plateau (SSR 9771.5 against the certified 1168.0; measured).
      {"DanWood", [] { return GenericSpec<DanWood>("DanWood"); }},
      {"Chwirut1", [] { return GenericSpec<Chwirut>("Chwirut1"); }},
      {"Chwirut2", [] { return GenericSpec<Chwirut>("Chwirut2"); }},
      {"Rat42", [] { return GenericSpec<Rat42>("Rat42"); }},
      {"MGH10", [] { return GenericSpec<MGH10>("MGH10"); }},
      {"Lanczos3", [] { return GenericSpec<Lanczos3>("Lanczos3"); }},
      {"Hahn1", [] { return GenericSpec<Hahn1>("Hahn1"); }},
      {"Kirby2", [] { return GenericSpec<Kirby2>("Kirby2"); }},
      {"Gauss1", [] { return GenericSpec<Gauss1>("Gauss1"); }},
      {"ENSO", [] { return GenericSpec<Enso>("ENSO"); }},
      {"Nelson", [] { return GenericSpec<Nelson>("Nelson"); }, true},
      {"Roszman1", [] { return GenericSpec<Roszman1>("Roszman1"); }},
  };
  return cases;
}

// NIST StRD <file>, certified values: estimates, standard deviations and RSS
// are read from the file named by the test parameter.
TEST_P(NistGeneric, MatchesCertifiedValuesFromStart) {
  const auto [index, start] = GetParam();
  const GenericCase& c = Cases()[static_cast<size_t>(index)];
  NistProblem p = Load(c.file);
  if (c.log_y) {
    for (double& y : p.y) y = std::log(y);  // Nelson: the model and its certified RSS are for log(y)
    g_nelson_x1 = p.x[0];
    g_nelson_x2 = p.x[1];
  }
  const ModelSpec spec = c.make();
  const Scores s = FitGeneric(p, spec, start);
  PrintScores(std::string(c.file) + " (generic)", start, s);
  EXPECT_GE(s.estimate, 6.0) << c.file << " start " << start << ": " << s.report;
  EXPECT_GE(s.std_error, 4.0) << c.file << " start " << start << ": " << s.report;
  EXPECT_GE(s.rss, 6.0) << c.file << " start " << start << ": " << s.report;
}

INSTANTIATE_TEST_SUITE_P(AllFiles, NistGeneric,
                         ::testing::Combine(::testing::Range(0, 16), ::testing::Values(1, 2)),
                         [](const ::testing::TestParamInfo<std::tuple<int, int>>& param_info) {
                           return std::string(Cases()[static_cast<size_t>(std::get<0>(param_info.param))].file) +
                                  "_Start" + std::to_string(std::get<1>(param_info.param));
                         });

TEST(NistReader, ReproducesCertifiedRssAtCertifiedParameters) {
  // NIST StRD Misra1a, certified values: the sum of squares at the certified
  // parameters reproduces the certified RSS (README sanity check).
  const NistProblem p = Load("Misra1a");
  double rss = 0;
  for (size_t i = 0; i < p.y.size(); ++i) {
    const double r = p.y[i] - Misra1a::Eval<double>(p.certified.data(), p.x[0][i]);
    rss += r * r;
  }
  EXPECT_GE(Lre(rss, p.rss), 9.0);
  EXPECT_EQ(p.y.size(), 14u);
  EXPECT_EQ(p.certified.size(), 2u);
  EXPECT_DOUBLE_EQ(p.start1[0], 500);
  EXPECT_DOUBLE_EQ(p.start2[1], 0.0005);
}

// ---- catalogue models on NIST data.

const ModelSpec& Catalogue(const char* id) {
  const ModelSpec* m = ModelRegistry::Builtin().Find(id);
  if (m == nullptr) throw std::runtime_error(std::string("no built-in model ") + id);
  return *m;
}

// Misra1a / BoxBOD via exp-modulus: K = K_inf - (K_inf - K_0) exp(-P/P_close)
// with K_0 = 0 is y = b1 (1 - exp(-b2 x)) for K_inf = b1, P_close = 1/b2.
// x is fed as x * 1e6 Pa and y as y * 1e9 Pa, so the working units (MPa, GPa)
// hold the file's numbers unchanged.
Scores FitExpModulus(const NistProblem& p, int start, bool unbounded_first = false) {
  const ModelSpec& m = Catalogue("exp-modulus");
  const int ik = m.ParameterIndex("K_inf"), i0 = m.ParameterIndex("K_0"), ip = m.ParameterIndex("P_close");
  FitRequest req;
  req.model = &m;
  for (size_t i = 0; i < p.y.size(); ++i) {
    req.data.x.push_back(p.x[0][i] * 1e6);
    req.data.y.push_back(p.y[i] * 1e9);
  }
  req.settings["K_0"].fixed = 0.0;
  req.options.unbounded_first = unbounded_first;
  const std::vector<double>& b = start == 1 ? p.start1 : p.start2;
  std::vector<double> theta(m.num_parameters());
  theta[static_cast<size_t>(ik)] = b[0];
  theta[static_cast<size_t>(i0)] = 0.0;
  theta[static_cast<size_t>(ip)] = 1.0 / b[1];
  req.extra_starts = {theta};
  req.only_extra_starts = true;
  const FitResult r = Fit(req);
  Scores s;
  s.report = r.BriefReport();
  if (r.status != FitStatus::kConverged) return s;
  const ParameterResult& k = r.parameters[static_cast<size_t>(ik)];
  const ParameterResult& pc = r.parameters[static_cast<size_t>(ip)];
  EXPECT_EQ(r.parameters[static_cast<size_t>(i0)].std_error, 0.0);
  const double b1 = k.estimate / 1e9, se1 = k.std_error / 1e9;
  const double pc_w = pc.estimate / 1e6, se_pc = pc.std_error / 1e6;
  // b2 = 1/P_close; the linearised covariance maps exactly through d b2 / d P_close = -1/P_close^2.
  const double b2 = 1.0 / pc_w, se2 = se_pc / (pc_w * pc_w);
  s.estimate = std::min(Lre(b1, p.certified[0]), Lre(b2, p.certified[1]));
  s.std_error = std::min(Lre(se1, p.certified_sd[0]), Lre(se2, p.certified_sd[1]));
  s.rss = Lre(r.ssr, p.rss);  // working units GPa^2: the file's y units squared
  return s;
}

// DanWood via power-ref: K = K_ref (P/P_ref)^n with P_ref = 1 MPa is y = b1 x^b2.
// The catalogue bounds n to [0, 1] (rock data); DanWood's exponent is about 3.9,
// so the study-level setting widens it to [0, 10].
Scores FitPowerRef(const NistProblem& p, int start) {
  const ModelSpec& m = Catalogue("power-ref");
  const int ik = m.ParameterIndex("K_ref"), in = m.ParameterIndex("n"), ir = m.ParameterIndex("P_ref");
  FitRequest req;
  req.model = &m;
  for (size_t i = 0; i < p.y.size(); ++i) {
    req.data.x.push_back(p.x[0][i] * 1e6);
    req.data.y.push_back(p.y[i] * 1e9);
  }
  req.settings["P_ref"].fixed = 1e6;
  req.settings["n"].upper = 10.0;
  const std::vector<double>& b = start == 1 ? p.start1 : p.start2;
  std::vector<double> theta(m.num_parameters());
  theta[static_cast<size_t>(ik)] = b[0];
  theta[static_cast<size_t>(in)] = b[1];
  theta[static_cast<size_t>(ir)] = 1.0;
  req.extra_starts = {theta};
  req.only_extra_starts = true;
  const FitResult r = Fit(req);
  Scores s;
  s.report = r.BriefReport();
  if (r.status != FitStatus::kConverged) return s;
  const ParameterResult& k = r.parameters[static_cast<size_t>(ik)];
  const ParameterResult& n = r.parameters[static_cast<size_t>(in)];
  EXPECT_EQ(r.parameters[static_cast<size_t>(ir)].std_error, 0.0);
  s.estimate = std::min(Lre(k.estimate / 1e9, p.certified[0]), Lre(n.estimate, p.certified[1]));
  s.std_error = std::min(Lre(k.std_error / 1e9, p.certified_sd[0]), Lre(n.std_error, p.certified_sd[1]));
  s.rss = Lre(r.ssr, p.rss);
  return s;
}

void ExpectCertified(const char* file, const Scores& s, int start) {
  EXPECT_GE(s.estimate, 6.0) << file << " start " << start << ": " << s.report;
  EXPECT_GE(s.std_error, 4.0) << file << " start " << start << ": " << s.report;
  EXPECT_GE(s.rss, 6.0) << file << " start " << start << ": " << s.report;
}

TEST(NistCatalogue, ExpModulusMatchesMisra1aFromBothStarts) {
  const NistProblem p = Load("Misra1a");  // NIST StRD Misra1a, certified values
  for (int start : {1, 2}) {
    const Scores s = FitExpModulus(p, start);
    PrintScores("Misra1a (exp-modulus)", start, s);
    ExpectCertified("Misra1a", s, start);
  }
}

TEST(NistCatalogue, ExpModulusMatchesBoxBODFromBothStarts) {
  const NistProblem p = Load("BoxBOD");  // NIST StRD BoxBOD, certified values
  for (int start : {1, 2}) {
    const Scores s = FitExpModulus(p, start);
    PrintScores("BoxBOD (exp-modulus)", start, s);
    ExpectCertified("BoxBOD", s, start);
  }
}

// FitOptions::unbounded_first: K_inf >= 0 is the only box, so each start is
// solved unbounded first. BoxBOD Start 1 then converges onto the
// b2 -> infinity plateau (rank-deficient Jacobian) and must be re-solved with
// the box by the rule; certified values from both starts either way.
TEST(NistCatalogue, UnboundedFirstStillMatchesMisra1aAndBoxBODFromBothStarts) {
  for (const char* file : {"Misra1a", "BoxBOD"}) {
    const NistProblem p = Load(file);  // NIST StRD Misra1a / BoxBOD, certified values
    for (int start : {1, 2}) {
      const Scores s = FitExpModulus(p, start, true);
      PrintScores(std::string(file) + " (unbounded first)", start, s);
      ExpectCertified(file, s, start);
    }
  }
}

TEST(NistCatalogue, PowerRefMatchesDanWoodFromBothStarts) {
  const NistProblem p = Load("DanWood");  // NIST StRD DanWood, certified values
  for (int start : {1, 2}) {
    const Scores s = FitPowerRef(p, start);
    PrintScores("DanWood (power-ref)", start, s);
    ExpectCertified("DanWood", s, start);
  }
}

}  // namespace
}  // namespace porofit
