// The bonding class of a composition: whether formal oxidation states
// apply to it (ionic), whether it is a Zintl phase whose polyanions
// balance by the 8-N rule, or a metallic or intermetallic phase whose
// atoms keep state 0.
//
// ClassifyBonding() reads the formula's elements and amounts only. It
// reports the two coordinates of the van Arkel-Ketelaar bonding triangle
// (the atom-weighted mean of the Pauling electronegativities and the
// difference between the most and the least electronegative element),
// and decides the class by the rules of docs/method.md, "Bonding classes":
//   - one element: elemental;
//   - metals only: metallic, or zintl when an alkali or alkaline-earth
//     metal meets a p-block metal (Al, Ga, In, Tl, Sn, Pb, Bi) across an
//     electronegativity difference of at least 0.6 (NaTl, LiAl);
//   - any halogen or chalcogen (O, S, Se, Te, F, Cl, Br, I): ionic;
//   - a transition or rare-earth metal with boron, silicon or germanium,
//     or metal-rich with carbon, nitrogen, hydrogen, phosphorus, arsenic or
//     antimony: intermetallic (borides, silicides, interstitial carbides,
//     nitrides and hydrides, pnictides such as NiAs);
//   - alkali, alkaline-earth or divalent rare-earth metals with the
//     p-block elements of groups 13 to 15 only: zintl;
//   - otherwise ionic.
//
// Example:
//
//   absl::StatusOr<Formula> f = ParseFormula("Nd2Fe14B");
//   BondingClass c = ClassifyBonding(*f);
//   c.kind;                          // CompositionKind::kIntermetallic
//   c.electronegativity_difference;  // 0.90 (B 2.04, Nd 1.14)
//
// Thread safety: thread-safe (pure).

#ifndef SHELLWRIGHT_ENGINE_BONDING_H_
#define SHELLWRIGHT_ENGINE_BONDING_H_

#include "absl/strings/string_view.h"
#include "engine/element.h"
#include "engine/formula.h"
#include "util/enum_names.h"

namespace shellwright {

// The bonding class of a composition (engine/bonding.h decides it):
// ionic (formal oxidation states apply: ionic and polar covalent
// compounds), metallic (metals only), elemental (one element),
// intermetallic (transition or rare-earth metals with metalloids or small
// interstitial atoms: borides, silicides, carbides, nitrides, hydrides;
// every state 0) and zintl (electropositive metals with p-block polyanions
// balanced by the 8-N rule).
enum class CompositionKind {
  kIonic,
  kMetallic,
  kElemental,
  kIntermetallic,
  kZintl
};

template <>
struct EnumNames<CompositionKind> {
  static constexpr absl::string_view kWhat = "composition kind";
  static constexpr NamedValue<CompositionKind> kNames[] = {
      {CompositionKind::kIonic, "ionic"},
      {CompositionKind::kMetallic, "metallic"},
      {CompositionKind::kElemental, "elemental"},
      {CompositionKind::kIntermetallic, "intermetallic"},
      {CompositionKind::kZintl, "zintl"}};
};

struct BondingClass {
  CompositionKind kind = CompositionKind::kIonic;
  // Atom-weighted mean of the Pauling electronegativities, and the
  // difference between the largest and the smallest; elements without a
  // value are left out.
  double electronegativity_mean = 0;
  double electronegativity_difference = 0;
  // The rule that decided, in a few words ("a transition metal with
  // boron, silicon or germanium").
  absl::string_view rule;
};

BondingClass ClassifyBonding(const Formula& formula);

// True for the p-block elements that form Zintl polyanions (groups 13 to
// 15 from boron down to bismuth, carbon and nitrogen excepted), which in
// a Zintl phase take the states -(8 - N) to -1, N the number of valence
// electrons (the Zintl-Klemm concept).
bool IsZintlAnionFormer(const Element& e);

// True for the 4d and 5d metals of groups 4 to 7 (Zr to Re), which form
// metal clusters and metal-metal bonded pairs in their low states (MoCl2,
// Nb6Cl14, ReCl3, NbO2).
bool IsClusterFormer(const Element& e);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_BONDING_H_
