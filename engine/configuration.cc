#include "engine/configuration.h"

#include <algorithm>

#include "absl/strings/str_cat.h"
#include "engine/internal/text.h"

namespace shellwright {
namespace {

using internal::QuoteForMessage;

constexpr NobleGasCore kCores[] = {{"He", 2},  {"Ne", 10}, {"Ar", 18},
                                   {"Kr", 36}, {"Xe", 54}, {"Rn", 86},
                                   {"Og", 118}};

// Subshells in the order "n, then l", which is simply index order.
constexpr Subshell SubshellAt(int index) { return Subshell::FromIndex(index); }

void AppendSubshell(Subshell s, int electrons, std::string* out) {
  if (!out->empty()) out->push_back(' ');
  absl::StrAppend(out, s.n);
  out->push_back(s.Letter());
  absl::StrAppend(out, electrons);
}

// True when every subshell of the Madelung configuration with
// `core_electrons` electrons is full in `c`.
bool ContainsCore(const Configuration& c, int core_electrons) {
  int remaining = core_electrons;
  for (Subshell s : MadelungOrder()) {
    if (remaining == 0) return true;
    if (c.occupancy(s) != s.Capacity()) return false;
    remaining -= s.Capacity();
  }
  return remaining == 0;
}

absl::Status ParseError(absl::string_view text, absl::string_view problem) {
  return absl::InvalidArgumentError(
      absl::StrCat("configuration ", QuoteForMessage(text), ": ", problem));
}

}  // namespace

absl::Span<const NobleGasCore> NobleGasCores() { return kCores; }

int Configuration::MaxElectrons() {
  int total = 0;
  for (int i = 0; i < kNumSubshells; ++i) total += SubshellAt(i).Capacity();
  return total;
}

Configuration Configuration::Madelung(int electrons) {
  Configuration c;
  for (Subshell s : MadelungOrder()) {
    if (electrons <= 0) break;
    const int take = std::min(electrons, s.Capacity());
    c.occupancy_[s.Index()] = static_cast<uint8_t>(take);
    electrons -= take;
  }
  return c;
}

absl::Status Configuration::SetOccupancy(Subshell s, int electrons) {
  if (electrons < 0) {
    return absl::InvalidArgumentError(absl::StrCat(
        "subshell ", s.ToString(), ": negative occupancy ", electrons));
  }
  if (electrons > s.Capacity()) {
    return absl::InvalidArgumentError(
        absl::StrCat("subshell ", s.ToString(), " holds ", electrons,
                     " electrons, above its Pauli capacity of ", s.Capacity()));
  }
  occupancy_[s.Index()] = static_cast<uint8_t>(electrons);
  return absl::OkStatus();
}

int Configuration::electrons() const {
  int total = 0;
  for (uint8_t e : occupancy_) total += e;
  return total;
}

std::vector<Subshell> Configuration::OccupiedSubshells() const {
  std::vector<Subshell> out;
  for (int i = 0; i < kNumSubshells; ++i) {
    if (occupancy_[i] > 0) out.push_back(SubshellAt(i));
  }
  return out;
}

std::vector<Subshell> Configuration::OpenSubshells() const {
  std::vector<Subshell> out;
  for (int i = 0; i < kNumSubshells; ++i) {
    const Subshell s = SubshellAt(i);
    if (occupancy_[i] > 0 && occupancy_[i] < s.Capacity()) out.push_back(s);
  }
  return out;
}

bool Configuration::IsClosedShell() const {
  for (int i = 0; i < kNumSubshells; ++i) {
    if (occupancy_[i] != 0 && occupancy_[i] != SubshellAt(i).Capacity()) {
      return false;
    }
  }
  return true;
}

std::string Configuration::ToCoreNotation(int max_core_electrons) const {
  const NobleGasCore* core = nullptr;
  for (const NobleGasCore& candidate : kCores) {
    if (candidate.electrons > max_core_electrons) break;
    if (ContainsCore(*this, candidate.electrons)) core = &candidate;
  }
  // Mark the subshells inside the core.
  std::array<bool, kNumSubshells> in_core{};
  if (core != nullptr) {
    int remaining = core->electrons;
    for (Subshell s : MadelungOrder()) {
      if (remaining == 0) break;
      in_core[s.Index()] = true;
      remaining -= s.Capacity();
    }
  }
  std::string rest;
  for (int i = 0; i < kNumSubshells; ++i) {
    if (!in_core[i] && occupancy_[i] > 0) {
      AppendSubshell(SubshellAt(i), occupancy_[i], &rest);
    }
  }
  if (core == nullptr) return rest;
  // A bare helium core is clearer written out.
  if (rest.empty() && core->electrons == 2) return "1s2";
  std::string out = absl::StrCat("[", core->symbol, "]");
  if (!rest.empty()) absl::StrAppend(&out, " ", rest);
  return out;
}

std::string Configuration::ToFullNotation() const {
  std::string out;
  for (int i = 0; i < kNumSubshells; ++i) {
    if (occupancy_[i] > 0) AppendSubshell(SubshellAt(i), occupancy_[i], &out);
  }
  return out;
}

std::string Configuration::ToFillingOrderNotation() const {
  std::string out;
  for (Subshell s : MadelungOrder()) {
    const int e = occupancy_[s.Index()];
    if (e > 0) AppendSubshell(s, e, &out);
  }
  return out;
}

int Configuration::UnpairedElectrons() const {
  int total = 0;
  for (int i = 0; i < kNumSubshells; ++i) {
    total += HundUnpairedElectrons(SubshellAt(i).l, occupancy_[i]);
  }
  return total;
}

absl::StatusOr<Configuration> Configuration::Parse(absl::string_view text) {
  if (text.size() > kMaxConfigurationLength) {
    return absl::InvalidArgumentError(absl::StrCat(
        "configuration is ", text.size(), " bytes long, above the limit of ",
        kMaxConfigurationLength));
  }
  Configuration c;
  std::array<bool, kNumSubshells> seen{};
  bool any_token = false;
  size_t pos = 0;
  while (pos < text.size()) {
    while (pos < text.size() && (text[pos] == ' ' || text[pos] == '\t')) ++pos;
    if (pos == text.size()) break;
    size_t end = pos;
    while (end < text.size() && text[end] != ' ' && text[end] != '\t') ++end;
    const absl::string_view token = text.substr(pos, end - pos);
    const bool first = !any_token;
    any_token = true;
    pos = end;

    if (token.front() == '[') {
      if (!first) {
        return ParseError(text, absl::StrCat("core ", QuoteForMessage(token),
                                             " must come first"));
      }
      const NobleGasCore* core = nullptr;
      if (token.size() >= 3 && token.back() == ']') {
        const absl::string_view name = token.substr(1, token.size() - 2);
        for (const NobleGasCore& candidate : kCores) {
          if (candidate.symbol == name) core = &candidate;
        }
      }
      if (core == nullptr) {
        return ParseError(
            text,
            absl::StrCat("unknown noble-gas core ", QuoteForMessage(token),
                         " (expected one of [He] [Ne] [Ar] [Kr] [Xe] "
                         "[Rn] [Og])"));
      }
      Configuration core_config = Madelung(core->electrons);
      for (int i = 0; i < kNumSubshells; ++i) {
        if (core_config.occupancy_[i] > 0) seen[i] = true;
      }
      c = core_config;
      continue;
    }

    // <n><letter><count>, e.g. 3d10 or 3d¹⁰.
    size_t i = 0;
    int n = 0;
    while (i < token.size() && token[i] >= '0' && token[i] <= '9' && n < 100) {
      n = n * 10 + (token[i] - '0');
      ++i;
    }
    if (i == 0 || i == token.size()) {
      return ParseError(
          text, absl::StrCat("malformed subshell ", QuoteForMessage(token),
                             " (expected e.g. 3d6)"));
    }
    const int l = OrbitalQuantumNumberFromLetter(token[i]);
    if (l < 0) {
      return ParseError(
          text,
          absl::StrCat("unknown orbital letter in ", QuoteForMessage(token),
                       " (expected a lowercase letter s, p, d, f, g, h, "
                       "i or k)"));
    }
    ++i;
    if (n < 1 || n > kMaxPrincipalQuantumNumber) {
      return ParseError(
          text,
          absl::StrCat("principal quantum number in ", QuoteForMessage(token),
                       " must be from 1 to ", kMaxPrincipalQuantumNumber));
    }
    if (l >= n) {
      return ParseError(text,
                        absl::StrCat("subshell ", QuoteForMessage(token),
                                     " does not exist: l must be less than n"));
    }
    int count = 0;
    int digits = 0;
    while (i < token.size()) {
      int digit = 0;
      const size_t used = internal::DecodeDigit(
          token.substr(i), internal::DigitForms::kAsciiOrSuperscript, &digit);
      if (used == 0) break;
      if (digits < 4) count = count * 10 + digit;
      ++digits;
      i += used;
    }
    if (digits == 0) {
      return ParseError(text, absl::StrCat("subshell ", QuoteForMessage(token),
                                           " has no electron count"));
    }
    if (i != token.size()) {
      return ParseError(
          text, absl::StrCat("malformed subshell ", QuoteForMessage(token),
                             " (expected e.g. 3d6)"));
    }
    const Subshell s{n, l};
    if (seen[s.Index()]) {
      return ParseError(text,
                        absl::StrCat("subshell ", s.ToString(),
                                     " is given twice or is inside the core"));
    }
    seen[s.Index()] = true;
    if (digits >= 4 || count > s.Capacity()) {
      return ParseError(text,
                        absl::StrCat("subshell ", s.ToString(), " holds ",
                                     digits >= 4 ? std::string("more than 999")
                                                 : std::to_string(count),
                                     " electrons, above its Pauli capacity of ",
                                     s.Capacity()));
    }
    c.occupancy_[s.Index()] = static_cast<uint8_t>(count);
  }
  if (!any_token) return ParseError(text, "no subshells given");
  return c;
}

}  // namespace shellwright
