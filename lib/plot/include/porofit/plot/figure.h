#pragma once
// porofit::plot: small, dependency-free SVG figures for reports and papers.
//
// A Figure holds two axes and a list of layers (bands, reference lines, lines,
// points with error bars, flagged markers, notes). ToSvg() renders it to one
// self-contained <svg> element: no external fonts, images or scripts; a
// viewBox plus width/height so it scales; <title> and <desc> for screen
// readers; every series in a <g data-series="name"> so DOM tests can find it.
// Output is deterministic byte for byte: numbers are written with
// std::to_chars (never the C locale), coordinates with 2 decimals.
//
// Legibility: colours come from the Okabe-Ito palette (Wong 2011, Nature
// Methods 8:441), and each automatically styled series also gets its own dash
// pattern and marker shape, so figures still read in grayscale print. Lines
// are at least 1.5 px, text at least 11 px, axes black on a white background.
//
// Missing data: NaN or infinite values (and values <= 0 on a log axis) are
// gaps: lines break into segments there, points are skipped; nothing is ever
// drawn as 0. A figure with no finite data renders a plain "no data" message.
//
// Misuse (x and y of different lengths, an id outside [A-Za-z0-9_-]) throws
// std::invalid_argument when the layer is added or the figure constructed.
#include <array>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace porofit::plot {

enum class Scale { kLinear, kLog };

/// One axis. min/max unset: the range is taken from the data and widened to
/// the nearest major ticks. reversed: larger values go down (y; e.g. depth)
/// or left (x).
struct Axis {
  Axis() = default;
  Axis(std::string label_text, std::string unit_text, Scale axis_scale = Scale::kLinear)
      : label(std::move(label_text)), unit(std::move(unit_text)), scale(axis_scale) {}

  std::string label;  ///< quantity, e.g. "Confining pressure"
  std::string unit;   ///< e.g. "MPa"; empty for dimensionless
  Scale scale = Scale::kLinear;
  std::optional<double> min, max;
  bool reversed = false;

  /// "label (unit)", or "label" when unit is empty.
  std::string Title() const;
};

/// Okabe-Ito colours, sRGB hex (Wong 2011, Nature Methods 8:441, Fig. 2).
/// Index order here is the automatic series order: strong colours first,
/// yellow (weak on white paper) last.
inline constexpr std::array<std::string_view, 8> kPalette = {
    "#0072B2",  // blue
    "#D55E00",  // vermillion
    "#009E73",  // bluish green
    "#CC79A7",  // reddish purple
    "#E69F00",  // orange
    "#56B4E9",  // sky blue
    "#000000",  // black
    "#F0E442",  // yellow
};

enum class Dash { kSolid, kDashed, kDotted, kDashDot, kLongDash };
enum class Marker { kNone, kCircle, kSquare, kTriangle, kDiamond, kTriangleDown, kCross };

/// How one layer looks. Unset fields are chosen automatically from the
/// layer's index among styled layers (colour, dash and marker cycle with
/// different periods, so neighbours differ in all three).
struct Style {
  std::optional<int> colour;     ///< index into kPalette (taken modulo 8)
  std::optional<Dash> dash;      ///< lines only
  std::optional<Marker> marker;  ///< points: shape; lines: kNone unless set
  bool hollow = false;           ///< marker outline only (e.g. extrapolated points)
  double line_width = 2.0;       ///< px; values below 1.5 are raised to 1.5
};

/// A named data series. Error bars are symmetric half-widths in data units;
/// leave the vector empty for none, otherwise it must match x in length
/// (NaN entries mean "no bar" for that point).
struct Series {
  std::string name;  ///< legend text and data-series attribute; empty: not in legend
  std::vector<double> x, y;
  std::vector<double> y_err, x_err;
  Style style;
};

enum class LegendPlace {
  kAuto,   ///< right of the plot area if it fits in 35% of the width and in the
           ///< plot's height, else below
  kRight,  ///< outside the plot area, right
  kBelow,  ///< outside the plot area, below the x axis label
  kNone,
};

class Figure {
 public:
  /// id: [A-Za-z0-9_-]+, unique within one HTML page (it scopes the CSS and
  /// the clip-path id). width/height in px (CSS px of the viewBox).
  Figure(std::string id, std::string title, double width_px = 640, double height_px = 400);

  Axis& x() { return x_; }
  Axis& y() { return y_; }
  const Axis& x() const { return x_; }
  const Axis& y() const { return y_; }
  const std::string& id() const { return id_; }
  const std::string& title() const { return title_; }

  /// Polyline through the points in the given order; NaN breaks the line.
  void AddLine(Series s);
  /// Markers with optional x and y error bars.
  void AddPoints(Series s);
  /// Flagged points drawn as hollow markers without error bars (e.g. points
  /// outside the fitted range, rejected outliers).
  void AddMarkers(Series s);
  /// Translucent filled region between lower(x) and upper(x), drawn under
  /// lines and points (e.g. a confidence band). NaN in any of the three splits
  /// the band.
  void AddBand(std::string name, std::vector<double> x, std::vector<double> lower,
               std::vector<double> upper, Style style = {});
  /// The same region for vertical profiles (depth on y): filled between the
  /// curves left(y) and right(y), point i at (left[i], y[i]) and
  /// (right[i], y[i]). NaN in any of the three splits the band.
  void AddBandAlongY(std::string name, std::vector<double> y, std::vector<double> left,
                     std::vector<double> right, Style style = {});
  /// Reference lines across the whole plot area, labelled at their end.
  /// Default style: black, dashed, 1.5 px.
  void AddHorizontalLine(double y, std::string label, Style style = {});
  void AddVerticalLine(double x, std::string label, Style style = {});
  /// A line of text printed under the figure (e.g. "3 points at P < 0 hidden").
  void AddNote(std::string text);

  void set_legend(LegendPlace place) { legend_ = place; }
  /// Replaces the generated <desc> text (which lists axes and series).
  void set_description(std::string text) { description_ = std::move(text); }

  /// Names of the layers that appear in the legend, in legend order.
  std::vector<std::string> LegendEntries() const;
  /// True when at least one band, line, point or marker has a finite value.
  bool HasData() const;

  /// The figure as one <svg> element (no XML prolog), for inline HTML.
  std::string ToSvg() const;

  /// Layer record; public so the renderer (and tests) can walk it.
  enum class Kind { kBand, kHLine, kVLine, kLine, kPoints, kMarkers };
  struct Layer {
    Kind kind;
    Series series;             ///< bands: y = lower, y_err unused, upper in `upper`
    std::vector<double> upper;
    double value = 0;          ///< reference lines
    /// Bands only: the band runs along y (AddBandAlongY): series.x = left,
    /// series.y = the y values, upper = right.
    bool along_y = false;
  };
  const std::vector<Layer>& layers() const { return layers_; }
  const std::vector<std::string>& notes() const { return notes_; }
  double width() const { return width_; }
  double height() const { return height_; }
  LegendPlace legend() const { return legend_; }
  const std::optional<std::string>& description() const { return description_; }

 private:
  void Add(Kind kind, Series s);

  std::string id_, title_;
  double width_, height_;
  Axis x_, y_;
  std::vector<Layer> layers_;
  std::vector<std::string> notes_;
  LegendPlace legend_ = LegendPlace::kAuto;
  std::optional<std::string> description_;
};

/// A standalone .svg file's text: XML prolog, then ToSvg(), then a newline.
std::string SvgDocument(const Figure& figure);

}  // namespace porofit::plot
