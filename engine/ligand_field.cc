#include "engine/ligand_field.h"

#include <algorithm>

#include "absl/strings/str_cat.h"
#include "engine/internal/text.h"

namespace shellwright {
namespace {

struct LevelSpec {
  absl::string_view name;
  int orbitals;
};

std::vector<LevelSpec> LevelsFor(Geometry g) {
  switch (g) {
    case Geometry::kOctahedral:
      return {{"t2g", 3}, {"eg", 2}};
    case Geometry::kTetrahedral:
      return {{"e", 2}, {"t2", 3}};
    case Geometry::kSquarePlanar:
      return {{"eg", 2}, {"a1g", 1}, {"b2g", 1}, {"b1g", 1}};
    case Geometry::kFree:
      break;
  }
  return {{"d", 5}};
}

}  // namespace

absl::string_view GeometryName(Geometry g) {
  switch (g) {
    case Geometry::kFree:
      return "free";
    case Geometry::kOctahedral:
      return "octahedral";
    case Geometry::kTetrahedral:
      return "tetrahedral";
    case Geometry::kSquarePlanar:
      return "square_planar";
  }
  return "free";
}

absl::string_view SpinStatePreferenceName(SpinStatePreference s) {
  switch (s) {
    case SpinStatePreference::kAuto:
      return "auto";
    case SpinStatePreference::kHigh:
      return "high";
    case SpinStatePreference::kLow:
      return "low";
  }
  return "auto";
}

absl::string_view SpinStateName(SpinState s) {
  return s == SpinState::kHigh ? "high" : "low";
}

absl::StatusOr<Geometry> ParseGeometry(absl::string_view text) {
  if (text == "free") return Geometry::kFree;
  if (text == "octahedral") return Geometry::kOctahedral;
  if (text == "tetrahedral") return Geometry::kTetrahedral;
  if (text == "square_planar" || text == "square-planar") {
    return Geometry::kSquarePlanar;
  }
  return absl::InvalidArgumentError(absl::StrCat(
      "unknown geometry ", internal::QuoteForMessage(text),
      " (expected free, octahedral, tetrahedral or square_planar)"));
}

absl::StatusOr<SpinStatePreference> ParseSpinStatePreference(
    absl::string_view text) {
  if (text == "auto") return SpinStatePreference::kAuto;
  if (text == "high") return SpinStatePreference::kHigh;
  if (text == "low") return SpinStatePreference::kLow;
  return absl::InvalidArgumentError(
      absl::StrCat("unknown spin state ", internal::QuoteForMessage(text),
                   " (expected auto, high or low)"));
}

SpinState ResolveSpinState(Geometry geometry, SpinStatePreference preference,
                           int n) {
  if (preference == SpinStatePreference::kHigh) return SpinState::kHigh;
  if (preference == SpinStatePreference::kLow) return SpinState::kLow;
  switch (geometry) {
    case Geometry::kOctahedral:
      return n <= 3 ? SpinState::kHigh : SpinState::kLow;
    case Geometry::kTetrahedral:
      return SpinState::kHigh;
    case Geometry::kSquarePlanar:
      return SpinState::kLow;
    case Geometry::kFree:
      break;
  }
  return SpinState::kHigh;
}

std::string LigandFieldSplitting::Notation() const {
  std::string out;
  for (const SplitLevel& level : levels) {
    if (!out.empty()) out.push_back(' ');
    absl::StrAppend(&out, level.name, level.electrons);
  }
  return out;
}

LigandFieldSplitting SplitD(int d_electrons, Geometry geometry,
                            SpinState spin_state) {
  LigandFieldSplitting result;
  result.geometry = geometry;
  result.spin_state = spin_state;
  const std::vector<LevelSpec> specs = LevelsFor(geometry);
  std::vector<int> filled(specs.size(), 0);
  int left = std::clamp(d_electrons, 0, 10);
  if (spin_state == SpinState::kLow) {
    for (size_t i = 0; i < specs.size() && left > 0; ++i) {
      filled[i] = std::min(left, 2 * specs[i].orbitals);
      left -= filled[i];
    }
  } else {
    // Singly occupy every orbital, lowest level first, then pair.
    for (int pass = 0; pass < 2; ++pass) {
      for (size_t i = 0; i < specs.size() && left > 0; ++i) {
        const int add = std::min(left, specs[i].orbitals);
        filled[i] += add;
        left -= add;
      }
    }
  }
  for (size_t i = 0; i < specs.size(); ++i) {
    const int orbitals = specs[i].orbitals;
    const int e = filled[i];
    const int unpaired = e <= orbitals ? e : 2 * orbitals - e;
    result.levels.push_back(SplitLevel{specs[i].name, orbitals, e, unpaired});
    result.unpaired += unpaired;
  }
  return result;
}

}  // namespace shellwright
