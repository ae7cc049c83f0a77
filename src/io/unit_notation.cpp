#include "undertow/io/unit_notation.hpp"

#include <algorithm>
#include <cctype>
#include <iterator>
#include <stdexcept>
#include <string_view>
#include <utility>
#include <vector>

namespace undertow::io {

namespace {

// The units our tables use, all in the FITS standard (Pence et al. 2010, Tables 3 and 4), with
// "Msun" for its "solMass".
constexpr std::string_view kKnown[] = {"km",  "s",   "m",      "kpc", "pc",  "Msun", "deg",
                                       "rad", "mas", "arcsec", "yr",  "Myr", "Gyr",  "K"};

using Powers = std::vector<std::pair<std::string, int>>; // in order of first appearance

void add(Powers& p, const std::string& name, int power) {
  for (auto& [n, k] : p)
    if (n == name) {
      k += power;
      return;
    }
  p.emplace_back(name, power);
}

// unit := factor (sep factor)*;  sep := spaces | [spaces] ('/' | '*' | '.') [spaces]
// factor := (name | '(' unit ')') [power];  power := ['^' | '**'] signed integer
// Ours ("km/s/kpc", "Msun/pc^3"), the FITS standard's ("km s-1 kpc-1", "km.s**-1") and astropy's
// generic format ("km / (kpc s)", "solMass / pc3") all read.
class Parser {
public:
  explicit Parser(const std::string& s) : s_(s) {}
  Powers unit() {
    Powers p;
    spaces();
    factor(p, 1);
    while (true) {
      const bool gap = spaces();
      if (i_ >= s_.size() || s_[i_] == ')') break;
      int sign = 1;
      if (s_[i_] == '/' || s_[i_] == '*' || s_[i_] == '.') {
        if (s_[i_] == '/') sign = -1;
        ++i_;
        spaces();
      } else if (!gap) {
        fail();
      }
      factor(p, sign);
    }
    return p;
  }
  bool done() const { return i_ == s_.size(); }
  [[noreturn]] void fail() const {
    throw std::invalid_argument("unit '" + s_ + "': cannot read it at character " +
                                std::to_string(i_ + 1));
  }

private:
  bool spaces() {
    const std::size_t b = i_;
    while (i_ < s_.size() && s_[i_] == ' ')
      ++i_;
    return i_ > b;
  }
  void factor(Powers& p, int sign) {
    Powers inner;
    if (i_ < s_.size() && s_[i_] == '(') {
      ++i_;
      inner = unit();
      if (i_ >= s_.size() || s_[i_] != ')') fail();
      ++i_;
    } else {
      const std::size_t b = i_;
      while (i_ < s_.size() && std::isalpha(static_cast<unsigned char>(s_[i_])))
        ++i_;
      if (i_ == b) fail();
      std::string name = s_.substr(b, i_ - b);
      if (name == "solMass") name = "Msun";
      if (std::find(std::begin(kKnown), std::end(kKnown), name) == std::end(kKnown))
        throw std::invalid_argument("unit '" + s_ + "': '" + name +
                                    "' is not a unit FITS knows (a count goes in the name)");
      inner.emplace_back(name, 1);
    }
    int power = 1;
    if (s_.compare(i_, 2, "**") == 0)
      i_ += 2;
    else if (i_ < s_.size() && s_[i_] == '^')
      ++i_;
    const std::size_t b = i_;
    if (i_ < s_.size() && (s_[i_] == '-' || s_[i_] == '+')) ++i_;
    while (i_ < s_.size() && std::isdigit(static_cast<unsigned char>(s_[i_])))
      ++i_;
    if (i_ > b) {
      const std::string digits = s_.substr(b, i_ - b);
      if (digits == "-" || digits == "+") fail();
      power = std::stoi(digits);
    } else if (b > 0 && (s_[b - 1] == '^' || s_[b - 1] == '*')) {
      fail(); // an operator without its power
    }
    for (const auto& [n, k] : inner)
      add(p, n, sign * power * k);
  }
  const std::string& s_;
  std::size_t i_ = 0;
};

Powers parse(const std::string& unit) {
  if (unit.empty()) return {};
  Parser parser(unit);
  Powers p = parser.unit();
  if (!parser.done()) parser.fail();
  return p;
}
} // namespace

bool same_unit(const std::string& a, const std::string& b) {
  auto pa = parse(a), pb = parse(b);
  for (auto* p : {&pa, &pb}) {
    std::erase_if(*p, [](const auto& f) { return f.second == 0; });
    std::sort(p->begin(), p->end());
  }
  return pa == pb;
}

std::string fits_unit(const std::string& unit) {
  const Powers p = parse(unit);
  std::string out;
  for (const auto& [name, k] : p) {
    if (k == 0) continue;
    if (!out.empty()) out += ' ';
    out += name == "Msun" ? "solMass" : name;
    if (k != 1) out += std::to_string(k);
  }
  return out;
}

NamedUnit split_unit_suffix(const std::string& name) {
  // every suffix a key or column of ours ends in, longest first where one ends another
  static const std::pair<const char*, const char*> suffixes[] = {{"_kms_kpc", "km/s/kpc"},
                                                                 {"_km2_s2", "(km/s)^2"},
                                                                 {"_msun_kpc3", "Msun/kpc^3"},
                                                                 {"_msun_pc3", "Msun/pc^3"},
                                                                 {"_kms", "km/s"},
                                                                 {"_kpc", "kpc"},
                                                                 {"_deg", "deg"},
                                                                 {"_gyr", "Gyr"},
                                                                 {"_myr", "Myr"},
                                                                 {"_msun", "Msun"},
                                                                 {"_masyr", "mas/yr"},
                                                                 {"_mas", "mas"}};
  for (const auto& [s, u] : suffixes) {
    const std::string_view sf(s);
    if (name.size() > sf.size() && std::string_view(name).substr(name.size() - sf.size()) == sf)
      return {name.substr(0, name.size() - sf.size()), u};
  }
  return {name, ""};
}

std::string unit_of_name(const std::string& name) {
  return split_unit_suffix(name).unit;
}

} // namespace undertow::io
