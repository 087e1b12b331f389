#include "engine/magnetism.h"

#include <array>
#include <cmath>

#include "engine/internal/data_tables.h"

namespace shellwright {

double SpinOnlyMoment(int unpaired_electrons) {
  const double n = unpaired_electrons;
  return std::sqrt(n * (n + 2.0));
}

double LandeG(const TermSymbol& term) {
  if (term.two_j == 0) return 0.0;
  const double s = term.two_s / 2.0;
  const double l = term.l;
  const double j = term.two_j / 2.0;
  return 1.5 + (s * (s + 1.0) - l * (l + 1.0)) / (2.0 * j * (j + 1.0));
}

// Moments are magnitudes: g_J is negative for a few terms (8H3/2: -2/5),
// and the moment's size is what a measurement sees.
double JMoment(const TermSymbol& term) {
  const double j = term.two_j / 2.0;
  return std::abs(LandeG(term)) * std::sqrt(j * (j + 1.0));
}

double SaturationMoment(const TermSymbol& term) {
  return std::abs(LandeG(term)) * term.two_j / 2.0;
}

std::optional<MeasuredMoment> FindMeasuredMoment(int z, int charge) {
  for (const internal::MeasuredMomentRow& row :
       internal::MeasuredMomentRows()) {
    if (row.atomic_number == z && row.charge == charge &&
        row.has_measured_moment) {
      return MeasuredMoment{row.measured_moment, row.source};
    }
  }
  return std::nullopt;
}

namespace {

constexpr int kGeometries = kGeometryCount;

std::optional<MomentRange> LookUpOrbitalRange(int d_electrons,
                                              Geometry geometry,
                                              SpinState spin_state) {
  const absl::string_view geometry_name = Name(geometry);
  // Where both spin states put the electrons alike (octahedral d3, d8),
  // the table lists one of them: either matches.
  const bool either =
      SplitD(d_electrons, geometry, SpinState::kHigh).unpaired ==
      SplitD(d_electrons, geometry, SpinState::kLow).unpaired;
  // The table lists no intermediate-spin ion: one that fills as a low-
  // or high-spin one does (square-planar d7 to d9) takes that row, others
  // none (spin-only).
  bool low_spin = spin_state == SpinState::kLow;
  if (spin_state == SpinState::kIntermediate) {
    const int unpaired =
        SplitD(d_electrons, geometry, SpinState::kIntermediate).unpaired;
    low_spin =
        unpaired == SplitD(d_electrons, geometry, SpinState::kLow).unpaired;
    if (!low_spin &&
        unpaired != SplitD(d_electrons, geometry, SpinState::kHigh).unpaired) {
      return std::nullopt;
    }
  }
  for (const internal::OrbitalRangeRow& row : internal::OrbitalRangeRows()) {
    if (row.d_electrons == d_electrons &&
        (either || row.low_spin == low_spin) && geometry_name == row.geometry) {
      return MomentRange{row.moment_low, row.moment_high, row.source};
    }
  }
  return std::nullopt;
}

}  // namespace

std::optional<MomentRange> FindOrbitalRange(int d_electrons, Geometry geometry,
                                            SpinState spin_state) {
  if (geometry == Geometry::kFree || d_electrons < 0 || d_electrons > 10) {
    return std::nullopt;
  }
  // Every record's d ions ask: look each key up once.
  constexpr int kSpins = 3;  // SpinState values.
  using Table =
      std::array<std::optional<MomentRange>, 11 * kGeometries * kSpins>;
  static const Table* const kTable = [] {
    auto* t = new Table;
    for (int d = 0; d <= 10; ++d) {
      for (int g = 1; g < kGeometries; ++g) {
        for (int spin = 0; spin < kSpins; ++spin) {
          (*t)[(d * kGeometries + g) * kSpins + spin] = LookUpOrbitalRange(
              d, static_cast<Geometry>(g), static_cast<SpinState>(spin));
        }
      }
    }
    return t;
  }();
  return (*kTable)[(d_electrons * kGeometries + static_cast<int>(geometry)) *
                       kSpins +
                   static_cast<int>(spin_state)];
}

}  // namespace shellwright
