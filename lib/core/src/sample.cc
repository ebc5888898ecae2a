#include "porofit/core/sample.h"

namespace porofit {

std::string_view ToString(MeasurementKind k) {
  return k == MeasurementKind::kStatic ? "static" : "dynamic";
}
std::string_view ToString(Branch b) { return b == Branch::kLoading ? "loading" : "unloading"; }
std::string_view ToString(Orientation o) {
  switch (o) {
    case Orientation::kVertical: return "vertical";
    case Orientation::kHorizontal: return "horizontal";
    case Orientation::kInclined: return "inclined";
    case Orientation::kUnknown: break;
  }
  return "unknown";
}
std::string SampleIdProblem(std::string_view id) {
  if (id.empty()) return "must not be empty";
  for (unsigned char c : id)
    if (c < 0x20 || c == 0x7F)
      return "contains the control character \\x" + std::string(1, "0123456789ABCDEF"[c >> 4]) +
             "0123456789ABCDEF"[c & 0xF] + "; ids are printable text";
  if (PrintableText(id) != id) return "is not valid UTF-8";
  size_t chars = 0;
  for (size_t i = 0; i < id.size(); ++i) {
    const unsigned char c = static_cast<unsigned char>(id[i]);
    if ((c & 0xC0) != 0x80) ++chars;  // a character starts here
    // C1 controls U+0080..U+009F are C2 80..C2 9F in UTF-8.
    if (c == 0xC2 && i + 1 < id.size() && static_cast<unsigned char>(id[i + 1]) <= 0x9F)
      return "contains a control character (U+0080 to U+009F); ids are printable text";
  }
  if (chars > kMaxSampleIdLength)
    return "is " + std::to_string(chars) + " characters long, over the limit of " + std::to_string(kMaxSampleIdLength);
  if (id.front() == ' ' || id.back() == ' ') return "must not start or end with a blank";
  return {};
}

void CheckSampleId(std::string_view id, const SourceLocation& at) {
  const std::string problem = SampleIdProblem(id);
  if (problem.empty()) return;
  // A long id is shown by its first 32 characters (cut between characters).
  size_t cut = id.size(), chars = 0;
  for (size_t i = 0; i < id.size(); ++i)
    if ((static_cast<unsigned char>(id[i]) & 0xC0) != 0x80 && ++chars > 32) {
      cut = i;
      break;
    }
  const std::string shown = std::string(id.substr(0, cut)) + (cut < id.size() ? "..." : "");
  throw InputError(at, "'id' " + (id.empty() ? std::string() : "= '" + shown + "' ") + problem);
}

std::string_view ToString(Response r) { return r == Response::kStrain ? "strain" : "modulus"; }

}  // namespace porofit
