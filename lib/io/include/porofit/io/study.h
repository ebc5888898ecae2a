#pragma once
// A study as loaded from a study file: samples, the models to fit to each,
// and fit options. SI units throughout.
#include <map>
#include <string>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/core/sample.h"
#include "porofit/fit/fit_options.h"
#include "porofit/fit/fitter.h"

namespace porofit {

/// One model to fit to a sample, with the study's parameter settings (SI).
struct ModelChoice {
  std::string model_id;
  std::map<std::string, ParameterSetting> settings;
  SourceLocation where;
};

/// A sample together with what to do with it.
struct StudySample {
  Sample sample;
  std::vector<ModelChoice> models;
  FitOptions options;  ///< study defaults overlaid with the sample's own
};

/// An input file read while loading, for provenance (hashes are computed by
/// the report layer).
struct InputFile {
  std::string path;  ///< as given (relative paths resolved against the study file's folder)
  std::string role;  ///< "study" or "data"
};

struct Study {
  std::string name;
  std::string description;
  std::string path;               ///< the study file
  std::vector<InputFile> inputs;  ///< study file first, then data files in order of use
  std::vector<StudySample> samples;
  /// Non-fatal findings of the loader, each "file:line:col: warning: message"
  /// (e.g. Vp/Vs <= sqrt(2), a Poisson ratio <= 0), in file order.
  std::vector<std::string> warnings;
};

}  // namespace porofit
