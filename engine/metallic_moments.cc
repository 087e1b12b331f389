#include "engine/metallic_moments.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "engine/configuration.h"
#include "engine/magnetism.h"
#include "engine/rational.h"
#include "engine/term_symbol.h"

namespace shellwright {
namespace {

// Measured saturation moment of bcc Fe at 0 K, μB per atom (Kittel,
// Introduction to Solid State Physics, 8th ed., table of ferromagnetic
// crystals, from memory): the rising branch passes through it.
constexpr double kIronMoment = 2.22;
// Rising branch of the Slater-Pauling curve (bcc Fe with V, Cr, Mn, Ti):
// +1 μB per valence electron (the Fe-Cr and Fe-V lines of the
// Slater-Pauling plot, Chikazumi, Physics of Ferromagnetism, 2nd ed.
// (1997), from memory), anchored at bcc Fe: M = n - 5.78.
constexpr double kRisingOffset = 8.0 - kIronMoment;
// Below this mean valence count the rising branch is not used: moments of
// Fe-Cr and Fe-V fall away from the line (Fe-30Cr is n = 7.4).
constexpr double kRisingFloor = 7.4;
// Falling branch, strong ferromagnets: M = 2 N_sp↑ + Σ x_i Z_m,i with
// magnetic valence Z_m = 2 N_d↑ - Z, N_d↑ = 5 for Mn..Zn and 0 for earlier
// metals and sp elements, and 2 N_sp↑ = 0.6 (Williams et al., J. Appl.
// Phys. 53, 2019 (1982); Malozemoff, Williams and Moruzzi, Phys. Rev. B
// 29, 1620 (1984), from memory). For late 3d metals alone it is the
// familiar M = 10.6 - n.
constexpr double kSpPolarisation = 0.6;
// The 0.6 fits Ni and its fcc alloys. Measured total moments of Co and of
// the Fe-Co alloys lie 0.15 μB higher, on M = 10.75 - n: hcp Co 1.72, the
// Fe-Co peak about 2.46 near 30% Co, equiatomic FeCo about 2.35 (Bardos,
// J. Appl. Phys. 40, 1371 (1969); Bozorth, Ferromagnetism (1951); from
// memory). The offset grows from 0.6 to 0.75 with the share of Fe and Co
// among Fe, Co and Ni (an interpolation: common practice, no source).
constexpr double kFeCoExtraPolarisation = 0.15;
// Most main-group atoms a 3d alloy may hold for the curve (common
// practice, no source): ordered compounds such as Fe3Al and Fe3C lie off it.
constexpr double kMaxMainGroupFraction = 0.10;
// Most Mn an alloy may hold (Mn-rich alloys order antiferromagnetically).
constexpr double kMaxManganeseFraction = 0.10;
// Per-atom 3d moments in 3d-rich rare-earth intermetallics, μB: Fe from
// Y2Fe14B, 31.4 μB per formula unit at 4.2 K (Herbst, Rev. Mod. Phys. 63,
// 819 (1991), from memory: 2.24 per Fe); Co from YCo5, about 8 μB per
// formula unit (Buschow, Rep. Prog. Phys. 40, 1179 (1977), from memory:
// 1.6 per Co). Ni carries almost none in RNi5 and RNi2 (ibid.).
constexpr double kIronMomentWithRareEarth = 2.2;
constexpr double kCobaltMomentWithRareEarth = 1.6;
// Fe + Co share of the metal atoms above which a rare-earth compound is
// "3d rich" (RCo5, R2Fe17, R2Fe14B, R2Co17, RFe11Ti); in RFe2, RCo2, RFe3
// the 3d moment is reduced or only induced (common practice, no source).
constexpr double kMin3dShareWithRareEarth = 0.8;
// The Fe moment of the cubic Laves phases RFe2: YFe2 holds 2.9 μB per
// formula unit at 4.2 K (Buschow, Rep. Prog. Phys. 40, 1179 (1977), from
// memory), 1.45 per Fe; the heavy rare earths order against it (GdFe2
// about 3.7 μB, TbFe2 about 5.8 μB per formula unit, ibid.).
constexpr double kIronMomentInLavesPhase = 1.45;
// The Co moment of the cubic Laves phases RCo2 with a heavy rare earth:
// Co is an exchange-enhanced Pauli paramagnet in YCo2 and LuCo2, and the
// heavy rare earth's exchange field induces about 1 μB per Co, antiparallel
// to the 4f moment (GdCo2 about 4.8 μB per formula unit at 4.2 K, ErCo2
// about 6.9; Gratz and Markosyan, J. Phys.: Condens. Matter 13, R385
// (2001), and Duc and Goto, Handbook on the Physics and Chemistry of Rare
// Earths 26 (1999), from memory).
constexpr double kInducedCobaltMomentInLavesPhase = 1.0;
// The Fe moment of the tetragonal ThMn12-type phases RFe11M, whose
// stabilising atom M (Ti, V, Si) lowers it (RFe10M2 falls below the 3d
// share that the rule asks, and gets none): YFe11Ti holds about
// 19-20 μB per formula unit at 4.2 K, about 1.8 per Fe (Buschow, Rep. Prog.
// Phys. 54, 1123 (1991); Coey, Magnetism and Magnetic Materials (2010);
// from memory); SmFe11Ti and NdFe11Ti add their light rare-earth moment.
constexpr double kIronMomentInThMn12Phase = 1.8;
// Largest moments the Heusler rules allow (Galanakis, Dederichs and
// Papanikolaou, Phys. Rev. B 66, 174429 and 134428 (2002), from memory):
// beyond them the minority gap that the rules count on cannot hold.
constexpr double kMaxFullHeuslerMoment = 7;
constexpr double kMaxHalfHeuslerMoment = 5;
// Full Heuslers below 24 valence electrons keep the rule with the spin
// roles swapped, |M| = 24 - Z_t, down to Z_t = 21: the half-metallic
// ferrimagnets Mn2VAl and Mn2VGa, -2 μB by the rule, measure about 1.9 μB
// per formula unit (Galanakis et al., Phys. Rev. B 75, 092407 (2007);
// Jiang, Venkatesan and Coey, Solid State Commun. 118, 513 (2001); from
// memory).
constexpr double kMinFullHeuslerMoment = -3;

bool IsRareEarth(const Element& e) {
  return e.atomic_number == 39 ||
         (e.atomic_number >= 57 && e.atomic_number <= 71);
}
bool Is3d(const Element& e) {
  return e.atomic_number >= 21 && e.atomic_number <= 30;
}
// Main-group (s or p block) elements, but for the noble gases.
bool IsMainGroup(const Element& e) {
  return (e.block == Block::kS || e.block == Block::kP) && e.group != 18;
}
// The Z element of a Heusler compound: groups 13 to 15 from period 3 on.
bool IsHeuslerZ(const Element& e) {
  return e.block == Block::kP && e.group >= 13 && e.group <= 15 &&
         e.period >= 3;
}

MetallicMomentEstimate None(MetallicMomentEstimate e, std::string reason) {
  e.model = MomentModel::kNone;
  e.saturation.reset();
  e.effective.reset();
  e.localized_unpaired = 0;
  e.note = std::move(reason);
  return e;
}

// M = Z_t - offset per formula unit of the rule's, within min..max; `cz`
// counts the formula's formula units of the Heusler compound (its Z atoms).
MetallicMomentEstimate ApplyHeuslerRule(MetallicMomentEstimate e,
                                        const Rational& cz, MomentModel model,
                                        absl::string_view kind, int offset,
                                        double max, double min = 0) {
  const double zt = e.total_valence_electrons / cz.ToDouble();
  const double m = zt - offset;
  if (m < min || m > max) {
    return None(e, absl::StrFormat("%s: Z_t - %d = %g lies outside the "
                                   "rule's %g to %g μB; no estimate",
                                   kind, offset, m, min, max));
  }
  e.model = model;
  e.saturation = std::abs(m) * cz.ToDouble();
  e.note = absl::StrFormat(
      "%s (Slater-Pauling rule): M = Z_t - %d = %g - %d = %g μB per %s%s", kind,
      offset, zt, offset, m, kind.substr(kind.rfind(' ') + 1),
      m < 0 ? "; below 24 electrons the minority spin holds the moment: "
              "a half-metallic ferrimagnet of |M| (Mn2VAl)"
            : "");
  return e;
}

// Quaternary and substituted Heusler compounds: four or more elements,
// transition metals and Z atoms (groups 13 to 15) only, two or three
// transition-metal atoms per Z atom. The rules hold with Z_t counted over
// the whole formula unit: the LiMgPdSn-type quaternary XX'YZ (CoFeMnSi,
// 4 μB by the rule, about 3.7 measured: Bainsla et al., Phys. Rev. B 91,
// 104408 (2015); Oezdogan, Sasioglu and Galanakis, J. Appl. Phys. 113,
// 193903 (2013); from memory) and the substitution series Co2Mn1-xFexSi,
// from 5 to 6 μB with x (Balke et al., Phys. Rev. B 74, 104405 (2006), from
// memory). The exceptions of the ternary rule stay out: a full site of the
// Ni or Cu group, or of 4d and 5d metals beyond one site (Y).
std::optional<MetallicMomentEstimate> EstimateMixedHeusler(
    absl::Span<const ElementAmount> a, MetallicMomentEstimate e) {
  // The elements first, with no arithmetic: most alloys leave here.
  for (const ElementAmount& amount : a) {
    if (!IsHeuslerZ(*amount.element) && !IsTransitionMetal(*amount.element)) {
      return std::nullopt;
    }
  }
  Rational z(0), tm(0), late(0), heavy(0);
  for (const ElementAmount& amount : a) {
    const Element& el = *amount.element;
    if (IsHeuslerZ(el)) {
      z = z + amount.count;
    } else {
      tm = tm + amount.count;
      if (el.group == 10 || el.group == 11) late = late + amount.count;
      if (el.period >= 5) heavy = heavy + amount.count;
    }
  }
  if (z.IsZero() || tm.IsZero()) return std::nullopt;
  if (tm == z * Rational(2)) {
    return ApplyHeuslerRule(std::move(e), z, MomentModel::kHalfHeusler,
                            "half-Heusler XYZ", 18, kMaxHalfHeuslerMoment);
  }
  if (tm != z * Rational(3)) return std::nullopt;
  if (!(late < z) || z < heavy) {
    return None(e,
                "full Heusler with a full site of the Ni or Cu group, or "
                "4d and 5d metals beyond the Y site: outside M = Z_t - 24; "
                "no estimate");
  }
  return ApplyHeuslerRule(std::move(e), z, MomentModel::kFullHeusler,
                          "full Heusler XX'YZ", 24, kMaxFullHeuslerMoment,
                          kMinFullHeuslerMoment);
}

// Heusler X2YZ (counts 2:1:1) or XYZ (1:1:1) with Z from groups 13 to 15
// and X, Y transition metals; empty when the amounts are neither.
std::optional<MetallicMomentEstimate> EstimateHeusler(
    absl::Span<const ElementAmount> a, MetallicMomentEstimate e) {
  if (a.size() > 3) return EstimateMixedHeusler(a, std::move(e));
  if (a.size() != 3) return std::nullopt;
  int z = -1;
  for (int i = 0; i < 3; ++i) {
    if (IsHeuslerZ(*a[i].element)) {
      if (z >= 0) return std::nullopt;
      z = i;
    } else if (!IsTransitionMetal(*a[i].element)) {
      return std::nullopt;
    }
  }
  if (z < 0) return std::nullopt;
  const int p = (z + 1) % 3, q = (z + 2) % 3;
  const Rational& cz = a[z].count;
  auto apply = [&e, &cz](MomentModel model, absl::string_view kind, int offset,
                         double max, double min = 0) {
    return ApplyHeuslerRule(e, cz, model, kind, offset, max, min);
  };
  if (a[p].count == cz && a[q].count == cz) {
    // Galanakis et al., Phys. Rev. B 66, 134428 (2002), from memory.
    return apply(MomentModel::kHalfHeusler, "half-Heusler XYZ", 18,
                 kMaxHalfHeuslerMoment);
  }
  int x = -1;
  if (a[p].count == cz * Rational(2) && a[q].count == cz) x = p;
  if (a[q].count == cz * Rational(2) && a[p].count == cz) x = q;
  if (x < 0) return std::nullopt;
  const Element& xe = *a[x].element;
  if (xe.group == 10 || xe.group == 11) {
    // Graf, Felser and Parkin, Prog. Solid State Chem. 39, 1 (2011), from
    // memory: Ni2- and Cu2-based Heusler compounds (Ni2MnGa about 4 μB,
    // Cu2MnAl about 3.6 μB, where the rule says 6 and 8) carry a localised
    // Mn moment instead; their Pd, Pt, Ag and Au homologues likewise.
    return None(e, absl::StrCat("full Heusler ", xe.symbol,
                                "2YZ: compounds with X from the Ni or Cu "
                                "group fall outside M = Z_t - 24 (their "
                                "moment sits on Y); no estimate"));
  }
  if (xe.period >= 5) {
    // The rule's domain is X from the 3d series (Co2, Fe2, Mn2; Galanakis
    // et al., Phys. Rev. B 66, 174429 (2002), from memory). With a 4d or
    // 5d X the Mn moment stays local and the Ru2 compounds order
    // antiferromagnetically: Ru2MnSi, Ru2MnGe and Ru2MnSn have Neel
    // points of about 300 K (Kanomata et al., J. Alloys Compd. 393, 26
    // (2005), from memory), where the rule says 3 uB.
    return None(e, absl::StrCat("full Heusler ", xe.symbol,
                                "2YZ: the Slater-Pauling rule holds for X "
                                "from the 3d series; with a 4d or 5d X the "
                                "moment sits on Y and orders "
                                "antiferromagnetically in Ru2MnZ; no "
                                "estimate"));
  }
  // Galanakis et al., Phys. Rev. B 66, 174429 (2002), from memory.
  return apply(MomentModel::kFullHeusler, "full Heusler X2YZ", 24,
               kMaxFullHeuslerMoment, kMinFullHeuslerMoment);
}

// Rare earths (Y, La-Lu) with no magnetic partner, or with a 3d-rich
// Fe/Co sublattice; empty when the composition holds no rare earth.
std::optional<MetallicMomentEstimate> EstimateRareEarth(
    absl::Span<const ElementAmount> a, MetallicMomentEstimate e) {
  if (std::none_of(a.begin(), a.end(), [](const ElementAmount& amount) {
        return IsRareEarth(*amount.element);
      })) {
    return std::nullopt;
  }
  double light = 0, heavy = 0, mu2 = 0, unpaired = 0, fe = 0, co = 0;
  double metal_atoms = 0, rare = 0;
  bool sm = false, eu = false, ce_or_yb = false;
  double cerium_moment = 0;  // The Ce3+ moments counted in `light`.
  for (const ElementAmount& amount : a) {
    const Element& el = *amount.element;
    const double c = amount.count.ToDouble();
    if (!IsRareEarth(el)) {
      // Interstitial H, B, C, N do not count among the metal atoms.
      const bool interstitial = el.period <= 2 && el.block != Block::kS;
      const bool partner = el.block == Block::kS || el.block == Block::kP ||
                           el.symbol == "Fe" || el.symbol == "Co" ||
                           el.symbol == "Ni" || el.symbol == "Cu" ||
                           el.symbol == "Zn" || el.symbol == "Ti" ||
                           el.symbol == "V" || el.symbol == "Zr";
      if (!partner || el.group == 18) {
        return None(e, absl::StrCat("rare earth with ", el.symbol,
                                    ": outside the rare-earth rules' domain "
                                    "(Fe, Co, non-magnetic partners); no "
                                    "estimate"));
      }
      if (!interstitial && el.symbol != "H") metal_atoms += c;
      if (el.symbol == "Fe") fe += c;
      if (el.symbol == "Co") co += c;
      continue;
    }
    metal_atoms += c;
    rare += c;
    // Eu is divalent in most intermetallics and in the metal (4f7; Eu3+
    // would have J = 0): counted so (Buschow 1977, from memory).
    const int n4f = el.atomic_number == 39 ? 0
                    : el.symbol == "Eu"    ? 7
                                           : el.atomic_number - 57;
    sm |= el.symbol == "Sm";
    eu |= el.symbol == "Eu";
    ce_or_yb |= el.symbol == "Ce" || el.symbol == "Yb";
    // The ion's Hund's-rules level (engine/term_symbol.h).
    const TermSymbol term = HundSubshellTerm(3, n4f);
    const double saturation = SaturationMoment(term);
    mu2 += c * JMoment(term) * JMoment(term);
    unpaired += c * HundUnpairedElectrons(3, n4f);
    // Spin is coupled antiparallel to the 3d spin (Campbell, J. Phys. F 2,
    // L47 (1972), from memory); J = L - S below half filling, so a light
    // rare earth's moment lies along the 3d moment, a heavy one's against.
    (n4f < 7 ? light : heavy) += c * saturation;
    if (el.symbol == "Ce") cerium_moment += c * saturation;
  }
  std::string cautions;
  if (sm) {
    cautions +=
        "; Sm3+ mixes in its excited J multiplets: its moment is not g_J J "
        "and its figure is the least reliable";
  }
  if (eu) {
    cautions +=
        "; Eu is taken as divalent 4f7, as it usually is in intermetallics "
        "(Eu3+ has J = 0)";
  }
  if (ce_or_yb) {
    cautions +=
        "; Ce and Yb are often intermediate-valent (Ce4+, Yb2+ carry no 4f "
        "moment)";
  }
  e.localized_unpaired = unpaired;
  if (fe + co == 0) {
    // 4f spins order in parallel through the conduction electrons, so
    // light and heavy rare-earth moments oppose each other.
    e.model = MomentModel::kRareEarth4f;
    e.saturation = std::abs(heavy - light);
    e.effective = std::sqrt(mu2);
    e.note = absl::StrFormat(
        "trivalent 4f moments, g_J J per atom (ordered) and g_J √(J(J+1)) "
        "(paramagnetic); conduction-electron polarisation adds a few tenths "
        "of a μB%s",
        cautions);
    return e;
  }
  // Beside Fe and Co, Ce is close to tetravalent and carries no 4f moment
  // (CeFe2, CeCo5, Ce2Fe14B: Buschow, Rep. Prog. Phys. 40, 1179 (1977);
  // Herbst 1991; from memory).
  if (cerium_moment > 0) {
    light -= cerium_moment;
    cautions +=
        "; Ce beside Fe or Co is taken as tetravalent, without a 4f moment";
  }
  // RFe2 with nothing else: the cubic Laves phases, Fe at its reduced
  // moment.
  const double tolerance = 1e-9 * std::max(1.0, metal_atoms);
  // R with two atoms of `partner` and nothing else (`other` absent): the
  // cubic Laves phases RFe2 and RCo2.
  const auto laves_with = [&](double partner, double other) {
    return other == 0 && std::abs(partner - 2 * rare) < tolerance &&
           std::abs(metal_atoms - partner - rare) < tolerance;
  };
  const bool laves = laves_with(fe, co);
  // RCo2 with nothing else: the induced Co moment needs a heavy rare
  // earth's exchange field alone; light ones (their Co moment is smaller
  // and less settled) and Y or Lu (no 4f moment) get none.
  const bool cobalt_laves = laves_with(co, fe);
  if (cobalt_laves && (light > 0 || heavy == 0)) {
    return None(e, heavy == 0 && light == 0
                       ? "cubic Laves phase RCo2 without a 4f moment: Co is "
                         "an exchange-enhanced Pauli paramagnet there (YCo2, "
                         "LuCo2); no estimate"
                       : "cubic Laves phase RCo2 with a light rare earth: "
                         "the induced Co moment is not settled there; no "
                         "estimate");
  }
  if (!laves && !cobalt_laves &&
      (fe + co) < kMin3dShareWithRareEarth * metal_atoms) {
    return None(
        e, absl::StrFormat("rare earth with Fe or Co below %g%% of the metal "
                           "atoms (RFe3, RCo3 types): the 3d moment is "
                           "reduced or induced there; no estimate",
                           100 * kMin3dShareWithRareEarth));
  }
  // RFe12-xMx with stabilising atoms: 12 metal atoms per rare earth, at
  // least 8 of them Fe.
  const double partners = metal_atoms - rare;
  const bool thmn12 = !laves && co == 0 && fe + tolerance < partners &&
                      fe + tolerance >= 8 * rare &&
                      std::abs(partners - 12 * rare) < tolerance;
  const double m3d = laves          ? kIronMomentInLavesPhase * fe
                     : cobalt_laves ? kInducedCobaltMomentInLavesPhase * co
                     : thmn12       ? kIronMomentInThMn12Phase * fe
                                    : kIronMomentWithRareEarth * fe +
                                    kCobaltMomentWithRareEarth * co;
  const double m = m3d + light - heavy;
  e.model = MomentModel::kRareEarth4fWith3d;
  e.saturation = std::abs(m);
  e.note = absl::StrFormat(
      "%s %.4g μB (%s) with the trivalent 4f sublattice "
      "(light rare earths %.4g μB parallel, heavy %.4g μB antiparallel)%s; "
      "no paramagnetic effective moment from composition%s",
      laves          ? "cubic Laves phase RFe2: Fe sublattice"
      : cobalt_laves ? "cubic Laves phase RCo2: induced Co sublattice"
      : thmn12       ? "ThMn12-type RFe12-xMx: Fe sublattice"
                     : "3d sublattice",
      m3d,
      laves ? "1.45 μB per Fe, as in YFe2"
      : cobalt_laves
          ? "about 1 μB per Co, induced by the heavy rare earth's exchange "
            "field"
      : thmn12 ? "1.8 μB per Fe, as in YFe11Ti; the stabilising atoms 0"
               : "Fe 2.2, Co 1.6 μB per atom",
      light, heavy, m < 0 ? "; the 4f sublattice dominates" : "", cautions);
  return e;
}

// 3d alloys with at most kMaxMainGroupFraction of main-group atoms.
MetallicMomentEstimate EstimateAlloy(absl::Span<const ElementAmount> a,
                                     MetallicMomentEstimate e) {
  double total = 0;
  for (const ElementAmount& amount : a) total += amount.count.ToDouble();
  double n = 0, strong = kSpPolarisation, main_group = 0, fe = 0, ferro = 0,
         mn = 0, early = 0, ni = 0, heavy = 0;
  for (const ElementAmount& amount : a) {
    const Element& el = *amount.element;
    const double x = amount.count.ToDouble() / total;
    const int z = MetallicValenceElectrons(el);
    // Pd and Pt beside a Fe and Co majority are polarised by it and
    // count as late metals, N_d↑ = 5 (L1_0 FePt, CoPt, FePd).
    const bool pd_pt = el.atomic_number == 46 || el.atomic_number == 78;
    if (IsMainGroup(el)) {
      main_group += x;
    } else if (pd_pt) {
      heavy += x;
    } else if (!Is3d(el)) {
      return None(
          e, absl::StrCat(el.symbol,
                          " is outside the rules' domain (3d alloys, Heusler "
                          "compounds, rare earths)",
                          el.block == Block::kD
                              ? "; 4d and 5d metals such as Pd and Pt are "
                                "exchange-enhanced paramagnets, not ordered"
                              : "",
                          "; no estimate"));
    }
    n += x * z;
    // Magnetic valence: N_d↑ = 5 from Mn on, 0 before and for sp atoms.
    const bool late = (Is3d(el) && el.atomic_number >= 25) || pd_pt;
    strong += x * ((late ? 10 : 0) - z);
    if (el.symbol == "Fe") fe = x;
    if (el.symbol == "Ni") ni = x;
    if (el.symbol == "Fe" || el.symbol == "Co" || el.symbol == "Ni") {
      ferro += x;
    }
    if (el.symbol == "Mn") mn = x;
    if (Is3d(el) && el.atomic_number < 25) early += x;
  }
  if (main_group > kMaxMainGroupFraction + 1e-9) {
    return None(e, absl::StrFormat(
                       "main-group atoms make %.3g%% of the atoms, above the "
                       "%g%% the Slater-Pauling curve allows (ordered "
                       "compounds such as Fe3Al, Fe3C lie off it); no "
                       "estimate",
                       100 * main_group, 100 * kMaxMainGroupFraction));
  }
  if (heavy > 0 && ferro - ni < 0.5) {
    return None(e,
                "Pd and Pt are exchange-enhanced paramagnets, not ordered, "
                "unless Fe and Co make at least half the atoms (FePt, "
                "CoPt; Ni-Pt loses its moment near equal parts); no "
                "estimate");
  }
  if (ferro < 0.5) {
    return None(e,
                "Fe, Co and Ni make less than half the atoms (Mn- and "
                "Cr-rich metals order antiferromagnetically; Cu, Zn, Ti, V "
                "and their alloys are not ferromagnetic); no estimate");
  }
  if (mn > kMaxManganeseFraction + 1e-9) {
    return None(e,
                "more than 10% Mn: Mn-rich alloys order antiferromagnetically "
                "or ferrimagnetically, off the Slater-Pauling curve; no "
                "estimate");
  }
  const double offset =
      kSpPolarisation + kFeCoExtraPolarisation * (ferro - ni) / ferro;
  strong += offset - kSpPolarisation;
  const double rising = n - kRisingOffset;
  double m;
  std::string branch;
  if (fe >= 0.5 && early + mn > 0) {
    // bcc Fe with V, Cr, Mn or Ti: a weak ferromagnet, on the rising branch.
    if (n < kRisingFloor) {
      return None(e, absl::StrFormat(
                         "mean valence count n = %.3g is below %g, where "
                         "Fe-Cr and Fe-V moments leave the rising branch; no "
                         "estimate",
                         n, kRisingFloor));
    }
    m = rising;
    branch = "rising branch M = n - 5.78";
  } else if (rising < strong) {
    m = rising;
    branch = "rising branch M = n - 5.78 (below the falling branch)";
  } else {
    m = std::max(0.0, strong);
    branch = absl::StrFormat(
        "falling branch M = %.3g + Σ x Z_m (magnetic valence; 10.6 - n for "
        "Ni and its alloys, 10.75 - n for Co and Fe-Co)",
        offset);
  }
  e.model = MomentModel::kSlaterPaulingAlloy;
  e.saturation = m * total;
  e.note = absl::StrFormat(
      "Slater-Pauling curve, %s: n = %.4g valence electrons per atom, M = "
      "%.3g μB per atom%s",
      branch, n, m,
      m == 0 ? "; the curve has reached zero: no ferromagnetic moment" : "");
  if (heavy > 0) {
    e.note +=
        "; Pd and Pt carry only a moment induced by their Fe, Co or Ni "
        "neighbours (about 0.3 μB)";
  }
  if (fe > 0.5 && ni >= 0.25 && ni <= 0.45) {
    e.note +=
        "; Fe-Ni Invar region: measured moments fall below the curve near "
        "35% Ni";
  }
  return e;
}

}  // namespace

int MetallicValenceElectrons(const Element& e) {
  const int z = e.atomic_number;
  if (z >= 57 && z <= 71) return 3;        // Lanthanides, trivalent.
  if (z >= 89 && z <= 102) return z - 86;  // 5f + 6d + 7s.
  switch (e.block) {
    case Block::kS:
      return e.group <= 2 ? e.group : 2;  // He sits in group 18.
    case Block::kP:
      return e.group - 10;
    case Block::kD:
    case Block::kF:
      break;
  }
  return e.group;
}

ValenceElectronCount CountValenceElectrons(
    absl::Span<const ElementAmount> amounts) {
  // Every record needs the count: the valences come from a table.
  static const std::array<int8_t, kMaxAtomicNumber + 1>* const kValence = [] {
    auto* t = new std::array<int8_t, kMaxAtomicNumber + 1>{};
    for (const Element& e : AllElements()) {
      (*t)[e.atomic_number] = static_cast<int8_t>(MetallicValenceElectrons(e));
    }
    return t;
  }();
  ValenceElectronCount out;
  double electrons = 0, atoms = 0;
  for (const ElementAmount& a : amounts) {
    const double c = a.count.ToDouble();
    electrons += c * (*kValence)[a.element->atomic_number];
    atoms += c;
  }
  // Counts have at most six decimals (twelve through a group's count):
  // rounding to 10^-9 takes the sum's rounding noise away (8.3, not
  // 8.299999999999999) at far less cost than exact rational sums.
  out.per_formula_unit = std::round(electrons * 1e9) / 1e9;
  out.per_atom = atoms > 0 ? electrons / atoms : 0;
  return out;
}

MetallicMomentEstimate EstimateMetallicMoment(
    absl::Span<const ElementAmount> amounts) {
  MetallicMomentEstimate e;
  e.total_valence_electrons = CountValenceElectrons(amounts).per_formula_unit;
  if (amounts.empty()) return None(e, "no atoms; no estimate");
  for (const ElementAmount& a : amounts) {
    if (a.element->atomic_number >= 89) {
      return None(e, absl::StrCat(a.element->symbol,
                                  ": actinide moments are outside the "
                                  "rules' domain; no estimate"));
    }
    if (a.element->group == 18) {
      return None(
          e, absl::StrCat(a.element->symbol, " is a noble gas; no estimate"));
    }
  }
  if (std::optional<MetallicMomentEstimate> h = EstimateHeusler(amounts, e)) {
    return *std::move(h);
  }
  if (std::optional<MetallicMomentEstimate> r = EstimateRareEarth(amounts, e)) {
    return *std::move(r);
  }
  if (amounts.size() == 1 && IsMainGroup(*amounts[0].element)) {
    return None(e, absl::StrCat(amounts[0].element->symbol,
                                " is a main-group element: no ordered "
                                "moment; no estimate"));
  }
  return EstimateAlloy(amounts, std::move(e));
}

}  // namespace shellwright
