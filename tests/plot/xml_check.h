#pragma once
// A small recursive-descent XML well-formedness checker for test use: nested
// and matching tags, quoted unique attributes, known entities, one root
// element, no stray '<' or '&'. It does not validate against a schema.
#include <set>
#include <string>
#include <string_view>

namespace porofit::plot::testing {

class XmlChecker {
 public:
  /// Empty string when `text` is well-formed, else a message with the offset.
  static std::string Check(std::string_view text) {
    XmlChecker c(text);
    try {
      c.Document();
    } catch (const std::string& e) {
      return e + " at offset " + std::to_string(c.pos_);
    }
    return "";
  }

 private:
  explicit XmlChecker(std::string_view t) : t_(t) {}

  void Document() {
    if (Starts("<?xml")) Skip("?>");
    Space();
    while (Starts("<!--")) { Skip("-->"); Space(); }
    if (!Starts("<")) throw std::string("expected root element");
    Element();
    Space();
    while (Starts("<!--")) { Skip("-->"); Space(); }
    if (pos_ != t_.size()) throw std::string("content after root element");
  }

  void Element() {
    Expect('<');
    const std::string name = Name();
    std::set<std::string> attrs;
    for (;;) {
      const bool had_space = Space();
      if (Starts("/>")) { pos_ += 2; return; }
      if (Starts(">")) { ++pos_; break; }
      if (!had_space) throw std::string("expected space before attribute");
      const std::string a = Name();
      if (!attrs.insert(a).second) throw std::string("duplicate attribute " + a);
      Space();
      Expect('=');
      Space();
      if (pos_ >= t_.size() || (t_[pos_] != '"' && t_[pos_] != '\'')) throw std::string("unquoted attribute " + a);
      const char q = t_[pos_++];
      while (pos_ < t_.size() && t_[pos_] != q) {
        if (t_[pos_] == '<') throw std::string("'<' in attribute " + a);
        if (t_[pos_] == '&') Entity(); else ++pos_;
      }
      Expect(q);
    }
    // Content until the matching end tag.
    for (;;) {
      if (pos_ >= t_.size()) throw std::string("unclosed element " + name);
      if (Starts("</")) {
        pos_ += 2;
        const std::string end = Name();
        if (end != name) throw std::string("end tag " + end + " does not match " + name);
        Space();
        Expect('>');
        return;
      }
      if (Starts("<!--")) { Skip("-->"); continue; }
      if (Starts("<![CDATA[")) { Skip("]]>"); continue; }
      if (Starts("<")) { Element(); continue; }
      if (t_[pos_] == '&') { Entity(); continue; }
      ++pos_;
    }
  }

  void Entity() {
    const std::size_t end = t_.find(';', pos_);
    if (end == std::string_view::npos) throw std::string("unterminated entity");
    const std::string_view e = t_.substr(pos_ + 1, end - pos_ - 1);
    static const std::set<std::string_view> kKnown = {"amp", "lt", "gt", "quot", "apos"};
    const bool numeric = e.size() > 1 && e[0] == '#';
    if (!numeric && !kKnown.count(e)) throw std::string("unknown entity &" + std::string(e) + ";");
    pos_ = end + 1;
  }

  std::string Name() {
    const std::size_t start = pos_;
    while (pos_ < t_.size()) {
      const char c = t_[pos_];
      const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_' || c == ':' ||
                      (pos_ > start && ((c >= '0' && c <= '9') || c == '-' || c == '.'));
      if (!ok) break;
      ++pos_;
    }
    if (pos_ == start) throw std::string("expected a name");
    return std::string(t_.substr(start, pos_ - start));
  }

  bool Space() {
    const std::size_t start = pos_;
    while (pos_ < t_.size() && (t_[pos_] == ' ' || t_[pos_] == '\n' || t_[pos_] == '\t' || t_[pos_] == '\r')) ++pos_;
    return pos_ > start;
  }
  bool Starts(std::string_view s) const { return t_.substr(pos_, s.size()) == s; }
  void Expect(char c) {
    if (pos_ >= t_.size() || t_[pos_] != c) throw std::string("expected '") + c + "'";
    ++pos_;
  }
  void Skip(std::string_view end) {
    const std::size_t e = t_.find(end, pos_);
    if (e == std::string_view::npos) throw std::string("unterminated ") + std::string(end);
    pos_ = e + end.size();
  }

  std::string_view t_;
  std::size_t pos_ = 0;
};

}  // namespace porofit::plot::testing
