#include "engine/bonding.h"

#include <algorithm>

#include "engine/oxidation.h"

namespace shellwright {
namespace {

// Halogens and chalcogens: with any of them, formal states apply.
bool IsAnionFormer(const Element& e) {
  const int z = e.atomic_number;
  return z == 8 || IsHeavyChalcogen(z) || IsHalogen(z);
}

bool IsAlkaliOrAlkalineEarth(const Element& e) {
  return (e.group == 1 && e.atomic_number != 1) || e.group == 2;
}

// Europium and ytterbium, divalent in their Zintl phases (EuIn2P2,
// Yb14MnSb11).
bool IsDivalentRareEarth(const Element& e) {
  return e.atomic_number == 63 || e.atomic_number == 70;
}

// Transition metals of groups 3 to 11 and the f-block metals: the group
// 12 metals (Zn, Cd, Hg) keep a filled d shell and act as main-group
// cations.
bool IsTransitionOrRareEarth(const Element& e) {
  if (e.block == Block::kF) return true;
  return e.block == Block::kD && e.group >= 3 && e.group <= 11;
}

bool IsGroup3OrFBlock(const Element& e) {
  return e.block == Block::kF || e.group == 3;
}

// Boron, silicon and germanium: with a transition or rare-earth metal
// they form borides, silicides and germanides, metallic whatever the
// ratio (MoSi2, LaB6).
bool IsBorideFormer(const Element& e) {
  return e.atomic_number == 5 || e.atomic_number == 14 || e.atomic_number == 32;
}

// Rubidium and caesium with gold or platinum and nothing else: salts of
// the auride Au- and platinide Pt2- anions (CsAu and RbAu are
// semiconductors, Cs2Pt a red transparent salt; Jansen, Chem. Soc. Rev.
// 37 (2008) 1826, and Karpov, Jansen et al., Angew. Chem. 2003, from
// memory), when the counts balance those charges. The lighter alkali
// metals form intermetallics with gold (NaAu2, KAu5).
bool IsAurideOrPlatinide(const Formula& formula) {
  Rational alkali(0), anion_charge(0);
  for (const ElementAmount& a : formula.amounts) {
    const int z = a.element->atomic_number;
    if (z == 37 || z == 55) {
      alkali = alkali + a.count;
    } else if (z == 79) {
      anion_charge = anion_charge + a.count;
    } else if (z == 78) {
      anion_charge = anion_charge + a.count * Rational(2);
    } else {
      return false;
    }
  }
  return !alkali.IsZero() && alkali == anion_charge;
}

// Metal-rich chalcogenides of the transition metals of groups 3 to 10:
// more of those metal atoms than S, Se and Te atoms, and no other
// non-metal. Heazlewoodite Ni3S2, Co9S8, pentlandite (Fe,Ni)9S8, Ti2S,
// Ta2S and Pd4S hold metal-metal bonds and are metallic (Greenwood and
// Earnshaw, Chemistry of the Elements, 2nd ed., ch. 15; Vaughan and Craig,
// Mineral Chemistry of Metal Sulfides (1978); from memory). Copper and
// silver sulfides (Cu2S, Cu5FeS4) stay ionic: their metals are not
// counted.
bool IsMetalRichChalcogenide(const Formula& formula) {
  // The elements first, with no sums: most formulas hold another non-metal
  // (an oxide) or no chalcogen, and leave here.
  bool chalcogen_present = false;
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (IsHeavyChalcogen(e.atomic_number)) {
      chalcogen_present = true;
    } else if (!IsMetal(e)) {
      return false;
    }
  }
  if (!chalcogen_present) return false;
  Rational metal(0), chalcogen(0);
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (IsHeavyChalcogen(e.atomic_number)) {
      chalcogen = chalcogen + a.count;
    } else if (e.block == Block::kD && e.group >= 3 && e.group <= 10) {
      metal = metal + a.count;
    }
  }
  return chalcogen < metal;
}

// The Zintl line: the electronegativity difference from which an alkali
// or alkaline-earth metal gives up its electrons to a p-block metal
// (NaTl 0.69, LiAl 0.63; Mg17Al12 at 0.30 stays metallic). Common
// practice, no source.
constexpr double kZintlMetalDifference = 0.6;

// Boron-rich borides (CaB6, LaB6): a covalent boron framework, metallic
// or semiconducting, with no integral 8-N balance. Common practice, no
// source.
constexpr int kBoronRichRatio = 4;

// Atoms per formula unit by kind, for the rules that weigh them.
struct AtomCounts {
  Rational metal, nonmetal, boride, boron;
  // Alkali, alkaline-earth and divalent rare-earth atoms, and the other
  // transition and rare-earth atoms.
  Rational electropositive, transition;
};

AtomCounts CountAtoms(const Formula& formula) {
  AtomCounts n;
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (IsMetal(e)) {
      n.metal = n.metal + a.count;
      if (IsAlkaliOrAlkalineEarth(e) || IsDivalentRareEarth(e)) {
        n.electropositive = n.electropositive + a.count;
      } else if (IsTransitionOrRareEarth(e)) {
        n.transition = n.transition + a.count;
      }
      continue;
    }
    n.nonmetal = n.nonmetal + a.count;
    if (IsBorideFormer(e)) n.boride = n.boride + a.count;
    if (e.atomic_number == 5) n.boron = n.boron + a.count;
  }
  return n;
}

// Polyphosphides and polyarsenides of the d-block metals: P or As the
// only non-metal, beside d-block metals only, with at least four pnictogen
// atoms per metal atom of groups 3 to 10 (FeP4, OsP4, MnP4, CrP4) or two
// per metal atom of groups 11 and 12 (CuP2, ZnP4, CdP4, Ag3P11). Their
// pnictogen atoms bond to each other in chains, layers and cages, each
// charged by the generalised 8 - N rule: FeP4 is low-spin Fe(II) with two
// three-bonded P0 and two two-bonded P-1 per formula unit, CdP4 is Cd(II)
// with the same (P4)2- framework, CuP2 is Cu(I) (von Schnering and Hoenle,
// Chem. Rev. 88 (1988) 243; Jeitschko and Braun, Acta Crystallogr. B 34
// (1978) 3196; from memory). The pyrite- and marcasite-type diphosphides
// of groups 8 to 10 (FeP2, PtP2) and the skutterudites (CoP3) keep their
// pair and ring anions.
bool IsPolypnictide(const Formula& formula) {
  // The elements first, with no arithmetic: most formulas leave here.
  bool any_pnictogen = false, any_metal = false;
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    const int z = e.atomic_number;
    if (z == 15 || z == 33) {
      any_pnictogen = true;
    } else if (e.block == Block::kD && e.group >= 3 && e.group <= 12) {
      any_metal = true;
    } else {
      return false;
    }
  }
  if (!any_pnictogen || !any_metal) return false;
  Rational pnictogen(0), needed(0);
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    const int z = e.atomic_number;
    if (z == 15 || z == 33) {
      pnictogen = pnictogen + a.count;
    } else {
      needed = needed + a.count * Rational(e.group >= 11 ? 2 : 4);
    }
  }
  return !(pnictogen < needed);
}

// Arsenides and antimonides of zinc and cadmium with more pnictogen than
// the metal's two electrons can fill as isolated anions (3 x pnictogen > 2
// x metal): ZnSb and CdSb hold Sb2 4- dumbbells, beta-Zn4Sb3 and Cd4Sb3
// isolated Sb3- beside Sb2 4- dumbbells, and they are Zintl phases
// (Mozharivskyj et al., Chem. Mater. 16 (2004) 1580; Snyder et al.,
// Nature Mater. 3 (2004) 458; from memory). Zn3As2 and Cd3As2 balance
// with isolated anions and stay ionic; ZnAs2 and CdP4 are polypnictides.
bool IsGroup12PnictogenRich(const Formula& formula) {
  Rational metal(0), pnictogen(0);
  for (const ElementAmount& a : formula.amounts) {
    const int z = a.element->atomic_number;
    if (z == 30 || z == 48) {
      metal = metal + a.count;
    } else if (z == 33 || z == 51) {
      pnictogen = pnictogen + a.count;
    } else {
      return false;
    }
  }
  return !metal.IsZero() && Rational(2) * metal < Rational(3) * pnictogen;
}

// Layered transition-metal pnictides of the ThCr2Si2, CaAl2Si2 and
// anti-PbFCl types: alkali, alkaline-earth or divalent rare-earth cations
// with Cr, Mn, Fe, Co or Ni and P, As, Sb or Bi only, no more metal atoms
// of those than pnictogen atoms, and a count that leaves the metal between
// +1.5 and +3 with every pnictogen at -3. BaFe2As2 is Ba2+ with
// [Fe2As2]2- layers (Fe(II)), KFe2As2 Fe(II)/Fe(III), LiFeAs Fe(II),
// CaMn2Sb2 and BaMn2As2 Mn(II) (Rotter, Tegel and Johrendt, Phys. Rev.
// Lett. 101 (2008) 107006; Johrendt, J. Mater. Chem. 21 (2011) 13726;
// Kauzlarich (ed.), Chemistry, Structure, and Bonding of Zintl Phases and
// Ions, VCH (1996); all from memory). With a trivalent rare earth
// (LaFe2P2, CeCu2Si2) the layers hold pnictogen pairs and the phases stay
// intermetallic.
bool IsLayeredTransitionMetalPnictide(const Formula& formula) {
  for (const ElementAmount& a : formula.amounts) {  // Elements first.
    const Element& e = *a.element;
    const int z = e.atomic_number;
    if (!(IsHeavyPnictogen(z) || (z >= 24 && z <= 28) ||
          IsAlkaliOrAlkalineEarth(e) || IsDivalentRareEarth(e))) {
      return false;
    }
  }
  Rational cation_charge(0), metal(0), pnictogen(0);
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    const int z = e.atomic_number;
    if (IsHeavyPnictogen(z)) {
      pnictogen = pnictogen + a.count;
    } else if (z >= 24 && z <= 28) {
      metal = metal + a.count;
    } else if (IsAlkaliOrAlkalineEarth(e)) {
      cation_charge = cation_charge + a.count * Rational(e.group);
    } else if (IsDivalentRareEarth(e)) {
      cation_charge = cation_charge + a.count * Rational(2);
    } else {
      return false;
    }
  }
  if (cation_charge.IsZero() || metal.IsZero() || pnictogen < metal) {
    return false;
  }
  const Rational left = pnictogen * Rational(3) - cation_charge;
  return !(left < metal * Rational(3, 2)) && !(metal * Rational(3) < left);
}

// Cu, Ag or Au with N as the only other element (Cu3N, Ag3N).
bool CoinageMetalNitride(const Formula& formula) {
  bool nitrogen = false;
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (e.atomic_number == 7) {
      nitrogen = true;
    } else if (!(e.block == Block::kD && e.group == 11)) {
      return false;
    }
  }
  return nitrogen;
}

// Main-group metals with boron only, two B per metal atom: the AlB2-type
// diborides MgB2 and AlB2, whose graphite-like boron layers hold the
// metal's electrons in a partly filled band shared with the metal layers;
// both are metals (MgB2 superconducts at 39 K), as the transition-metal
// diborides TiB2 and ZrB2 of the same structure are (Greenwood and
// Earnshaw, Chemistry of the Elements, 2nd ed., ch. 6; Nagamatsu et al.,
// Nature 410 (2001) 63; from memory), and their solid solution
// Mg1-xAlxB2.
bool IsMainGroupDiboride(const Formula& formula) {
  Rational metal(0), boron(0);
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (e.atomic_number == 5) {
      boron = a.count;
    } else if (IsMetal(e) && (e.block == Block::kS || e.block == Block::kP)) {
      metal = metal + a.count;
    } else {
      return false;
    }
  }
  return !metal.IsZero() && boron == metal * Rational(2);
}

}  // namespace

bool IsZintlAnionFormer(const Element& e) {
  if (e.block != Block::kP) return false;
  const int z = e.atomic_number;
  if (z == 6 || z == 7) return false;
  return (e.group >= 13 && e.group <= 15) && z <= 83;
}

bool IsClusterFormer(const Element& e) {
  return e.block == Block::kD && e.period >= 5 && e.group >= 4 && e.group <= 7;
}

BondingClass ClassifyBonding(const Formula& formula) {
  BondingClass c;
  double weighted = 0, atoms_with_value = 0;
  double most = 0, least = 0;
  bool first = true;
  bool all_metal = true, anion_former = false, s_block = false;
  bool divalent_rare_earth = false, other_transition = false;
  bool group3_f_only = true, all_nonmetals_zintl = true;
  bool hydrogen_only = true;  // The only non-metal is H.
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (e.pauling_electronegativity.has_value()) {
      const double x = *e.pauling_electronegativity;
      const double n = a.count.ToDouble();
      weighted += n * x;
      atoms_with_value += n;
      most = first ? x : std::max(most, x);
      least = first ? x : std::min(least, x);
      first = false;
    }
    if (IsMetal(e)) {
      s_block |= IsAlkaliOrAlkalineEarth(e);
      if (IsDivalentRareEarth(e)) {
        divalent_rare_earth = true;
      } else if (IsTransitionOrRareEarth(e)) {
        other_transition = true;
        group3_f_only &= IsGroup3OrFBlock(e);
      }
    } else {
      all_metal = false;
      anion_former |= IsAnionFormer(e);
      all_nonmetals_zintl &= IsZintlAnionFormer(e);
      hydrogen_only &= e.atomic_number == 1;
    }
  }
  if (atoms_with_value > 0) {
    c.electronegativity_mean = weighted / atoms_with_value;
    c.electronegativity_difference = most - least;
  }
  const bool transition = other_transition || divalent_rare_earth;

  if (formula.amounts.size() == 1) {
    c.kind = CompositionKind::kElemental;
    c.rule = "a single element";
    return c;
  }
  if (IsLayeredTransitionMetalPnictide(formula)) {
    c.kind = CompositionKind::kZintl;
    c.rule =
        "an electropositive metal with transition-metal pnictide layers "
        "([Fe2As2]2- in BaFe2As2)";
    return c;
  }
  if (IsPolypnictide(formula)) {
    c.kind = CompositionKind::kZintl;
    c.rule =
        "a d-block metal with a pnictogen-rich polyanion (FeP4, CdP4): the "
        "generalised 8-N rule";
    return c;
  }
  if (all_metal && IsAurideOrPlatinide(formula)) {
    c.kind = CompositionKind::kIonic;
    c.rule = "a heavy alkali metal with gold or platinum: auride or platinide";
    return c;
  }
  if (all_metal) {
    bool p_metal = false;
    for (const ElementAmount& a : formula.amounts) {
      p_metal |= IsZintlAnionFormer(*a.element);
    }
    if (s_block && p_metal && !transition &&
        c.electronegativity_difference >= kZintlMetalDifference) {
      c.kind = CompositionKind::kZintl;
      c.rule =
          "an alkali or alkaline-earth metal with a p-block metal across "
          "the Zintl line";
      return c;
    }
    c.kind = CompositionKind::kMetallic;
    c.rule = "metals only";
    return c;
  }
  if (IsMetalRichChalcogenide(formula)) {
    c.kind = CompositionKind::kIntermetallic;
    c.rule =
        "metal-rich: a transition-metal chalcogenide with metal-metal "
        "bonds";
    return c;
  }
  if (anion_former) {
    c.kind = CompositionKind::kIonic;
    c.rule = "a halogen or chalcogen anion";
    return c;
  }
  if (other_transition) {
    const AtomCounts n = CountAtoms(formula);
    // A transition metal held in the polyanion of a Zintl phase, the
    // electropositive atoms at least twice its count and the non-metal
    // atoms more than it: Ca14MnSb11 is
    // 14 Ca2+ with [MnSb4]9-, [Sb3]7- and four Sb3- (Kauzlarich, in
    // Chemistry, Structure, and Bonding of Zintl Phases and Ions, VCH
    // (1996), from memory); CaMn2Sb2 and BaFe2As2 are not (their layers
    // are the rule above).
    if (all_nonmetals_zintl && n.boron.IsZero() &&
        !(n.electropositive < Rational(2) * n.transition) &&
        n.transition < n.nonmetal) {
      c.kind = CompositionKind::kZintl;
      c.rule =
          "an electropositive metal with p-block polyanions that hold a "
          "minority transition metal";
      return c;
    }
    // Borides, silicides and germanides, unless boron sits in a
    // borohydride or the like (more other non-metal atoms than B, Si, Ge).
    if (!n.boride.IsZero() && !(n.boride < n.nonmetal - n.boride)) {
      c.kind = CompositionKind::kIntermetallic;
      c.rule =
          "a transition or rare-earth metal with boron, silicon or "
          "germanium";
      return c;
    }
    // Hydrides of the d- and f-block metals without an electropositive
    // one are metallic and interstitial (Greenwood and Earnshaw, Chemistry
    // of the Elements, 2nd ed., ch. 3, from memory): the d-block ones at
    // any hydrogen content (TiH2, ZrH2, PdH0.6), those of group 3 and the
    // lanthanides up to the dihydride (LaH2, YH2); their trihydrides (LaH3,
    // YH3) are salt-like, and Mg2FeH6 holds [FeH6]4- anions.
    if (hydrogen_only && !s_block &&
        (!group3_f_only || n.nonmetal < Rational(3) * n.metal)) {
      c.kind = CompositionKind::kIntermetallic;
      c.rule = "a d- or f-block metal hydride: interstitial, metallic";
      return c;
    }
    // Metal-rich carbides, nitrides, hydrides and pnictides: interstitial
    // or metallic (Fe3C, TiN, LaNi5H6, NiAs). Rare-earth and group 3
    // monopnictides and mononitrides (GdN, LaSb, ScN) are ionic rock-salt
    // compounds: with those metals alone the composition must be strictly
    // metal-rich. The coinage-metal nitrides Cu3N and Ag3N are M(I) salts
    // (anti-ReO3 Cu3N is a semiconductor; Greenwood and Earnshaw,
    // Chemistry of the Elements, 2nd ed., ch. 11, from memory).
    if (CoinageMetalNitride(formula)) {
      c.kind = CompositionKind::kIonic;
      c.rule = "a coinage-metal nitride: M(I) salt";
      return c;
    }
    if (group3_f_only ? n.nonmetal < n.metal : !(n.metal < n.nonmetal)) {
      c.kind = CompositionKind::kIntermetallic;
      c.rule =
          "metal-rich: an interstitial carbide, nitride, hydride or "
          "pnictide";
      return c;
    }
    c.kind = CompositionKind::kIonic;
    c.rule = "non-metal-rich";
    return c;
  }
  if (IsMainGroupDiboride(formula)) {
    c.kind = CompositionKind::kIntermetallic;
    c.rule =
        "an AlB2-type diboride: graphite-like boron layers between metal "
        "layers, metallic";
    return c;
  }
  if ((s_block || divalent_rare_earth) && all_nonmetals_zintl) {
    const AtomCounts n = CountAtoms(formula);
    if (!(n.boron < Rational(kBoronRichRatio) * n.metal)) {
      c.kind = CompositionKind::kIntermetallic;
      c.rule = "a boron-rich boride";
      return c;
    }
    c.kind = CompositionKind::kZintl;
    c.rule = "an electropositive metal with p-block polyanions";
    return c;
  }
  if (IsGroup12PnictogenRich(formula)) {
    c.kind = CompositionKind::kZintl;
    c.rule =
        "zinc or cadmium with more arsenic or antimony than isolated "
        "anions take: pnictogen pairs (ZnSb)";
    return c;
  }
  c.kind = CompositionKind::kIonic;
  c.rule = "formal oxidation states apply";
  return c;
}

}  // namespace shellwright
