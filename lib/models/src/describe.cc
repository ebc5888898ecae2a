#include "porofit/models/describe.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "porofit/core/error.h"

namespace porofit {
namespace {

constexpr size_t kWidth = 100;

// Greedy word wrap. The first line starts after `first_prefix`, later lines
// after `indent` spaces; words longer than the line are left unbroken.
std::string Wrap(const std::string& first_prefix, const std::string& text, size_t indent) {
  std::istringstream words(text);
  std::string out = first_prefix, word;
  size_t col = first_prefix.size();
  bool line_empty = true;
  while (words >> word) {
    if (!line_empty && col + 1 + word.size() > kWidth) {
      out += "\n" + std::string(indent, ' ');
      col = indent;
      line_empty = true;
    }
    if (!line_empty) {
      out += ' ';
      ++col;
    }
    out += word;
    col += word.size();
    line_empty = false;
  }
  return out + "\n";
}

std::string Bound(double v) {
  if (std::isinf(v)) return v > 0 ? "+inf" : "-inf";
  return FormatNumber(v);
}

std::string Interval(const ParameterSpec& p) {
  return std::string(std::isinf(p.lower) ? "(" : "[") + Bound(p.lower) + ", " + Bound(p.upper) +
         (std::isinf(p.upper) ? ")" : "]");
}

std::string Pad(std::string s, size_t width) {
  if (s.size() < width) s.append(width - s.size(), ' ');
  return s;
}

}  // namespace

std::string DescribeModel(const ModelSpec& spec) {
  constexpr size_t kLabel = 14;  // "  reference:  " etc.
  std::string out = spec.id + "  -  " + spec.name + "\n";
  out += Wrap(Pad("  formula:", kLabel), spec.formula, kLabel);
  out += Wrap(Pad("  units:", kLabel),
              spec.x_symbol + " in " + spec.x_unit + ", " + spec.y_symbol + " in " + spec.y_unit,
              kLabel);

  size_t name_w = 4, unit_w = 4, range_w = 6;
  for (const ParameterSpec& p : spec.parameters) {
    name_w = std::max(name_w, p.name.size());
    unit_w = std::max(unit_w, p.unit.size());
    range_w = std::max(range_w, Interval(p).size());
  }
  out += "  parameters:\n";
  for (const ParameterSpec& p : spec.parameters) {
    std::string head = "    " + Pad(p.name, name_w + 2) + Pad(p.unit, unit_w + 2) +
                       Pad(Interval(p), range_w + 2);
    std::string meaning = p.meaning;
    if (p.transform == ParameterTransform::kLog) meaning += " (fitted as its logarithm)";
    if (p.fixed_by_default) meaning += " [fixed unless freed]";
    out += Wrap(head, meaning, head.size());
  }

  std::string closure = "none";
  if (spec.closure_parameter >= 0)
    closure = spec.parameters[static_cast<size_t>(spec.closure_parameter)].name + " (" +
              spec.parameters[static_cast<size_t>(spec.closure_parameter)].unit + ")";
  else if (spec.closure_pressure)
    closure = "computed from the parameters (see notes)";
  out += Wrap(Pad("  closure:", kLabel), closure, kLabel);
  out += Wrap(Pad("  strain:", kLabel),
              !spec.strain                          ? "not available"
              : spec.strain_method == "gauss-legendre" ? "no closed form; eps(P) = integral of dP/K from 0 by a "
                                                         "fixed Gauss-Legendre rule (16 graded panels)"
                                                       : "closed form eps(P) = integral of dP/K from 0",
              kLabel);
  if (spec.requires_positive_x)
    out += Wrap(Pad("  domain:", kLabel), spec.x_symbol + " > 0 only", kLabel);
  out += Wrap(Pad("  reference:", kLabel), spec.reference, kLabel);
  if (!spec.notes.empty()) out += Wrap(Pad("  notes:", kLabel), spec.notes, kLabel);
  return out;
}

std::string DescribeCatalogue(const ModelRegistry& registry) {
  std::string out = Wrap("",
                         std::to_string(registry.models().size()) +
                             " models. Working units: pressure P in MPa, bulk modulus K in GPa; "
                             "bounds are physical limits in working units.",
                         0);
  for (const ModelSpec& m : registry.models()) out += "\n" + DescribeModel(m);
  return out;
}

}  // namespace porofit
