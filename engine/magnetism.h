// Magnetic moments of free ions and of ions in a ligand field, in Bohr
// magnetons (μB).
//
//   spin-only moment   μ_so  = √(n(n+2))        n unpaired electrons
//   Landé g-factor     g_J   = 3/2 + [S(S+1) − L(L+1)] / [2J(J+1)]
//                              (electron g-factor taken as 2)
//   J moment           μ_J   = |g_J| √(J(J+1))
//   saturation moment  μ_sat = |g_J| J
//   spin moment        μ_S   = 2S
// Moments are magnitudes: g_J itself is negative for a few terms in which L
// outweighs S (8H3/2 has g_J = -2/5). For J = 0 the g-factor is undefined; it
// is reported as 0, and so are the J and saturation moments, because a J = 0
// level carries no moment.
//
// These are idealised free-ion or crystal-field estimates. Orbital
// quenching, spin-orbit mixing, covalency and exchange all move real
// moments; verify against measurement before relying on them.
//
// Example:
//
//   shellwright::SpinOnlyMoment(5);  // 5.916
//   auto gd = shellwright::TermSymbol::Parse("8So7/2");
//   shellwright::LandeG(*gd);        // 2.0
//   shellwright::JMoment(*gd);       // 7.937
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_MAGNETISM_H_
#define SHELLWRIGHT_ENGINE_MAGNETISM_H_

#include <optional>

#include "absl/strings/string_view.h"
#include "engine/ligand_field.h"
#include "engine/term_symbol.h"

namespace shellwright {

double SpinOnlyMoment(int unpaired_electrons);
double LandeG(const TermSymbol& term);
double JMoment(const TermSymbol& term);
double SaturationMoment(const TermSymbol& term);

// A measured effective moment from data/measured_moments.tsv.
struct MeasuredMoment {
  double moment;  // μB.
  absl::string_view source;
};

// The measured effective moment of the ion (`z`, `charge`), if tabulated.
std::optional<MeasuredMoment> FindMeasuredMoment(int z, int charge);

// The spread of measured room-temperature effective moments of 3d ions
// with `d_electrons` in `geometry` and `spin_state`, widened from the
// spin-only value by the orbital contribution (data/orbital_ranges.tsv,
// after Figgis and Lewis).
struct MomentRange {
  double low;   // μB.
  double high;  // μB.
  absl::string_view source;
};

// The tabulated range, or nullopt where the table has none (4d and 5d
// ions, whose spin-orbit coupling is too strong for it, are not covered:
// callers pass only 3d ions). Thread-safe.
std::optional<MomentRange> FindOrbitalRange(int d_electrons, Geometry geometry,
                                            SpinState spin_state);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_MAGNETISM_H_
