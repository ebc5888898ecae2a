// Figure::ToSvg: layout, scales and SVG text. Everything is computed from the
// Figure alone and written with FormatNumber, so output is byte-for-byte stable.
#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

#include "porofit/plot/figure.h"
#include "porofit/plot/ticks.h"

namespace porofit::plot {
namespace {

using Kind = Figure::Kind;
using Layer = Figure::Layer;

constexpr double kFont = 11, kTitleFont = 14, kLabelFont = 12;
constexpr double kCharWidth = 0.6;  // average glyph width of a sans-serif face, in em
constexpr double kRow = 16;         // legend and note row height, px
constexpr double kMarkerR = 3.5;
constexpr double kBandOpacity = 0.2;

std::string N(double v) { return FormatNumber(v, 2); }

double TextWidth(const std::string& s, double font) {
  std::size_t chars = 0;
  for (char c : s)
    if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) ++chars;  // count UTF-8 code points
  return static_cast<double>(chars) * font * kCharWidth;
}

bool IsData(Kind k) { return k != Kind::kHLine && k != Kind::kVLine; }

// Resolved look of one layer.
struct Look {
  std::string colour;
  Dash dash = Dash::kSolid;
  Marker marker = Marker::kNone;
  bool hollow = false;
  double width = 2;
};

const char* DashArray(Dash d) {
  switch (d) {
    case Dash::kSolid: return nullptr;
    case Dash::kDashed: return "6 4";
    case Dash::kDotted: return "2 3";
    case Dash::kDashDot: return "8 3 2 3";
    case Dash::kLongDash: return "12 4";
  }
  return nullptr;
}

std::vector<Look> ResolveLooks(const std::vector<Layer>& layers) {
  static constexpr Dash kDashes[] = {Dash::kSolid, Dash::kDashed, Dash::kDotted, Dash::kDashDot,
                                     Dash::kLongDash};
  static constexpr Marker kMarkers[] = {Marker::kCircle,  Marker::kSquare,       Marker::kTriangle,
                                        Marker::kDiamond, Marker::kTriangleDown, Marker::kCross};
  std::vector<Look> looks;
  int series = 0, bands = 0;
  for (const Layer& l : layers) {
    const Style& s = l.series.style;
    Look k;
    k.width = std::max(1.5, s.line_width);
    k.hollow = s.hollow;
    int auto_index = 0;
    if (l.kind == Kind::kBand) {
      auto_index = bands++;  // first band shares the first line's colour: fit + its band
    } else if (IsData(l.kind)) {
      auto_index = series++;
    }
    if (IsData(l.kind)) {
      // Seven strong colours cycle; yellow only when asked for.
      k.colour = std::string(kPalette[static_cast<std::size_t>(s.colour ? ((*s.colour % 8) + 8) % 8 : auto_index % 7)]);
      k.dash = s.dash.value_or(kDashes[auto_index % 5]);
      if (l.kind == Kind::kLine)
        k.marker = s.marker.value_or(Marker::kNone);
      else
        k.marker = s.marker.value_or(kMarkers[auto_index % 6]);
    } else {
      k.colour = s.colour ? std::string(kPalette[static_cast<std::size_t>(((*s.colour % 8) + 8) % 8)]) : "#000000";
      k.dash = s.dash.value_or(Dash::kDashed);
      k.width = std::max(1.5, s.line_width == 2.0 ? 1.5 : s.line_width);
    }
    looks.push_back(std::move(k));
  }
  return looks;
}

// Data value -> pixel along one axis.
struct Scaler {
  TickSet ticks;
  Scale scale = Scale::kLinear;
  double p0 = 0, p1 = 1;  // pixels of ticks.lo and ticks.hi

  bool Valid(double v) const { return std::isfinite(v) && (scale == Scale::kLinear || v > 0); }
  double T(double v) const {
    if (scale == Scale::kLog) return (std::log10(v) - std::log10(ticks.lo)) / (std::log10(ticks.hi) - std::log10(ticks.lo));
    return (v - ticks.lo) / (ticks.hi - ticks.lo);
  }
  double operator()(double v) const { return p0 + T(v) * (p1 - p0); }
  bool Inside(double v) const {
    const double t = T(v);
    return t >= -1e-9 && t <= 1 + 1e-9;
  }
};

struct Range {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  long skipped = 0;  // values <= 0 on a log axis
  void Add(double v, Scale s) {
    if (!std::isfinite(v)) return;
    if (s == Scale::kLog && v <= 0) {
      ++skipped;
      return;
    }
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  bool Empty() const { return !(lo <= hi); }
};

// Data extent of every layer on each axis (error bars and bands included).
void Extent(const std::vector<Layer>& layers, const Axis& ax, const Axis& ay, Range& rx, Range& ry) {
  for (const Layer& l : layers) {
    const Series& s = l.series;
    if (l.kind == Kind::kHLine) {
      if (ay.scale == Scale::kLinear || l.value > 0) ry.Add(l.value, ay.scale);
      continue;
    }
    if (l.kind == Kind::kVLine) {
      if (ax.scale == Scale::kLinear || l.value > 0) rx.Add(l.value, ax.scale);
      continue;
    }
    if (l.kind == Kind::kBand && l.along_y) {
      for (std::size_t i = 0; i < s.y.size(); ++i) {
        if (!std::isfinite(s.y[i]) || !(std::isfinite(s.x[i]) || std::isfinite(l.upper[i]))) continue;
        ry.Add(s.y[i], ay.scale);
        rx.Add(s.x[i], ax.scale);
        rx.Add(l.upper[i], ax.scale);
      }
      continue;
    }
    for (std::size_t i = 0; i < s.x.size(); ++i) {
      const bool has_y = l.kind == Kind::kBand ? std::isfinite(s.y[i]) || std::isfinite(l.upper[i]) : std::isfinite(s.y[i]);
      if (!std::isfinite(s.x[i]) || !has_y) continue;
      rx.Add(s.x[i], ax.scale);
      ry.Add(s.y[i], ay.scale);
      if (l.kind == Kind::kBand) ry.Add(l.upper[i], ay.scale);
      if (!s.y_err.empty() && std::isfinite(s.y_err[i])) {
        ry.Add(s.y[i] + std::abs(s.y_err[i]), ay.scale);
        if (ay.scale == Scale::kLinear) ry.Add(s.y[i] - std::abs(s.y_err[i]), ay.scale);
      }
      if (!s.x_err.empty() && std::isfinite(s.x_err[i])) {
        rx.Add(s.x[i] + std::abs(s.x_err[i]), ax.scale);
        if (ax.scale == Scale::kLinear) rx.Add(s.x[i] - std::abs(s.x_err[i]), ax.scale);
      }
    }
  }
}

TickSet AxisTicks(const Axis& a, const Range& r, int target, const char* which) {
  auto bad = [&](const std::string& why) { return std::invalid_argument(std::string(which) + " axis: " + why); };
  if (a.min && a.max && !(*a.min < *a.max)) throw bad("min must be < max");
  if (a.scale == Scale::kLog && ((a.min && !(*a.min > 0)) || (a.max && !(*a.max > 0))))
    throw bad("log axis limits must be > 0");
  if (a.min && a.max) return MakeTicks(*a.min, *a.max, a.scale, false, target);
  double lo = a.min.value_or(r.lo), hi = a.max.value_or(r.hi);
  if (a.min && !(hi > lo)) hi = a.scale == Scale::kLog ? lo * 10 : lo + std::max(std::abs(lo) / 10, 1.0);
  if (a.max && !(hi > lo)) lo = a.scale == Scale::kLog ? hi / 10 : hi - std::max(std::abs(hi) / 10, 1.0);
  TickSet t = MakeTicks(lo, hi, a.scale, true, target);
  if (a.min || a.max) t = MakeTicks(a.min.value_or(t.lo), a.max.value_or(t.hi), a.scale, false, target);
  return t;
}

class Writer {
 public:
  std::string out;
  Writer& operator<<(const std::string& s) { out += s; return *this; }
  Writer& operator<<(const char* s) { out += s; return *this; }
  void Attr(const char* name, double v) { out += ' '; out += name; out += "=\""; out += N(v); out += '"'; }
  void Attr(const char* name, const std::string& v) { out += ' '; out += name; out += "=\""; out += EscapeXml(v); out += '"'; }
  void Line(double x1, double y1, double x2, double y2) {
    out += "<line"; Attr("x1", x1); Attr("y1", y1); Attr("x2", x2); Attr("y2", y2); out += "/>";
  }
  void Text(double x, double y, const std::string& text, const char* cls, const char* anchor) {
    out += "<text"; Attr("x", x); Attr("y", y);
    if (cls) { out += " class=\""; out += cls; out += '"'; }
    if (anchor) { out += " text-anchor=\""; out += anchor; out += '"'; }
    out += '>'; out += EscapeXml(text); out += "</text>\n";
  }
  void Stroke(const Look& k, bool with_dash) {
    out += " stroke=\"" + k.colour + "\" stroke-width=\"" + N(k.width) + '"';
    if (const char* d = with_dash ? DashArray(k.dash) : nullptr) out += std::string(" stroke-dasharray=\"") + d + '"';
  }
  void MarkerShape(Marker m, double x, double y, double r) {
    switch (m) {
      case Marker::kNone: return;
      case Marker::kCircle:
        out += "<circle"; Attr("cx", x); Attr("cy", y); Attr("r", r); out += "/>"; return;
      case Marker::kSquare:
        out += "<rect"; Attr("x", x - r); Attr("y", y - r); Attr("width", 2 * r); Attr("height", 2 * r); out += "/>"; return;
      case Marker::kTriangle:
        Path({x, y - 1.2 * r, x + 1.1 * r, y + 0.8 * r, x - 1.1 * r, y + 0.8 * r}, true); return;
      case Marker::kTriangleDown:
        Path({x, y + 1.2 * r, x + 1.1 * r, y - 0.8 * r, x - 1.1 * r, y - 0.8 * r}, true); return;
      case Marker::kDiamond:
        Path({x, y - 1.3 * r, x + 1.3 * r, y, x, y + 1.3 * r, x - 1.3 * r, y}, true); return;
      case Marker::kCross:
        out += "<path d=\"M" + N(x - r) + ' ' + N(y - r) + 'L' + N(x + r) + ' ' + N(y + r) + 'M' + N(x - r) + ' ' +
               N(y + r) + 'L' + N(x + r) + ' ' + N(y - r) + "\"/>";
        return;
    }
  }
  void Path(std::initializer_list<double> xy, bool close) {
    out += "<path d=\"";
    bool first = true;
    for (auto it = xy.begin(); it != xy.end(); it += 2) {
      out += first ? 'M' : 'L';
      out += N(*it) + ' ' + N(*(it + 1));
      first = false;
    }
    if (close) out += 'Z';
    out += "\"/>";
  }
};

// Marker group attributes: filled (colour) or hollow (white inside).
std::string MarkerPaint(const Look& k) {
  const std::string fill = (k.hollow || k.marker == Marker::kCross) ? "#ffffff" : k.colour;
  return " fill=\"" + fill + "\" stroke=\"" + k.colour + "\" stroke-width=\"1.5\"";
}

struct Box {
  double left, top, right, bottom;
  double w() const { return right - left; }
  double h() const { return bottom - top; }
};

}  // namespace

std::string Figure::ToSvg() const {
  const std::vector<Look> looks = ResolveLooks(layers_);
  Range rx, ry;
  Extent(layers_, x_, y_, rx, ry);
  // Only data layers make a figure worth drawing; reference lines alone do not.
  Range dx, dy;
  {
    std::vector<Layer> data;
    for (const Layer& l : layers_)
      if (IsData(l.kind)) data.push_back(l);
    Extent(data, x_, y_, dx, dy);
  }
  const bool has_data = !dx.Empty() && !dy.Empty();
  std::vector<std::string> notes = notes_;
  if (x_.scale == Scale::kLog && dx.skipped > 0)
    notes.push_back(std::to_string(dx.skipped) + " value(s) <= 0 not shown on the log x axis");
  if (y_.scale == Scale::kLog && dy.skipped > 0)
    notes.push_back(std::to_string(dy.skipped) + " value(s) <= 0 not shown on the log y axis");

  // Legend entries: data layers with names.
  std::vector<std::size_t> legend;
  double legend_text = 0;
  for (std::size_t i = 0; i < layers_.size(); ++i) {
    if (!IsData(layers_[i].kind) || layers_[i].series.name.empty()) continue;
    legend.push_back(i);
    legend_text = std::max(legend_text, TextWidth(layers_[i].series.name, kFont));
  }
  const double entry_w = 30 + legend_text + 12;
  LegendPlace place = has_data && !legend.empty() ? legend_ : LegendPlace::kNone;
  if (place == LegendPlace::kAuto) {
    // Right if the names are short and the entries fit the plot's height, else below.
    const double plot_h = height_ - (title_.empty() ? 14.0 : 36.0) - 48 - static_cast<double>(notes.size()) * kRow;
    const bool fits = static_cast<double>(legend.size()) * kRow + 8 <= plot_h;
    place = entry_w <= 0.35 * width_ && fits ? LegendPlace::kRight : LegendPlace::kBelow;
  }
  const int per_row = place == LegendPlace::kBelow ? std::max(1, static_cast<int>((width_ - 20) / entry_w)) : 1;
  const int legend_rows = place == LegendPlace::kBelow
                              ? static_cast<int>((legend.size() + static_cast<std::size_t>(per_row) - 1) / static_cast<std::size_t>(per_row))
                              : 0;

  // Vertical layout: title, plot, x tick labels, x title, legend below, notes.
  Box plot{0, title_.empty() ? 14.0 : 36.0, 0, 0};
  const double notes_h = static_cast<double>(notes.size()) * kRow;
  const double below_h = legend_rows > 0 ? legend_rows * kRow + 6 : 0;
  plot.bottom = height_ - 44 - below_h - notes_h - 4;
  if (plot.bottom - plot.top < 40) plot.bottom = plot.top + 40;  // tiny figure: let notes overflow, keep axes

  std::string svg;
  Writer w;
  const std::string sel = "svg[data-figure=\"" + id_ + "\"]";
  w << "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"porofit-figure\"";
  w.Attr("data-figure", id_);
  w << " role=\"img\"";
  w.Attr("width", width_);
  w.Attr("height", height_);
  w << " viewBox=\"0 0 " + N(width_) + ' ' + N(height_) + "\" font-family=\"sans-serif\" font-size=\"11\">\n";
  w << "<title>" + EscapeXml(title_.empty() ? id_ : title_) + "</title>\n";

  // Scales (need the plot box; x needs the y tick label width first).
  Scaler sx, sy;
  std::string desc;
  if (has_data) {
    Range ax = rx, ay = ry;
    sy.ticks = AxisTicks(y_, ay, std::clamp(static_cast<int>(plot.h() / 50), 3, 8), "y");
    double ylab = 0;
    for (const std::string& s : sy.ticks.labels) ylab = std::max(ylab, TextWidth(s, kFont));
    plot.left = ylab + 8 + (y_.Title().empty() ? 6 : 26);
    plot.right = width_ - (place == LegendPlace::kRight ? entry_w + 8 : 18);
    sx.ticks = AxisTicks(x_, ax, std::clamp(static_cast<int>(plot.w() / 80), 3, 8), "x");
    sx.scale = x_.scale;
    sy.scale = y_.scale;
    sx.p0 = x_.reversed ? plot.right : plot.left;
    sx.p1 = x_.reversed ? plot.left : plot.right;
    sy.p0 = y_.reversed ? plot.top : plot.bottom;
    sy.p1 = y_.reversed ? plot.bottom : plot.top;
    desc = (title_.empty() ? std::string("Figure") : title_) + ". x axis: " +
           (x_.Title().empty() ? "x" : x_.Title()) + ", " + FormatNumber(sx.ticks.lo, 6) + " to " +
           FormatNumber(sx.ticks.hi, 6) + (x_.scale == Scale::kLog ? ", log scale" : "") +
           (x_.reversed ? ", reversed" : "") + ". y axis: " + (y_.Title().empty() ? "y" : y_.Title()) + ", " +
           FormatNumber(sy.ticks.lo, 6) + " to " + FormatNumber(sy.ticks.hi, 6) +
           (y_.scale == Scale::kLog ? ", log scale" : "") + (y_.reversed ? ", reversed" : "") + ".";
    if (!legend.empty()) {
      desc += " Series:";
      for (std::size_t k = 0; k < legend.size(); ++k)
        desc += (k ? ", " : " ") + layers_[legend[k]].series.name;
      desc += '.';
    }
  } else {
    plot.left = 20;
    plot.right = width_ - 20;
    desc = (title_.empty() ? std::string("Figure") : title_) + ". No data.";
  }
  w << "<desc>" + EscapeXml(description_.value_or(desc)) + "</desc>\n";
  w << "<style>" + sel + " text{fill:#000000}" + sel + " .pf-title{font-size:" + N(kTitleFont) +
           "px;font-weight:bold}" + sel + " .pf-axis-title{font-size:" + N(kLabelFont) + "px}" + sel +
           " .pf-nodata{font-size:" + N(kLabelFont) + "px;fill:#444444}</style>\n";
  const std::string clip = "pf-" + id_ + "-plot";
  w << "<defs><clipPath id=\"" + clip + "\"><rect";
  w.Attr("x", plot.left);
  w.Attr("y", plot.top);
  w.Attr("width", plot.w());
  w.Attr("height", plot.h());
  w << "/></clipPath></defs>\n";
  w << "<rect class=\"pf-background\" x=\"0\" y=\"0\"";
  w.Attr("width", width_);
  w.Attr("height", height_);
  w << " fill=\"#ffffff\"/>\n";
  if (!title_.empty()) w.Text(width_ / 2, 22, title_, "pf-title", "middle");

  auto frame = [&] {
    w << "<rect class=\"pf-frame\"";
    w.Attr("x", plot.left);
    w.Attr("y", plot.top);
    w.Attr("width", plot.w());
    w.Attr("height", plot.h());
    w << " fill=\"none\" stroke=\"#000000\" stroke-width=\"1.5\"/>\n";
  };
  auto write_notes = [&] {
    if (notes.empty()) return;
    w << "<g class=\"pf-notes\">\n";
    double y = height_ - notes_h + 11;
    for (const std::string& n : notes) {
      w.Text(10, y, n, nullptr, nullptr);
      y += kRow;
    }
    w << "</g>\n";
  };

  if (!has_data) {
    frame();
    w.Text((plot.left + plot.right) / 2, (plot.top + plot.bottom) / 2 + 4, "no data", "pf-nodata", "middle");
    write_notes();
    w << "</svg>";
    return std::move(w.out);
  }

  // Grid under everything, at major ticks (minor on log axes as well, lighter).
  w << "<g class=\"pf-grid\" stroke=\"#dddddd\" stroke-width=\"1\">";
  for (double v : sx.ticks.major) w.Line(sx(v), plot.top, sx(v), plot.bottom);
  for (double v : sy.ticks.major) w.Line(plot.left, sy(v), plot.right, sy(v));
  w << "</g>\n";

  // Data layers in drawing order: bands, reference lines, lines, points, markers.
  static constexpr Kind kOrder[] = {Kind::kBand, Kind::kHLine, Kind::kVLine, Kind::kLine, Kind::kPoints, Kind::kMarkers};
  for (Kind kind : kOrder) {
    for (std::size_t li = 0; li < layers_.size(); ++li) {
      const Layer& l = layers_[li];
      if (l.kind != kind) continue;
      const Look& k = looks[li];
      const Series& s = l.series;
      const std::size_t n = s.x.size();
      auto ok = [&](std::size_t i, const std::vector<double>& ys) { return sx.Valid(s.x[i]) && sy.Valid(ys[i]); };
      switch (kind) {
        case Kind::kBand: {
          w << "<g class=\"pf-band\"";
          w.Attr("data-series", s.name);
          w << " clip-path=\"url(#" + clip + ")\"><path fill=\"" + k.colour + "\" fill-opacity=\"" + N(kBandOpacity) +
                   "\" stroke=\"none\" d=\"";
          // One closed polygon per run of points where both edges are usable.
          // The lower edge is (x, y) either way; the upper edge is (x, upper),
          // or (upper, y) for a band along y (x = left edge, upper = right).
          auto upper_x = [&](std::size_t m) { return l.along_y ? l.upper[m] : s.x[m]; };
          auto upper_y = [&](std::size_t m) { return l.along_y ? s.y[m] : l.upper[m]; };
          auto usable = [&](std::size_t m) {
            return sx.Valid(s.x[m]) && sy.Valid(s.y[m]) && sx.Valid(upper_x(m)) && sy.Valid(upper_y(m));
          };
          std::size_t i = 0;
          while (i < n) {
            while (i < n && !usable(i)) ++i;
            std::size_t j = i;
            while (j < n && usable(j)) ++j;
            if (j > i) {
              for (std::size_t m = i; m < j; ++m) w << (m == i ? "M" : "L") + N(sx(upper_x(m))) + ' ' + N(sy(upper_y(m)));
              for (std::size_t m = j; m-- > i;) w << "L" + N(sx(s.x[m])) + ' ' + N(sy(s.y[m]));
              w << "Z";
            }
            i = j;
          }
          w << "\"/></g>\n";
          break;
        }
        case Kind::kHLine:
        case Kind::kVLine: {
          const bool h = kind == Kind::kHLine;
          const Scaler& sc = h ? sy : sx;
          if (!sc.Valid(l.value) || !sc.Inside(l.value)) break;
          w << "<g class=\"pf-refline\"";
          w.Attr("data-series", s.name);
          w << "><line";
          const double p = sc(l.value);
          if (h) {
            w.Attr("x1", plot.left); w.Attr("y1", p); w.Attr("x2", plot.right); w.Attr("y2", p);
          } else {
            w.Attr("x1", p); w.Attr("y1", plot.top); w.Attr("x2", p); w.Attr("y2", plot.bottom);
          }
          w.Stroke(k, true);
          w << "/>";
          if (!s.name.empty()) {
            if (h)
              w.Text(plot.right - 4, p - 4, s.name, nullptr, "end");
            else
              w.Text(p + 4, plot.top + 12, s.name, nullptr, "start");
          } else {
            w << "\n";
          }
          w << "</g>\n";
          break;
        }
        case Kind::kLine: {
          w << "<g class=\"pf-line\"";
          w.Attr("data-series", s.name);
          w << "><path clip-path=\"url(#" + clip + ")\" fill=\"none\" stroke-linejoin=\"round\" stroke-linecap=\"round\"";
          w.Stroke(k, true);
          w << " d=\"";
          bool pen = false;  // NaN lifts the pen: the line breaks, it never drops to 0
          for (std::size_t i = 0; i < n; ++i) {
            if (!ok(i, s.y)) {
              pen = false;
              continue;
            }
            w << (pen ? "L" : "M") + N(sx(s.x[i])) + ' ' + N(sy(s.y[i]));
            pen = true;
          }
          w << "\"/>";
          if (k.marker != Marker::kNone) {
            w << "<g" + MarkerPaint(k) + ">";
            for (std::size_t i = 0; i < n; ++i)
              if (ok(i, s.y) && sx.Inside(s.x[i]) && sy.Inside(s.y[i])) w.MarkerShape(k.marker, sx(s.x[i]), sy(s.y[i]), kMarkerR);
            w << "</g>";
          }
          w << "</g>\n";
          break;
        }
        case Kind::kPoints:
        case Kind::kMarkers: {
          w << (kind == Kind::kPoints ? "<g class=\"pf-points\"" : "<g class=\"pf-markers\"");
          w.Attr("data-series", s.name);
          w << ">";
          if (!s.y_err.empty() || !s.x_err.empty()) {
            w << "<path class=\"pf-errorbars\" clip-path=\"url(#" + clip + ")\" fill=\"none\" stroke=\"" + k.colour +
                     "\" stroke-width=\"1.5\" d=\"";
            for (std::size_t i = 0; i < n; ++i) {
              if (!ok(i, s.y)) continue;
              const double px = sx(s.x[i]), py = sy(s.y[i]);
              // On a log axis a bar reaching <= 0 is drawn to the axis edge.
              if (!s.y_err.empty() && std::isfinite(s.y_err[i]) && s.y_err[i] != 0) {
                const double e = std::abs(s.y_err[i]);
                const double lo = sy.Valid(s.y[i] - e) ? sy(s.y[i] - e) : sy.p0, hi = sy(s.y[i] + e);
                w << "M" + N(px) + ' ' + N(lo) + "L" + N(px) + ' ' + N(hi) + "M" + N(px - 3) + ' ' + N(lo) + "L" +
                         N(px + 3) + ' ' + N(lo) + "M" + N(px - 3) + ' ' + N(hi) + "L" + N(px + 3) + ' ' + N(hi);
              }
              if (!s.x_err.empty() && std::isfinite(s.x_err[i]) && s.x_err[i] != 0) {
                const double e = std::abs(s.x_err[i]);
                const double lo = sx.Valid(s.x[i] - e) ? sx(s.x[i] - e) : sx.p0, hi = sx(s.x[i] + e);
                w << "M" + N(lo) + ' ' + N(py) + "L" + N(hi) + ' ' + N(py) + "M" + N(lo) + ' ' + N(py - 3) + "L" +
                         N(lo) + ' ' + N(py + 3) + "M" + N(hi) + ' ' + N(py - 3) + "L" + N(hi) + ' ' + N(py + 3);
              }
            }
            w << "\"/>";
          }
          const double r = kind == Kind::kMarkers ? kMarkerR + 1 : kMarkerR;
          w << "<g" + MarkerPaint(k) + ">";
          for (std::size_t i = 0; i < n; ++i)
            if (ok(i, s.y) && sx.Inside(s.x[i]) && sy.Inside(s.y[i])) w.MarkerShape(k.marker, sx(s.x[i]), sy(s.y[i]), r);
          w << "</g></g>\n";
          break;
        }
      }
    }
  }

  // Axes: frame, ticks pointing out, labels.
  frame();
  w << "<g class=\"pf-axis pf-axis-x\" stroke=\"#000000\" stroke-width=\"1.5\">";
  for (double v : sx.ticks.major) w.Line(sx(v), plot.bottom, sx(v), plot.bottom + 5);
  for (double v : sx.ticks.minor) w.Line(sx(v), plot.bottom, sx(v), plot.bottom + 3);
  w << "</g>\n<g class=\"pf-ticklabels pf-axis-x\">";
  for (std::size_t i = 0; i < sx.ticks.major.size(); ++i)
    w.Text(sx(sx.ticks.major[i]), plot.bottom + 17, sx.ticks.labels[i], nullptr, "middle");
  w << "</g>\n<g class=\"pf-axis pf-axis-y\" stroke=\"#000000\" stroke-width=\"1.5\">";
  for (double v : sy.ticks.major) w.Line(plot.left - 5, sy(v), plot.left, sy(v));
  for (double v : sy.ticks.minor) w.Line(plot.left - 3, sy(v), plot.left, sy(v));
  w << "</g>\n<g class=\"pf-ticklabels pf-axis-y\">";
  for (std::size_t i = 0; i < sy.ticks.major.size(); ++i)
    w.Text(plot.left - 8, sy(sy.ticks.major[i]) + 4, sy.ticks.labels[i], nullptr, "end");
  w << "</g>\n";
  if (!x_.Title().empty()) w.Text((plot.left + plot.right) / 2, plot.bottom + 36, x_.Title(), "pf-axis-title", "middle");
  if (!y_.Title().empty()) {
    const double tx = 16, ty = (plot.top + plot.bottom) / 2;
    w << "<text class=\"pf-axis-title\" text-anchor=\"middle\"";
    w.Attr("x", tx);
    w.Attr("y", ty);
    w << " transform=\"rotate(-90 " + N(tx) + ' ' + N(ty) + ")\">" + EscapeXml(y_.Title()) + "</text>\n";
  }

  // Legend: a swatch that repeats the layer's colour, dash and marker.
  if (place != LegendPlace::kNone) {
    w << "<g class=\"pf-legend\">\n";
    for (std::size_t e = 0; e < legend.size(); ++e) {
      const Layer& l = layers_[legend[e]];
      const Look& k = looks[legend[e]];
      double x0, y0;
      if (place == LegendPlace::kRight) {
        x0 = plot.right + 12;
        y0 = plot.top + 4 + static_cast<double>(e) * kRow;
      } else {
        x0 = plot.left + static_cast<double>(e % static_cast<std::size_t>(per_row)) * entry_w;
        y0 = plot.bottom + 46 + static_cast<double>(e / static_cast<std::size_t>(per_row)) * kRow;
      }
      const double cy = y0 + kRow / 2;
      w << "<g class=\"pf-legend-entry\"";
      w.Attr("data-series", l.series.name);
      w << ">";
      if (l.kind == Kind::kBand) {
        w << "<rect";
        w.Attr("x", x0);
        w.Attr("y", cy - 5);
        w << " width=\"24\" height=\"10\" fill=\"" + k.colour + "\" fill-opacity=\"" + N(kBandOpacity) + "\" stroke=\"" +
                 k.colour + "\" stroke-width=\"1\"/>";
      } else {
        if (l.kind == Kind::kLine) {
          w << "<line";
          w.Attr("x1", x0); w.Attr("y1", cy); w.Attr("x2", x0 + 24); w.Attr("y2", cy);
          w.Stroke(k, true);
          w << "/>";
        }
        if (k.marker != Marker::kNone) {
          w << "<g" + MarkerPaint(k) + ">";
          w.MarkerShape(k.marker, x0 + 12, cy, l.kind == Kind::kMarkers ? kMarkerR + 1 : kMarkerR);
          w << "</g>";
        }
      }
      w.Text(x0 + 30, cy + 4, l.series.name, nullptr, nullptr);
      w << "</g>\n";
    }
    w << "</g>\n";
  }
  write_notes();
  w << "</svg>";
  return std::move(w.out);
}

}  // namespace porofit::plot
