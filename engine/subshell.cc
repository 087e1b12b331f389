#include "engine/subshell.h"

#include <algorithm>
#include <array>

namespace shellwright {
namespace {

struct MadelungTables {
  std::array<Subshell, kNumSubshells> order;
  std::array<int, kNumSubshells> rank;  // Indexed by Subshell::Index().
};

MadelungTables BuildMadelungTables() {
  MadelungTables t;
  for (int i = 0; i < kNumSubshells; ++i) t.order[i] = Subshell::FromIndex(i);
  std::sort(t.order.begin(), t.order.end(),
            [](const Subshell& a, const Subshell& b) {
              if (a.n + a.l != b.n + b.l) return a.n + a.l < b.n + b.l;
              return a.n < b.n;
            });
  for (int i = 0; i < kNumSubshells; ++i) t.rank[t.order[i].Index()] = i;
  return t;
}

const MadelungTables& Tables() {
  static const MadelungTables* const kTables =
      new MadelungTables(BuildMadelungTables());
  return *kTables;
}

}  // namespace

std::string Subshell::ToString() const {
  std::string out = std::to_string(n);
  out.push_back(Letter());
  return out;
}

int OrbitalQuantumNumberFromLetter(char letter) {
  size_t pos = kOrbitalLetters.find(letter);
  return pos == absl::string_view::npos ? -1 : static_cast<int>(pos);
}

absl::Span<const Subshell> MadelungOrder() { return Tables().order; }

int MadelungRank(Subshell s) { return Tables().rank[s.Index()]; }

}  // namespace shellwright
