#pragma once
// Reader for the NIST StRD nonlinear-regression .dat files (tests only).
// Layout as published by NIST: CR LF line ends; a header giving the line
// ranges ("Data (lines 61 to N)"); one line per parameter
// "bK = <Start 1> <Start 2> <certified value> <certified std. deviation>";
// "Residual Sum of Squares: <value>"; the data block (y first, then the
// predictors) from line 61.
#include <cstdio>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

namespace porofit::testing {

struct NistProblem {
  std::string name;
  std::vector<double> start1, start2, certified, certified_sd;
  double rss = 0;
  double residual_sd = 0;
  int observations = 0;
  std::vector<double> y;
  std::vector<std::vector<double>> x;  ///< x[k][i]: predictor k of observation i
};

inline NistProblem ReadNist(const std::string& path, const std::string& name) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw std::runtime_error("cannot open " + path);
  std::vector<std::string> lines;
  for (std::string line; std::getline(in, line);) {
    if (!line.empty() && line.back() == '\r') line.pop_back();
    lines.push_back(line);
  }
  NistProblem p;
  p.name = name;
  int data_first = 0, data_last = 0;
  for (const std::string& line : lines) {
    const auto pos = line.find("Data  ");
    if (pos != std::string::npos && line.find("(lines") != std::string::npos) {
      if (std::sscanf(line.c_str() + line.find("(lines"), "(lines %d to %d)", &data_first, &data_last) != 2)
        throw std::runtime_error(path + ": cannot read the data line range");
    }
  }
  if (data_first != 61 || data_last < data_first) throw std::runtime_error(path + ": unexpected data range");
  for (int i = 40; i < 60 && i < static_cast<int>(lines.size()); ++i) {  // lines 41..60
    const std::string& line = lines[i];
    const auto eq = line.find('=');
    std::istringstream tokens(line);
    std::string first;
    tokens >> first;
    if (eq != std::string::npos && first.size() >= 2 && first[0] == 'b') {
      std::istringstream v(line.substr(eq + 1));
      double a, b, c, d;
      if (!(v >> a >> b >> c >> d)) throw std::runtime_error(path + ": bad parameter line " + std::to_string(i + 1));
      p.start1.push_back(a);
      p.start2.push_back(b);
      p.certified.push_back(c);
      p.certified_sd.push_back(d);
    } else if (line.rfind("Residual Sum of Squares:", 0) == 0) {
      p.rss = std::stod(line.substr(line.find(':') + 1));
    } else if (line.rfind("Residual Standard Deviation:", 0) == 0) {
      p.residual_sd = std::stod(line.substr(line.find(':') + 1));
    } else if (line.rfind("Number of Observations:", 0) == 0) {
      p.observations = std::stoi(line.substr(line.find(':') + 1));
    }
  }
  for (int i = data_first - 1; i < data_last; ++i) {
    std::istringstream v(lines.at(i));
    std::vector<double> row;
    for (double t; v >> t;) row.push_back(t);
    if (row.size() < 2) throw std::runtime_error(path + ": bad data line " + std::to_string(i + 1));
    if (p.x.empty()) p.x.resize(row.size() - 1);
    if (row.size() - 1 != p.x.size()) throw std::runtime_error(path + ": ragged data line " + std::to_string(i + 1));
    p.y.push_back(row[0]);
    for (size_t k = 1; k < row.size(); ++k) p.x[k - 1].push_back(row[k]);
  }
  if (static_cast<int>(p.y.size()) != p.observations) throw std::runtime_error(path + ": observation count mismatch");
  if (p.certified.empty()) throw std::runtime_error(path + ": no parameter lines");
  return p;
}

}  // namespace porofit::testing
