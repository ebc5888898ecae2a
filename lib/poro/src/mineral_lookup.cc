// Finding minerals by approximate name, and the table as text for a person.
#include <algorithm>
#include <cctype>
#include <cstdio>
#include <sstream>

#include "porofit/poro/minerals.h"

namespace porofit::poro {
namespace {

std::string Lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

std::string Quoted(const std::string& s) { return "'" + s + "'"; }

// "'a', 'b' and 'c'"
std::string QuotedList(const std::vector<std::string>& names) {
  std::string s;
  for (size_t i = 0; i < names.size(); ++i) {
    if (i > 0) s += i + 1 == names.size() ? " and " : ", ";
    s += Quoted(names[i]);
  }
  return s;
}

bool AsksForClays(const std::string& q) { return q == "clay" || q == "clays"; }

// One name contains the other, and the shorter has at least 3 characters
// (so "qu" does not match everything that contains "qu").
bool SharesAPart(const std::string& q, const std::string& name) {
  const std::string& shorter = q.size() <= name.size() ? q : name;
  const std::string& longer = q.size() <= name.size() ? name : q;
  return shorter.size() >= 3 && longer.find(shorter) != std::string::npos;
}

std::string Gpa(double pa) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", pa / 1e9);
  return buf;
}

std::string GramsPerCc(double kg_m3) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", kg_m3 / 1000);
  return buf;
}

}  // namespace

std::vector<std::string> MineralTable::CloseMatches(std::string_view name, std::size_t limit) const {
  const std::string q = Lower(name);
  std::vector<std::string> out;
  auto add = [&](const std::string& n) {
    if (out.size() < limit && std::find(out.begin(), out.end(), n) == out.end()) out.push_back(n);
  };
  if (AsksForClays(q)) {
    for (const auto& [n, m] : minerals_)
      if (m.clay) add(n);
    return out;
  }
  for (const auto& [n, m] : minerals_)
    if (n.rfind(q, 0) == 0) add(n);  // prefix first
  for (const auto& [n, m] : minerals_)
    if (SharesAPart(q, n)) add(n);
  const int max_edits = std::max<int>(2, static_cast<int>(q.size()) / 3);
  std::vector<std::pair<int, std::string>> near;
  for (const auto& [n, m] : minerals_) {
    const int d = EditDistance(q, n);
    if (d <= max_edits) near.emplace_back(d, n);
  }
  std::sort(near.begin(), near.end());
  for (const auto& [d, n] : near) add(n);
  return out;
}

std::string UnknownMineralMessage(const MineralTable& table, std::string_view name) {
  std::string msg = "unknown mineral " + Quoted(std::string(name));
  const std::vector<std::string> close = table.CloseMatches(name);
  if (close.empty()) return msg;
  if (AsksForClays(Lower(name))) return msg + " (the clay minerals are " + QuotedList(close) + ")";
  if (close.size() == 1) return msg + " (did you mean " + Quoted(close[0]) + "?)";
  std::string list;
  for (size_t i = 0; i < close.size(); ++i) list += (i ? ", " : "") + Quoted(close[i]);
  return msg + " (did you mean one of " + list + "?)";
}

std::string DescribeMineralTable(const MineralTable& table, const std::vector<std::string>& from_study) {
  std::ostringstream o;
  o << "Mineral table: " << table.size() << " minerals. Moduli K and mu in GPa, density rho in g/cc; "
       "sigma = 1-sigma uncertainty chosen by porofit, not by the source.\n"
       "source: the published source of the values. checked: how they were compared with it "
       "(against source excerpt; against secondary citation; from memory = recalled, not compared: "
       "check before relying on it).\n"
       "Clay moduli are poorly constrained (tiny particles, variable chemistry, bound water); their "
       "sigmas are 40 % of the value.\n"
       "Grain moduli from mineralogy are decision support only: review by qualified engineers and local "
       "regulations govern any operational use.\n";
  for (const auto& [name, m] : table.minerals()) {
    const bool ours = std::find(from_study.begin(), from_study.end(), name) != from_study.end();
    o << "\n" << name << (m.clay ? " (clay)" : "") << (ours ? " [from the study file]" : "") << "\n"
      << "  K " << Gpa(m.bulk) << " +- " << Gpa(m.sigma_bulk) << " GPa, mu " << Gpa(m.shear) << " +- "
      << Gpa(m.sigma_shear) << " GPa, rho " << GramsPerCc(m.density) << " g/cc\n"
      << "  source:  " << m.source << "\n"
      << "  checked: " << (m.checked.empty() ? std::string("not stated") : m.checked) << "\n";
  }
  return o.str();
}

}  // namespace porofit::poro
