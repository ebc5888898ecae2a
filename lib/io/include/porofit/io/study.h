#pragma once
// A study as loaded from a study file: samples, the models to fit to each,
// and fit options. SI units throughout.
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "porofit/bands/grid.h"
#include "porofit/bands/options.h"
#include "porofit/compare/comparison.h"
#include "porofit/core/error.h"
#include "porofit/core/sample.h"
#include "porofit/fit/fit_options.h"
#include "porofit/fit/fitter.h"
#include "porofit/io/depth_choice.h"
#include "porofit/poro/minerals.h"
#include "porofit/poro/mixing.h"

namespace porofit {

/// One model to fit to a sample, with the study's parameter settings (SI).
struct ModelChoice {
  std::string model_id;
  std::map<std::string, ParameterSetting> settings;
  SourceLocation where;
};

/// The grain (mineral) bulk modulus K_s of a sample, as the study states it.
/// SI. Written per sample, or once under `grain_moduli:` and named by several
/// samples (then every sample of the group gets the same value and sigma, and
/// their alpha errors are correlated through it).
struct GrainModulusChoice {
  /// false: the sample says `grain_modulus: none` (or, in a study without any
  /// grain modulus, says nothing): no alpha output. Never a default K_s.
  bool given = false;
  std::string group;  ///< name under `grain_moduli:`, "" when written in the sample
  poro::GrainModulus value;  ///< K_s, sigma, averages, bounds, composition
  poro::FractionBasis basis = poro::FractionBasis::kWeight;  ///< mineralogy: basis as written
  std::vector<double> fractions;  ///< mineralogy: fractions as written (same order as value.minerals)
  /// Literature sources of every value used: each mineral's table source, or
  /// the measurement's `source` text.
  std::vector<std::string> sources;
  /// Mineralogy: how each mineral's values were checked against its source,
  /// "quartz: from memory" (poro::MineralCheckValues(), or "not stated"), in
  /// the order of `sources`. Empty for a measured K_s.
  std::vector<std::string> checked;
  SourceLocation where;
};

/// Pore-fluid bulk modulus K_f for the Biot modulus, K_u and Skempton B. SI.
struct FluidModulus {
  double k_f = 0;      ///< Pa, > 0
  double sigma = 0;    ///< 1-sigma, Pa, >= 0
  std::string source;  ///< optional free text (e.g. "brine, 25 C, from memory")
  SourceLocation where;
};

/// Drained static VTI stiffnesses measured at one differential pressure. SI.
struct VtiPoint {
  double pressure = 0;  ///< Pa
  double c11 = 0, c12 = 0, c13 = 0, c33 = 0;  ///< Pa
  SourceLocation where;
};

/// Uncertainty-band settings of one sample (study defaults overlaid with the
/// sample's own, key by key).
struct BandSettings {
  /// Study default: the delta method only (Monte Carlo and bootstrap on request).
  BandSettings() {
    options.monte_carlo = false;
    options.bootstrap = false;
  }
  bands::BandOptions options;  ///< level, methods, draws, replicates, seed
  bands::GridSpec grid;        ///< pressure grid (default: spanning the data)
};

/// A sample together with what to do with it.
struct StudySample {
  Sample sample;
  std::vector<ModelChoice> models;
  FitOptions options;  ///< study defaults overlaid with the sample's own
  GrainModulusChoice grain;            ///< K_s (given = false: no alpha)
  std::optional<FluidModulus> fluid;   ///< K_f, if given
  std::vector<VtiPoint> vti;           ///< VTI stiffnesses, in file order (may be empty)
  /// `vti_stiffness.fit`: a catalogue model id fitted to each of C11, C12,
  /// C13, C33 against pressure (alpha_h, alpha_v are then also evaluated from
  /// the fitted stiffnesses). Empty: the table is used as given only.
  std::string vti_fit_model;
  SourceLocation vti_fit_where;        ///< of the `fit` value (when given)
  BandSettings bands;
  /// Extra columns of a `sample_table` row (name, text as written), in column
  /// order, for grouping and labelling; empty for samples written in YAML.
  std::vector<std::pair<std::string, std::string>> fields;
};

/// Study-level settings of the branch (hysteresis) tests, key `branch_tests`
/// (docs/study-file.md). Used only for plugs with two or more samples.
struct BranchTestSettings {
  double level = 0.95;   ///< level of the F tests joint vs separate, in (0, 1)
  int grid_points = 11;  ///< hysteresis grid: points across the pressure overlap of two branches, in [2, 1000]
  SourceLocation where;  ///< of the `branch_tests` mapping (when given)
};

/// An input file read while loading, for provenance (hashes are computed by
/// the report layer).
struct InputFile {
  std::string path;  ///< as given (relative paths resolved against the study file's folder)
  std::string role;  ///< "study" or "data"
};

/// One `joint_fits:` entry: a model fitted jointly to several samples with
/// some parameters shared (porofit::FitJoint). SI.
struct JointFitChoice {
  std::string name;
  std::string model_id;
  /// Member samples, indices into Study::samples: the explicit `samples:` in
  /// their written order, then the `where:` matches in study order.
  std::vector<size_t> samples;
  std::vector<std::string> shared;                   ///< parameter names, as written
  std::map<std::string, ParameterSetting> settings;  ///< applied to every member
  /// `allow_mixed_branches: true`; mixed_branches says whether the members
  /// really mix loading and unloading (outputs then say so).
  bool allow_mixed_branches = false;
  bool mixed_branches = false;
  SourceLocation where;
};

/// Most samples one study may hold (listed plus sample-table rows): ten times
/// the 100,000-sample batches the streaming run is built for.
inline constexpr size_t kMaxStudySamples = 1000000;

struct Study {
  std::string name;
  std::string description;
  /// `invented: true` at the top level: the study's data are invented (a
  /// demonstration), and every output carries the invented-data notice.
  /// Only this key decides it; the name and description never do.
  bool invented = false;
  std::string path;               ///< the study file
  std::vector<InputFile> inputs;  ///< study file first, then data files in order of use
  std::vector<StudySample> samples;
  BranchTestSettings branch_tests;  ///< settings of the branch tests (defaults when not given)
  /// Joint fits across samples (`joint_fits:`), in file order; run after the per-sample fits.
  std::vector<JointFitChoice> joint_fits;
  /// Alpha-versus-depth tables (`depth_tables:`), in file order; computed after the per-sample fits.
  std::vector<DepthTableChoice> depth_tables;
  /// Minerals the study's `minerals:` section adds to or overrides in
  /// poro::MineralTable::Builtin(), in name order.
  std::vector<poro::Mineral> mineral_overrides;
  /// Model comparison settings (top-level `comparison:`; defaults when absent).
  compare::ComparisonOptions comparison;
  /// Models of the study's own (`user_models:`, formula models), in file
  /// order; samples name them like built-ins. Their ids differ from the
  /// catalogue's. See StudyRegistry() in porofit/run/run.h.
  std::vector<ModelSpec> user_models;
  /// Non-fatal findings of the loader, each "file:line:col: warning: message"
  /// (e.g. Vp/Vs <= sqrt(2), a Poisson ratio <= 0), in file order.
  std::vector<std::string> warnings;
};

}  // namespace porofit
