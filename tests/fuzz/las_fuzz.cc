// libFuzzer harness for the LAS 2.0 reader (porofit/depth/las.h) and the
// density profile built from a parsed file.
//
// The input is the file text. After a successful parse the documented shape
// is checked (every curve as long as the index, index ascending), then
// BuildDensityProfile (RHOB, with a DRHO screen and a constant fill above the
// log) and ExtractCurve on the last curve run on the result. Expected
// outcomes: results, or porofit::InputError. A shape violation traps, as does
// any other exception, crash, leak or UB.
#include <cstddef>
#include <cstdint>
#include <string>

#include "porofit/core/error.h"
#include "porofit/depth/las.h"

namespace {

void CheckShape(const porofit::depth::LasFile& las) {
  if (las.curves.empty()) return;
  const std::vector<double>& index = las.curves.front().values;
  for (const porofit::depth::LasCurve& curve : las.curves) {
    if (curve.values.size() != index.size()) __builtin_trap();
  }
  for (size_t i = 1; i < index.size(); ++i) {
    if (!(index[i - 1] <= index[i])) __builtin_trap();
  }
}

void UseProfile(const porofit::depth::LasFile& las) {
  porofit::depth::DensityLogSpec spec;
  spec.correction_curve = las.Find("DRHO") ? "DRHO" : "";
  spec.correction_limit = 150;
  spec.fill_above = porofit::depth::DensityTrend{{0.0}, {2100.0}, "2.10 g/cc constant (fuzz)"};
  try {
    (void)porofit::depth::BuildDensityProfile(las, spec);
  } catch (const porofit::InputError&) {
  }
  if (las.curves.size() < 2) return;
  try {
    (void)porofit::depth::ExtractCurve(las, las.curves.back().header.mnemonic, 10.0, {0.0, 5000.0}, {0.0, 4000.0});
  } catch (const porofit::InputError&) {
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  try {
    const porofit::depth::LasFile las = porofit::depth::ParseLas(text, "fuzz.las");
    CheckShape(las);
    (void)las.FindWell("NULL");
    UseProfile(las);
  } catch (const porofit::InputError&) {
    // The expected way to reject bad input.
  }
  return 0;
}
