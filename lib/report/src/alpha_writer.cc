// Alpha tables: alpha.csv (bands per sample, model, method and pressure),
// grain_modulus.csv (K_s per sample with its derivation) and alpha_vti.csv.
#include <cmath>

#include "format.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"
#include "porofit/report/stream.h"

namespace porofit {
using detail::CsvField;
using detail::CsvRow;
using detail::Num;

namespace detail {

std::vector<std::string> PointFlagNames(const bands::PointFlags& f) {
  std::vector<std::string> out;
  if (f.extrapolated) out.emplace_back("extrapolated");
  if (f.model_undefined) out.emplace_back("model-undefined");
  if (f.alpha_below_porosity) out.emplace_back("alpha-below-porosity");
  if (f.alpha_above_one) out.emplace_back("alpha-above-one");
  if (f.alpha_below_hs_limit) out.emplace_back("alpha-below-hs-limit");
  if (f.k_dry_not_below_k_s) out.emplace_back("k-dry-not-below-k-s");
  return out;
}

std::string CorrelationCaveat() {
  return "K_s enters every alpha of a sample with the same sign, so alpha errors are fully correlated across "
         "pressures within a sample, and across every sample that shares a grain-modulus group; do not treat them "
         "as independent when combining pressures or samples";
}

std::vector<std::string> SharedWith(const Study& study, size_t i) {
  std::vector<std::string> out;
  const std::string& g = study.samples[i].grain.group;
  if (g.empty()) return out;
  for (size_t k = 0; k < study.samples.size(); ++k)
    if (k != i && study.samples[k].grain.group == g) out.push_back(study.samples[k].sample.id);
  return out;
}

}  // namespace detail

namespace {

double At(const std::vector<double>& v, size_t i) { return i < v.size() ? v[i] : std::nan(""); }

}  // namespace

void WriteAlphaCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "Biot coefficient alpha = 1 - K_dry/K_s with bands, one row per sample, model, method and grid pressure",
      study, meta.started_utc, meta.tool_version,
      {"pressure_MPa is the differential pressure; K in GPa; alpha, B and ks_variance_share are dimensionless (1)",
       "method delta: K_lo/K_hi and alpha_conf_* are pointwise confidence bands, alpha_pred_* prediction bands "
       "(a new measurement), alpha_simul_* whole-curve (Working-Hotelling/Scheffe) bands; M, K_u, B and "
       "ks_variance_share (share of Var alpha owed to K_s) only on delta rows",
       "method monte-carlo / bootstrap: K_lo/K_hi and alpha_conf_* are percentile bands of the draws; K_GPa and "
       "alpha are the plug-in values in every row (draw medians are in results.json)",
       "band level per sample in results.json (default 0.95); flags separated by ';' (extrapolated = outside the "
       "data's pressure range: the band rests on the model form only); bounds are flagged, never clipped",
       detail::CorrelationCaveat()});
  out << "sample,model,method,pressure_MPa,K_GPa,K_lo_GPa,K_hi_GPa,alpha,alpha_conf_lo,alpha_conf_hi,alpha_pred_lo,"
         "alpha_pred_hi,alpha_simul_lo,alpha_simul_hi,ks_variance_share,M_GPa,M_lo_GPa,M_hi_GPa,K_u_GPa,K_u_lo_GPa,"
         "K_u_hi_GPa,B,B_lo,B_hi,flags\n";
}

void WriteAlphaCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  const double G = units::kGPa, M = units::kMPa;
  {
    const Sample& s = ss.sample;
    for (size_t k = 0; k < sr.bands.size() && k < sr.fits.size(); ++k) {
      const bands::BandResult& b = sr.bands[k];
      if (!b.computed) continue;
      const std::string& model = sr.fits[k].model_id;
      auto emit = [&](const char* method, size_t j, double klo, double khi, double clo, double chi, double plo,
                      double phi, double slo, double shi, double share, bool derived) {
        auto d = [&](const bands::DerivedBand& x, double scale, int which) {
          if (!derived || !x.computed) return std::string();
          const bands::Band& c = x.confidence;
          return Num((which == 0 ? At(c.estimate, j) : which == 1 ? At(c.lower, j) : At(c.upper, j)) / scale);
        };
        const std::vector<std::string> flags =
            j < b.flags.size() ? detail::PointFlagNames(b.flags[j]) : std::vector<std::string>{};
        out << CsvRow({CsvField(s.id), CsvField(model), method, Num(At(b.grid.pressure, j) / M), Num(At(b.k, j) / G),
                       Num(klo / G), Num(khi / G), Num(At(b.alpha, j)), Num(clo), Num(chi), Num(plo), Num(phi),
                       Num(slo), Num(shi), Num(share), d(b.biot_modulus, G, 0), d(b.biot_modulus, G, 1),
                       d(b.biot_modulus, G, 2), d(b.undrained_modulus, G, 0), d(b.undrained_modulus, G, 1),
                       d(b.undrained_modulus, G, 2), d(b.skempton, 1, 0), d(b.skempton, 1, 1), d(b.skempton, 1, 2),
                       CsvField(detail::Join(flags, ";"))});
      };
      const double nan = std::nan("");
      if (b.delta.computed) {
        const bands::DeltaResult& x = b.delta;
        for (size_t j = 0; j < b.grid.size(); ++j)
          emit("delta", j, At(x.k_confidence.lower, j), At(x.k_confidence.upper, j), At(x.alpha_confidence.lower, j),
               At(x.alpha_confidence.upper, j), At(x.alpha_prediction.lower, j), At(x.alpha_prediction.upper, j),
               At(x.alpha_simultaneous.lower, j), At(x.alpha_simultaneous.upper, j), At(x.grain_share, j), true);
      }
      if (b.monte_carlo.computed) {
        const bands::MonteCarloResult& x = b.monte_carlo;
        for (size_t j = 0; j < b.grid.size(); ++j)
          emit("monte-carlo", j, At(x.k.lower, j), At(x.k.upper, j), At(x.alpha.lower, j), At(x.alpha.upper, j), nan,
               nan, nan, nan, nan, false);
      }
      if (b.bootstrap.computed) {
        const bands::BootstrapResult& x = b.bootstrap;
        for (size_t j = 0; j < b.grid.size(); ++j)
          emit("bootstrap", j, At(x.k.lower, j), At(x.k.upper, j), At(x.alpha.lower, j), At(x.alpha.upper, j), nan,
               nan, nan, nan, nan, false);
      }
    }
  }
}

void WriteAlphaCsv(const StudyRun& run, std::ostream& out) {
  WriteAlphaCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteAlphaCsvRows(run.study.samples[i], run.samples[i], out);
}

void WriteGrainModulusCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "grain modulus K_s per sample, with its derivation", study, meta.started_utc, meta.tool_version,
      {"moduli in GPa; fractions dimensionless; method none = the study gives this sample no K_s (no alpha); "
       "mineralogy: K_s = Hill average, sigma_K_s^2 = sigma_spread^2 + sigma_table^2 with sigma_spread = "
       "(Voigt - Reuss)/(2 sqrt 3); blank = not applicable",
       "shared_with lists the samples of the same group: their alpha errors are correlated through K_s",
       "sources: ' | '-separated, one per mineral (the published source in the mineral table) or the "
       "measurement's source",
       "checked: ' | '-separated, one per mineral: how its table values were compared with their source "
       "(against source excerpt; against secondary citation; from memory = recalled, not compared; not stated)"});
  out << "sample,group,method,K_s_GPa,sigma_K_s_GPa,sigma_spread_GPa,sigma_table_GPa,K_voigt_GPa,K_reuss_GPa,"
         "K_hill_GPa,K_hs_lower_GPa,K_hs_upper_GPa,mu_s_GPa,sigma_mu_s_GPa,clay_volume_fraction,basis,composition,"
         "K_f_GPa,sigma_K_f_GPa,shared_with,sources,checked\n";
}

void WriteGrainModulusCsvRow(const StudySample& ss, const std::vector<std::string>& shared_with, std::ostream& out) {
  const double G = units::kGPa;
  {
    const GrainModulusChoice& g = ss.grain;
    const poro::GrainModulus& v = g.value;
    const bool mineral = g.given && v.method == poro::GrainModulusMethod::kMineralogy;
    auto gpa = [&](double x, bool applies) { return applies ? Num(x / G) : std::string(); };
    std::vector<std::string> comp;
    for (size_t k = 0; mineral && k < v.minerals.size(); ++k)
      comp.push_back(v.minerals[k] + " " + Num(k < g.fractions.size() ? g.fractions[k] : std::nan("")));
    out << CsvRow({CsvField(ss.sample.id), CsvField(g.group),
                   g.given ? std::string(ToString(v.method)) : std::string("none"), gpa(v.k_s, g.given),
                   gpa(v.sigma_k_s, g.given), gpa(v.sigma_k_s_spread, mineral), gpa(v.sigma_k_s_table, mineral),
                   gpa(v.k_voigt, mineral), gpa(v.k_reuss, mineral), gpa(v.k_hill, mineral), gpa(v.k_hs_lower, mineral),
                   gpa(v.k_hs_upper, mineral), gpa(v.mu_s, g.given), gpa(v.sigma_mu_s, g.given),
                   mineral ? Num(v.clay_volume_fraction) : std::string(),
                   mineral ? std::string(poro::ToString(g.basis)) : std::string(), CsvField(detail::Join(comp, "; ")),
                   ss.fluid ? Num(ss.fluid->k_f / G) : std::string(), ss.fluid ? Num(ss.fluid->sigma / G) : std::string(),
                   CsvField(detail::Join(shared_with, ";")),
                   CsvField(detail::Join(g.sources, " | ")), CsvField(detail::Join(g.checked, " | "))});
  }
}

void WriteGrainModulusCsv(const StudyRun& run, std::ostream& out) {
  WriteGrainModulusCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size(); ++i)
    WriteGrainModulusCsvRow(run.study.samples[i], detail::SharedWith(run.study, i), out);
}

void WriteVtiAlphaCsvHeader(const Study& study, const RunMetadata& meta, std::ostream& out) {
  out << detail::CsvPreamble(
      "anisotropic (VTI) Biot coefficients per given pressure: alpha_h = 1 - (C11 + C12 + C13)/(3 K_s), "
      "alpha_v = 1 - (2 C13 + C33)/(3 K_s)",
      study, meta.started_utc, meta.tool_version,
      {"one row per row of a sample's vti_stiffness table (source = table; stiffnesses in GPa as given, drained, "
       "static; sigma_* are 1-sigma from sigma_K_s only), then, with vti_stiffness.fit, one row per table pressure "
       "from the fitted stiffness curves (source = fitted) and one row per pressure of the sample's band grid "
       "(source = fitted-grid); fitted sigma_* add the fit variance of each stiffness, first "
       "order, the four fits independent); alpha dimensionless",
       detail::CorrelationCaveat()});
  out << "sample,pressure_MPa,C11_GPa,C12_GPa,C13_GPa,C33_GPa,K_s_GPa,alpha_h,sigma_alpha_h,alpha_v,sigma_alpha_v,"
         "flags,source\n";
}

void WriteVtiAlphaCsvRows(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  {
    for (const VtiAlphaPoint& a : sr.vti) {
      out << CsvRow({CsvField(ss.sample.id), Num(a.pressure / units::kMPa), Num(a.c11 / units::kGPa),
                     Num(a.c12 / units::kGPa), Num(a.c13 / units::kGPa), Num(a.c33 / units::kGPa),
                     Num(ss.grain.value.k_s / units::kGPa), Num(a.alpha_h), Num(a.sigma_h), Num(a.alpha_v),
                     Num(a.sigma_v), a.extrapolated ? "extrapolated" : "", CsvField(a.source)});
    }
  }
}

void WriteVtiAlphaCsv(const StudyRun& run, std::ostream& out) {
  WriteVtiAlphaCsvHeader(run.study, run.metadata, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteVtiAlphaCsvRows(run.study.samples[i], run.samples[i], out);
}

}  // namespace porofit
