#include "porofit/plot/figure.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <regex>
#include <stdexcept>
#include <string>
#include <vector>

#include "plot/xml_check.h"
#include "porofit/plot/ticks.h"

using porofit::plot::Axis;
using porofit::plot::Dash;
using porofit::plot::Figure;
using porofit::plot::Marker;
using porofit::plot::Scale;
using porofit::plot::Series;
using porofit::plot::Style;
using porofit::plot::SvgDocument;
using porofit::plot::testing::XmlChecker;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::size_t Count(const std::string& s, const std::string& what) {
  std::size_t n = 0;
  for (std::size_t p = s.find(what); p != std::string::npos; p = s.find(what, p + what.size())) ++n;
  return n;
}

// The element (up to its first '>') that carries data-series="name" with the given class.
std::string Group(const std::string& svg, const std::string& cls, const std::string& name) {
  const std::string key = "<g class=\"" + cls + "\" data-series=\"" + name + "\"";
  const std::size_t p = svg.find(key);
  if (p == std::string::npos) return "";
  return svg.substr(p, svg.find("</g>\n", p) - p);
}

// Path data of the first d="..." in `text`.
std::string PathData(const std::string& text) {
  const std::size_t p = text.find(" d=\"");
  if (p == std::string::npos) return "";
  return text.substr(p + 4, text.find('"', p + 4) - p - 4);
}

std::vector<double> CircleCy(const std::string& text) {
  std::vector<double> cy;
  const std::regex re("<circle cx=\"[-0-9.]+\" cy=\"([-0-9.]+)\"");
  for (auto it = std::sregex_iterator(text.begin(), text.end(), re); it != std::sregex_iterator(); ++it)
    cy.push_back(std::stod((*it)[1].str()));
  return cy;
}

// A figure using every layer kind, with markup characters in the texts.
Figure RichFigure() {
  Figure f("rich-1", "K_dry <vs> P & \"fit\"");
  f.x() = Axis{"Confining pressure", "MPa"};
  f.y() = Axis{"Dry bulk modulus", "GPa"};
  std::vector<double> x, y, lo, hi, e;
  for (int i = 0; i <= 20; ++i) {
    const double p = 2.0 * i;
    x.push_back(p);
    y.push_back(30 - 12 * std::exp(-p / 10));
    lo.push_back(y.back() - 0.8);
    hi.push_back(y.back() + 0.8);
    e.push_back(0.5);
  }
  f.AddBand("95% band", x, lo, hi);
  f.AddLine(Series{"fit <exp>", x, y, {}, {}, {}});
  f.AddPoints(Series{"lab 'A'", x, y, e, e, {}});
  f.AddMarkers(Series{"extrapolated", {42, 44}, {29.8, 29.9}, {}, {}, {}});
  f.AddHorizontalLine(30, "K_inf = 30 GPa", {});
  f.AddVerticalLine(20, "P_max", {});
  f.AddNote("invented demo data & <test> note");
  return f;
}

}  // namespace

TEST(Figure, OutputIsWellFormedXml) {
  const std::string svg = RichFigure().ToSvg();
  EXPECT_EQ(XmlChecker::Check(svg), "");
  EXPECT_EQ(XmlChecker::Check(SvgDocument(RichFigure())), "");
}

TEST(Figure, StandaloneDocumentStartsWithXmlProlog) {
  const std::string doc = SvgDocument(RichFigure());
  EXPECT_EQ(doc.rfind("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<svg ", 0), 0u);
  EXPECT_EQ(doc.back(), '\n');
}

TEST(Figure, RootCarriesIdRoleViewBoxTitleAndDescription) {
  Figure f("kdry", "Title", 500, 300);
  f.AddLine(Series{"a", {1, 2}, {3, 4}, {}, {}, {}});
  const std::string svg = f.ToSvg();
  EXPECT_EQ(svg.rfind("<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"porofit-figure\" data-figure=\"kdry\" role=\"img\" "
                      "width=\"500\" height=\"300\" viewBox=\"0 0 500 300\"",
                      0),
            0u);
  EXPECT_NE(svg.find("<title>Title</title>"), std::string::npos);
  EXPECT_NE(svg.find("<desc>Title. x axis: "), std::string::npos);
  EXPECT_NE(svg.find("<style>svg[data-figure=\"kdry\"]"), std::string::npos);
  EXPECT_NE(svg.find("fill=\"#ffffff\""), std::string::npos);  // white background for print
}

TEST(Figure, IsSelfContained) {
  const std::string svg = RichFigure().ToSvg();
  for (const char* bad : {"href", "<image", "<script", "@import", "@font-face", "http://www.w3.org/1999"})
    EXPECT_EQ(svg.find(bad), std::string::npos) << bad;
  EXPECT_EQ(Count(svg, "http"), 1u);  // only the SVG namespace
}

TEST(Figure, SameFigureRendersToIdenticalBytes) {
  EXPECT_EQ(RichFigure().ToSvg(), RichFigure().ToSvg());
  const Figure f = RichFigure();
  EXPECT_EQ(f.ToSvg(), f.ToSvg());
}

TEST(Figure, NanBreaksALineIntoSegmentsAndIsNeverDrawnAtZero) {
  Figure f("nan", "gaps");
  f.y().min = 0;
  f.y().max = 20;
  f.AddLine(Series{"k", {0, 1, 2, 3, 4}, {10, 11, kNaN, 12, 13}, {}, {}, {}});
  const std::string d = PathData(Group(f.ToSvg(), "pf-line", "k"));
  EXPECT_EQ(Count(d, "M"), 2u) << d;
  EXPECT_EQ(Count(d, "L"), 2u) << d;
  // y = 0 sits on the bottom edge of the plot; no vertex may be there.
  const std::string svg = f.ToSvg();
  const std::size_t p = svg.find("<rect class=\"pf-frame\"");
  const std::regex frame("y=\"([0-9.]+)\" width=\"[0-9.]+\" height=\"([0-9.]+)\"");
  std::smatch m;
  const std::string tail = svg.substr(p);
  ASSERT_TRUE(std::regex_search(tail, m, frame));
  const double bottom = std::stod(m[1].str()) + std::stod(m[2].str());
  EXPECT_EQ(d.find(" " + porofit::plot::FormatNumber(bottom)), std::string::npos) << d;
}

TEST(Figure, InfiniteValuesAreGapsToo) {
  Figure f("inf", "gaps");
  f.AddLine(Series{"k", {0, 1, 2, 3}, {1, std::numeric_limits<double>::infinity(), 2, 3}, {}, {}, {}});
  const std::string d = PathData(Group(f.ToSvg(), "pf-line", "k"));
  EXPECT_EQ(Count(d, "M"), 2u) << d;
  EXPECT_EQ(d.find("inf"), std::string::npos);
}

TEST(Figure, EscapesMarkupInTitleSeriesNamesLabelsAndNotes) {
  const std::string svg = RichFigure().ToSvg();
  EXPECT_NE(svg.find("<title>K_dry &lt;vs&gt; P &amp; &quot;fit&quot;</title>"), std::string::npos);
  EXPECT_NE(svg.find("data-series=\"fit &lt;exp&gt;\""), std::string::npos);
  EXPECT_NE(svg.find("data-series=\"lab &apos;A&apos;\""), std::string::npos);
  EXPECT_NE(svg.find("invented demo data &amp; &lt;test&gt; note"), std::string::npos);
  EXPECT_EQ(svg.find("<exp>"), std::string::npos);
}

TEST(Figure, AxisTitlesCarryUnits) {
  EXPECT_EQ((Axis{"Confining pressure", "MPa"}).Title(), "Confining pressure (MPa)");
  EXPECT_EQ((Axis{"Porosity", ""}).Title(), "Porosity");
  const std::string svg = RichFigure().ToSvg();
  EXPECT_NE(svg.find(">Confining pressure (MPa)</text>"), std::string::npos);
  EXPECT_NE(svg.find(">Dry bulk modulus (GPa)</text>"), std::string::npos);
}

TEST(Figure, PointsWithErrorsDrawOneBarWithTwoCapsPerPoint) {
  Figure f("err", "errors");
  f.AddPoints(Series{"lab", {1, 2, 3}, {5, 6, 7}, {0.5, kNaN, 0.2}, {}, {}});
  const std::string g = Group(f.ToSvg(), "pf-points", "lab");
  ASSERT_NE(g.find("class=\"pf-errorbars\""), std::string::npos);
  const std::string d = PathData(g.substr(g.find("pf-errorbars")));
  EXPECT_EQ(Count(d, "M"), 6u) << d;  // 2 points with finite errors x (bar + 2 caps)
  EXPECT_EQ(Count(g, "<circle "), 3u);  // the first series gets circles
}

TEST(Figure, HorizontalErrorBarsAreDrawnToo) {
  Figure f("xerr", "errors");
  f.AddPoints(Series{"lab", {1, 2}, {5, 6}, {}, {0.1, 0.1}, {}});
  const std::string g = Group(f.ToSvg(), "pf-points", "lab");
  EXPECT_EQ(Count(PathData(g.substr(g.find("pf-errorbars"))), "M"), 6u);
}

TEST(Figure, BandIsAClosedPolygonDrawnBeforeLines) {
  const std::string svg = RichFigure().ToSvg();
  const std::string band = Group(svg, "pf-band", "95% band");
  ASSERT_FALSE(band.empty());
  const std::string d = PathData(band);
  EXPECT_EQ(Count(d, "M"), 1u);
  EXPECT_EQ(d.back(), 'Z');
  EXPECT_EQ(Count(d, "L"), 41u);  // 21 upper + 21 lower vertices, first is M
  EXPECT_NE(band.find("fill-opacity=\"0.2\""), std::string::npos);
  EXPECT_LT(svg.find("class=\"pf-band\""), svg.find("class=\"pf-line\""));
}

TEST(Figure, BandWithNanSplitsIntoTwoPolygons) {
  Figure f("bandnan", "band");
  f.AddBand("ci", {0, 1, 2, 3, 4}, {0, 1, kNaN, 1, 0}, {2, 3, 3, 3, 2});
  const std::string d = PathData(Group(f.ToSvg(), "pf-band", "ci"));
  EXPECT_EQ(Count(d, "M"), 2u) << d;
  EXPECT_EQ(Count(d, "Z"), 2u) << d;
}

// Vertices "x y" of a path made of M/L/Z commands.
std::vector<std::pair<double, double>> Vertices(const std::string& d) {
  std::vector<std::pair<double, double>> v;
  const std::regex re("[ML]([-0-9.]+) ([-0-9.]+)");
  for (auto it = std::sregex_iterator(d.begin(), d.end(), re); it != std::sregex_iterator(); ++it)
    v.emplace_back(std::stod((*it)[1].str()), std::stod((*it)[2].str()));
  return v;
}

TEST(Figure, BandAlongYFillsBetweenTwoCurvesOfX) {
  // A depth profile: depth down the y axis, a band 1..2 wide in x around a line at 1.5.
  Figure f("depthband", "alpha(z)");
  f.y() = Axis{"Depth", "m"};
  f.y().reversed = true;
  std::vector<double> z, left, right, mid;
  for (int i = 0; i <= 10; ++i) {
    z.push_back(100.0 * i);
    left.push_back(1.0);
    right.push_back(2.0);
    mid.push_back(1.5);
  }
  f.AddBandAlongY("80 % band", z, left, right);
  f.AddLine(Series{"alpha", mid, z, {}, {}, {}});
  const std::string svg = f.ToSvg();
  const auto band = Vertices(PathData(Group(svg, "pf-band", "80 % band")));
  const auto line = Vertices(PathData(Group(svg, "pf-line", "alpha")));
  ASSERT_EQ(band.size(), 22u);  // 11 right-edge then 11 left-edge vertices
  ASSERT_EQ(line.size(), 11u);
  const double x_right = band.front().first, x_left = band.back().first;
  EXPECT_LT(x_left, line.front().first);  // the line runs inside the band
  EXPECT_GT(x_right, line.front().first);
  EXPECT_NEAR(line.front().first - x_left, x_right - line.front().first, 0.02);  // and in its middle
  for (std::size_t i = 0; i < 11; ++i) {
    EXPECT_EQ(band[i].first, x_right);
    EXPECT_EQ(band[21 - i].first, x_left);
    EXPECT_EQ(band[i].second, line[i].second);       // the same depth pixel as the line
    EXPECT_EQ(band[21 - i].second, line[i].second);
  }
  EXPECT_LT(line.front().second, line.back().second);  // depth increases downward
}

TEST(Figure, BandAlongYSetsTheXRangeAndSplitsAtNan) {
  Figure f("depthband2", "k(z)");
  f.AddBandAlongY("b", {0, 1, 2, 3, 4}, {10, 10, kNaN, 10, 10}, {20, 20, 20, 20, 20});
  EXPECT_TRUE(f.HasData());
  const std::string svg = f.ToSvg();
  const std::string d = PathData(Group(svg, "pf-band", "b"));
  EXPECT_EQ(Count(d, "M"), 2u) << d;
  EXPECT_EQ(Count(d, "Z"), 2u) << d;
  // The x axis covers the band's edges though no line or point is drawn.
  EXPECT_NE(svg.find("x axis: x, 10 to 20"), std::string::npos) << svg.substr(0, 600);
  EXPECT_THROW(f.AddBandAlongY("c", {1, 2}, {1, 2}, {1}), std::invalid_argument);
}

TEST(Figure, LegendEntriesEqualSeriesNamesInOrder) {
  const Figure f = RichFigure();
  const std::vector<std::string> expected = {"95% band", "fit <exp>", "lab 'A'", "extrapolated"};
  EXPECT_EQ(f.LegendEntries(), expected);
  const std::string svg = f.ToSvg();
  const std::string legend = svg.substr(svg.find("<g class=\"pf-legend\">"));
  std::vector<std::string> found;
  const std::regex re("<g class=\"pf-legend-entry\" data-series=\"([^\"]*)\"");
  for (auto it = std::sregex_iterator(legend.begin(), legend.end(), re); it != std::sregex_iterator(); ++it)
    found.push_back((*it)[1].str());
  EXPECT_EQ(found, (std::vector<std::string>{"95% band", "fit &lt;exp&gt;", "lab &apos;A&apos;", "extrapolated"}));
}

TEST(Figure, LegendSitsOutsideThePlotArea) {
  const std::string svg = RichFigure().ToSvg();
  std::smatch m;
  const std::regex frame("<rect class=\"pf-frame\" x=\"([0-9.]+)\" y=\"[0-9.]+\" width=\"([0-9.]+)\"");
  ASSERT_TRUE(std::regex_search(svg, m, frame));
  const double right = std::stod(m[1].str()) + std::stod(m[2].str());
  const std::string legend = svg.substr(svg.find("<g class=\"pf-legend\">"));
  const std::regex text("<text x=\"([0-9.]+)\"");
  ASSERT_TRUE(std::regex_search(legend, m, text));
  EXPECT_GT(std::stod(m[1].str()), right);
}

TEST(Figure, LongNamesMoveTheLegendBelowThePlot) {
  Figure f("below", "long names");
  f.AddLine(Series{std::string(80, 'n'), {0, 1}, {0, 1}, {}, {}, {}});
  const std::string svg = f.ToSvg();
  std::smatch m;
  const std::regex frame("<rect class=\"pf-frame\" x=\"[0-9.]+\" y=\"([0-9.]+)\" width=\"[0-9.]+\" height=\"([0-9.]+)\"");
  ASSERT_TRUE(std::regex_search(svg, m, frame));
  const double bottom = std::stod(m[1].str()) + std::stod(m[2].str());
  const std::string legend = svg.substr(svg.find("<g class=\"pf-legend\">"));
  const std::regex text("<text x=\"[0-9.]+\" y=\"([0-9.]+)\"");
  ASSERT_TRUE(std::regex_search(legend, m, text));
  EXPECT_GT(std::stod(m[1].str()), bottom + 30);  // below the x axis title
}

TEST(Figure, ManyEntriesMoveTheLegendBelowThePlot) {
  Figure f("tall", "many series", 640, 300);
  for (int k = 0; k < 20; ++k) f.AddLine(Series{"s" + std::to_string(k), {0, 1}, {0, 1.0 * k}, {}, {}, {}});
  const std::string svg = f.ToSvg();
  const std::string legend = svg.substr(svg.find("<g class=\"pf-legend\">"));
  std::smatch m;
  const std::regex text("<text x=\"[0-9.]+\" y=\"([0-9.]+)\"");
  ASSERT_TRUE(std::regex_search(legend, m, text));
  EXPECT_GT(std::stod(m[1].str()), 200);  // first entry under the plot, not beside its top
  EXPECT_EQ(XmlChecker::Check(svg), "");
}

TEST(Figure, EmptyFigureShowsNoDataMessage) {
  Figure f("empty", "Nothing yet");
  f.x() = Axis{"P", "MPa"};
  const std::string svg = f.ToSvg();
  EXPECT_FALSE(f.HasData());
  EXPECT_NE(svg.find(">no data</text>"), std::string::npos);
  EXPECT_EQ(XmlChecker::Check(svg), "");
}

TEST(Figure, EmptyOrAllNanSeriesShowNoDataMessage) {
  Figure f("nans", "All missing");
  f.AddLine(Series{"a", {}, {}, {}, {}, {}});
  f.AddPoints(Series{"b", {1, 2}, {kNaN, kNaN}, {}, {}, {}});
  f.AddHorizontalLine(3, "ref", {});  // a reference line alone is not data
  const std::string svg = f.ToSvg();
  EXPECT_NE(svg.find(">no data</text>"), std::string::npos);
  EXPECT_EQ(svg.find("pf-legend"), std::string::npos);
  EXPECT_EQ(XmlChecker::Check(svg), "");
}

TEST(Figure, ReversedYAxisMapsLargerValuesDownward) {
  auto cy = [](bool reversed) {
    Figure f("depth", "depth");
    f.y() = Axis{"Depth", "m"};
    f.y().reversed = reversed;
    Style s;
    s.marker = Marker::kCircle;
    f.AddPoints(Series{"d", {0.5, 0.6}, {1000, 2000}, {}, {}, s});
    return CircleCy(Group(f.ToSvg(), "pf-points", "d"));
  };
  const auto down = cy(true), up = cy(false);
  ASSERT_EQ(down.size(), 2u);
  ASSERT_EQ(up.size(), 2u);
  EXPECT_GT(down[1], down[0]);  // SVG y grows downward: 2000 m is lower on the page
  EXPECT_LT(up[1], up[0]);
}

TEST(Figure, LogAxisHidesNonPositiveValuesAndSaysSo) {
  Figure f("logy", "log");
  f.y().scale = Scale::kLog;
  Style s;
  s.marker = Marker::kCircle;
  f.AddPoints(Series{"p", {1, 2, 3}, {0, 10, 100}, {}, {}, s});
  const std::string svg = f.ToSvg();
  EXPECT_EQ(CircleCy(Group(svg, "pf-points", "p")).size(), 2u);
  EXPECT_NE(svg.find("1 value(s) &lt;= 0 not shown on the log y axis"), std::string::npos);
  EXPECT_NE(svg.find(">100</text>"), std::string::npos);
  EXPECT_EQ(XmlChecker::Check(svg), "");
}

TEST(Figure, AutomaticStylesDifferInColourDashAndMarker) {
  Figure f("styles", "styles");
  f.AddLine(Series{"a", {0, 1}, {0, 1}, {}, {}, {}});
  f.AddLine(Series{"b", {0, 1}, {1, 0}, {}, {}, {}});
  f.AddPoints(Series{"c", {0, 1}, {0.5, 0.5}, {}, {}, {}});
  const std::string svg = f.ToSvg();
  const std::string a = Group(svg, "pf-line", "a"), b = Group(svg, "pf-line", "b"), c = Group(svg, "pf-points", "c");
  EXPECT_NE(a.find("stroke=\"#0072B2\""), std::string::npos);  // Okabe-Ito blue
  EXPECT_EQ(a.find("stroke-dasharray"), std::string::npos);
  EXPECT_NE(b.find("stroke=\"#D55E00\""), std::string::npos);  // Okabe-Ito vermillion
  EXPECT_NE(b.find("stroke-dasharray=\"6 4\""), std::string::npos);
  EXPECT_NE(c.find("#009E73"), std::string::npos);  // bluish green
  EXPECT_NE(c.find("<path d=\"M"), std::string::npos);  // third series: triangles, not circles
}

TEST(Figure, LinesAreAtLeastOneAndAHalfPixelsWide) {
  Figure f("thin", "thin");
  Style s;
  s.line_width = 0.5;
  f.AddLine(Series{"a", {0, 1}, {0, 1}, {}, {}, s});
  EXPECT_NE(Group(f.ToSvg(), "pf-line", "a").find("stroke-width=\"1.5\""), std::string::npos);
}

TEST(Figure, HollowMarkersHaveAWhiteFill) {
  const std::string g = Group(RichFigure().ToSvg(), "pf-markers", "extrapolated");
  EXPECT_NE(g.find("fill=\"#ffffff\""), std::string::npos);
}

TEST(Figure, FixedAxisLimitsAreUsedExactly) {
  Figure f("fixed", "fixed");
  f.x().min = 0.5;
  f.x().max = 3.5;
  f.AddLine(Series{"a", {0, 1, 2, 3, 4}, {0, 1, 2, 3, 4}, {}, {}, {}});
  const std::string svg = f.ToSvg();
  EXPECT_NE(svg.find("0.5 to 3.5"), std::string::npos);  // in <desc>
  EXPECT_EQ(XmlChecker::Check(svg), "");
}

TEST(Figure, MisuseThrowsInvalidArgument) {
  EXPECT_THROW(Figure("bad id", "t"), std::invalid_argument);
  EXPECT_THROW(Figure("", "t"), std::invalid_argument);
  Figure f("ok", "t");
  EXPECT_THROW(f.AddLine(Series{"a", {1, 2}, {1}, {}, {}, {}}), std::invalid_argument);
  EXPECT_THROW(f.AddPoints(Series{"a", {1, 2}, {1, 2}, {1}, {}, {}}), std::invalid_argument);
  EXPECT_THROW(f.AddBand("b", {1, 2}, {1, 2}, {1}), std::invalid_argument);
  f.AddLine(Series{"a", {1, 2}, {1, 2}, {}, {}, {}});
  f.x().min = 3;
  f.x().max = 1;
  EXPECT_THROW((void)f.ToSvg(), std::invalid_argument);
}
