#include "porofit/plot/figure.h"

#include <cmath>
#include <stdexcept>

namespace porofit::plot {
namespace {

void CheckSameLength(const std::string& name, const char* what, std::size_t n, std::size_t m) {
  if (n != m) {
    throw std::invalid_argument("series '" + name + "': " + what + " has " + std::to_string(m) +
                                " values, x has " + std::to_string(n));
  }
}

bool AnyFinitePair(const std::vector<double>& x, const std::vector<double>& y) {
  for (std::size_t i = 0; i < x.size(); ++i)
    if (std::isfinite(x[i]) && std::isfinite(y[i])) return true;
  return false;
}

}  // namespace

std::string Axis::Title() const { return unit.empty() ? label : label + " (" + unit + ")"; }

Figure::Figure(std::string id, std::string title, double width_px, double height_px)
    : id_(std::move(id)), title_(std::move(title)), width_(width_px), height_(height_px) {
  if (id_.empty()) throw std::invalid_argument("figure id must not be empty");
  for (char c : id_) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                    c == '-' || c == '_';
    if (!ok) throw std::invalid_argument("figure id '" + id_ + "' may hold only A-Z a-z 0-9 - _");
  }
  if (!(width_px >= 200 && height_px >= 150))
    throw std::invalid_argument("figure size must be at least 200 x 150 px");
}

void Figure::Add(Kind kind, Series s) {
  CheckSameLength(s.name, "y", s.x.size(), s.y.size());
  if (!s.y_err.empty()) CheckSameLength(s.name, "y_err", s.x.size(), s.y_err.size());
  if (!s.x_err.empty()) CheckSameLength(s.name, "x_err", s.x.size(), s.x_err.size());
  layers_.push_back(Layer{kind, std::move(s), {}, 0, false});
}

void Figure::AddLine(Series s) { Add(Kind::kLine, std::move(s)); }
void Figure::AddPoints(Series s) { Add(Kind::kPoints, std::move(s)); }

void Figure::AddMarkers(Series s) {
  s.style.hollow = true;
  s.y_err.clear();
  s.x_err.clear();
  Add(Kind::kMarkers, std::move(s));
}

void Figure::AddBand(std::string name, std::vector<double> x, std::vector<double> lower,
                     std::vector<double> upper, Style style) {
  CheckSameLength(name, "lower", x.size(), lower.size());
  CheckSameLength(name, "upper", x.size(), upper.size());
  Series s{std::move(name), std::move(x), std::move(lower), {}, {}, style};
  layers_.push_back(Layer{Kind::kBand, std::move(s), std::move(upper), 0, false});
}

void Figure::AddBandAlongY(std::string name, std::vector<double> y, std::vector<double> left,
                           std::vector<double> right, Style style) {
  CheckSameLength(name, "left", y.size(), left.size());
  CheckSameLength(name, "right", y.size(), right.size());
  Series s{std::move(name), std::move(left), std::move(y), {}, {}, style};
  layers_.push_back(Layer{Kind::kBand, std::move(s), std::move(right), 0, true});
}

void Figure::AddHorizontalLine(double y, std::string label, Style style) {
  layers_.push_back(Layer{Kind::kHLine, Series{std::move(label), {}, {}, {}, {}, style}, {}, y, false});
}

void Figure::AddVerticalLine(double x, std::string label, Style style) {
  layers_.push_back(Layer{Kind::kVLine, Series{std::move(label), {}, {}, {}, {}, style}, {}, x, false});
}

void Figure::AddNote(std::string text) { notes_.push_back(std::move(text)); }

std::vector<std::string> Figure::LegendEntries() const {
  std::vector<std::string> names;
  for (const Layer& l : layers_) {
    if (l.kind == Kind::kHLine || l.kind == Kind::kVLine || l.series.name.empty()) continue;
    names.push_back(l.series.name);
  }
  return names;
}

bool Figure::HasData() const {
  for (const Layer& l : layers_) {
    switch (l.kind) {
      case Kind::kHLine:
      case Kind::kVLine: break;
      case Kind::kBand:
        if (l.along_y ? AnyFinitePair(l.series.x, l.series.y) || AnyFinitePair(l.upper, l.series.y)
                      : AnyFinitePair(l.series.x, l.series.y) || AnyFinitePair(l.series.x, l.upper))
          return true;
        break;
      default:
        if (AnyFinitePair(l.series.x, l.series.y)) return true;
    }
  }
  return false;
}

std::string SvgDocument(const Figure& figure) {
  return "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n" + figure.ToSvg() + "\n";
}

}  // namespace porofit::plot
