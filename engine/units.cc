#include "engine/units.h"

#include <algorithm>
#include <array>
#include <memory>
#include <utility>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "engine/internal/data_tables.h"
#include "engine/internal/state_options.h"
#include "engine/oxidation.h"

namespace shellwright {
namespace {

// A written form: its terms (element and written count) and the units it
// stands for.
struct WrittenForm {
  std::vector<std::pair<const Element*, int>> terms;
  int unit_class = 0;
  // The unit's atoms are `parts` times the form's: 2 for PS3, half of the
  // P2S6 unit, as MPS3 formulas write it (data/units.tsv).
  int parts = 1;
};

// The atomic numbers of a unit's cation list (Unit::cations): "-" for
// any, or a comma-separated list of symbols and "s" for the s block.
std::bitset<kMaxAtomicNumber + 1> AcceptedCations(absl::string_view list) {
  std::bitset<kMaxAtomicNumber + 1> accepted;
  if (list == "-") return accepted.set();
  for (absl::string_view c : absl::StrSplit(list, ',')) {
    if (c == "s") {
      for (const Element& e : AllElements()) {
        if (e.block == Block::kS) accepted.set(e.atomic_number);
      }
    } else if (const Element* e = FindElementBySymbol(c)) {
      accepted.set(e->atomic_number);
    }
  }
  return accepted;
}

// The units and everything derived from them, built once.
struct Tables {
  std::vector<Unit> units;
  // Units with the same atoms, lightest charge first. `signature` is the
  // sorted (atomic number, count) list they share.
  struct UnitClass {
    std::vector<std::pair<int, int>> signature;
    int total_atoms = 0;
    std::vector<const Unit*> units;
    bool weak = false;  // Every unit has open-shell atoms.
    // Every unit is read from written groups only (Unit::cations "none").
    bool groups_only = true;
  };
  std::vector<UnitClass> classes;
  // Indices into `classes` by the atomic number of their signature's
  // first (lightest) atom, in increasing order.
  std::array<std::vector<int>, kMaxAtomicNumber + 1> classes_by_first;
  // Whether some class's signature holds the element (by atomic number):
  // a written group with any other element matches no class.
  std::array<bool, kMaxAtomicNumber + 1> in_a_class{};
  // Written forms by the atomic number of their first element.
  std::array<std::vector<WrittenForm>, kMaxAtomicNumber + 1> forms_by_first;
  std::vector<Ligand> ligands;
  std::array<const Ligand*, kMaxAtomicNumber + 1> anion_ligand{};
  std::vector<SpinCrossover> crossover;
  // Rows of `crossover` by the atomic number of their element.
  std::array<std::vector<const SpinCrossover*>, kMaxAtomicNumber + 1>
      crossover_by_z;
};

const Tables& GetTables() {
  static const Tables* const kTables = [] {
    auto* t = new Tables;
    const absl::Span<const internal::UnitAtomRow> atoms =
        internal::UnitAtomRows();
    t->units.reserve(internal::UnitRows().size());
    for (const internal::UnitRow& row : internal::UnitRows()) {
      Unit& u = t->units.emplace_back();
      u.name = row.name;
      u.charge = row.charge;
      u.unpaired = row.unpaired;
      u.source = row.source;
      u.cations = row.cations;
      u.accepted_cations = AcceptedCations(u.cations);
      const std::vector<absl::string_view> written =
          absl::StrSplit(row.written, '|');
      u.formula = std::string(written.front());
      for (int i = row.first_atom; i < row.first_atom + row.atoms; ++i) {
        const Element* e = &AllElements()[atoms[i].atomic_number - 1];
        u.atoms.push_back({e, atoms[i].state, atoms[i].count});
        u.total_atoms += atoms[i].count;
      }
      bool one_element = true;
      for (const UnitAtom& a : u.atoms) {
        one_element &= a.element == u.atoms.front().element;
      }
      for (const UnitAtom& a : u.atoms) {
        if (one_element && internal::OpenShellState(*a.element, a.state)) {
          u.open_shell_atoms += a.count;
        }
      }
    }
    // Classes of units with the same atoms.
    for (const Unit& u : t->units) {
      std::vector<std::pair<int, int>> signature;
      for (const UnitAtom& a : u.atoms) {
        auto it = std::find_if(
            signature.begin(), signature.end(),
            [&](const auto& s) { return s.first == a.element->atomic_number; });
        if (it == signature.end()) {
          signature.emplace_back(a.element->atomic_number, a.count);
        } else {
          it->second += a.count;
        }
      }
      std::sort(signature.begin(), signature.end());
      auto it = std::find_if(
          t->classes.begin(), t->classes.end(),
          [&](const Tables::UnitClass& c) { return c.signature == signature; });
      if (it == t->classes.end()) {
        t->classes.push_back({signature, u.total_atoms, {}, true});
        it = t->classes.end() - 1;
      }
      it->units.push_back(&u);
      it->weak &= u.open_shell_atoms > 0;
      it->groups_only &= u.cations == "none";
    }
    for (size_t k = 0; k < t->classes.size(); ++k) {
      t->classes_by_first[t->classes[k].signature.front().first].push_back(
          static_cast<int>(k));
      for (const auto& [z, unused] : t->classes[k].signature) {
        t->in_a_class[z] = true;
      }
    }
    for (Tables::UnitClass& c : t->classes) {
      std::sort(
          c.units.begin(), c.units.end(),
          [](const Unit* a, const Unit* b) { return a->charge < b->charge; });
    }
    // Written forms, for runs: a class read from written groups only has
    // none.
    for (size_t k = 0; k < t->classes.size(); ++k) {
      if (t->classes[k].groups_only) continue;
      for (const Unit* u : t->classes[k].units) {
        const internal::UnitRow& row = internal::UnitRows()[u - &t->units[0]];
        for (absl::string_view text : absl::StrSplit(row.written, '|')) {
          WrittenForm form;
          form.unit_class = static_cast<int>(k);
          size_t i = 0;
          while (i < text.size()) {
            size_t j = i + 1;
            while (j < text.size() && text[j] >= 'a' && text[j] <= 'z') ++j;
            const Element* e = FindElementBySymbol(text.substr(i, j - i));
            int n = 0;
            size_t d = j;
            while (d < text.size() && text[d] >= '0' && text[d] <= '9') {
              n = n * 10 + (text[d] - '0');
              ++d;
            }
            form.terms.emplace_back(e, d == j ? 1 : n);
            i = d;
          }
          // The first element's atoms in the unit over those written.
          const Element* first = form.terms.front().first;
          int in_unit = 0, written = 0;
          for (const UnitAtom& a : u->atoms) {
            if (a.element == first) in_unit += a.count;
          }
          for (const auto& [e, n] : form.terms) {
            if (e == first) written += n;
          }
          form.parts = in_unit / written;
          std::vector<WrittenForm>& list =
              t->forms_by_first[form.terms.front().first->atomic_number];
          const bool known = std::any_of(
              list.begin(), list.end(),
              [&](const WrittenForm& f) { return f.terms == form.terms; });
          if (!known) list.push_back(std::move(form));
        }
      }
    }
    // Longer forms first, so that a run takes the longest unit it can.
    for (std::vector<WrittenForm>& list : t->forms_by_first) {
      std::stable_sort(list.begin(), list.end(),
                       [](const WrittenForm& a, const WrittenForm& b) {
                         return a.terms.size() > b.terms.size();
                       });
    }
    // Ligands.
    t->ligands.reserve(internal::LigandRows().size());
    for (const internal::LigandRow& row : internal::LigandRows()) {
      Ligand& l = t->ligands.emplace_back();
      l.f = row.f;
      l.donor = &AllElements()[row.donor_atomic_number - 1];
      l.denticity = row.denticity;
      l.planar = row.planar;
      l.source = row.source;
      if (row.anion_atomic_number != 0) {
        l.anion = &AllElements()[row.anion_atomic_number - 1];
      } else {
        for (Unit& u : t->units) {
          if (u.name == row.ligand) l.unit = &u;
        }
      }
    }
    for (const Ligand& l : t->ligands) {
      if (l.unit != nullptr) {
        const_cast<Unit*>(l.unit)->ligand = &l;
      } else {
        t->anion_ligand[l.anion->atomic_number] = &l;
      }
    }
    for (const internal::SpinCrossoverRow& row :
         internal::SpinCrossoverRows()) {
      t->crossover.push_back({&AllElements()[row.atomic_number - 1], row.state,
                              row.g, row.f_crossover,
                              row.f_crossover_chalcogenide, row.pairing_cm1,
                              row.source});
    }
    for (const SpinCrossover& c : t->crossover) {
      t->crossover_by_z[c.element->atomic_number].push_back(&c);
    }
    return t;
  }();
  return *kTables;
}

// Whether `value` is `count` times `multiplier`, compared crosswise
// (no gcd): value.num * multiplier.den == count * multiplier.num *
// value.den. The parser bounds the parts far below overflow of 128 bits.
bool IsMultiple(const Rational& value, int count, const Rational& multiplier) {
  return static_cast<__int128>(value.num()) * multiplier.den() ==
         static_cast<__int128>(count) * multiplier.num() * value.den();
}

// The class whose atoms, times `multiplier`, are `signature` (sorted by
// atomic number), or -1.
int FindClass(const Tables& t,
              const absl::InlinedVector<std::pair<int, Rational>, 8>& signature,
              const Rational& multiplier) {
  if (signature.empty()) return -1;
  for (const int k : t.classes_by_first[signature.front().first]) {
    const auto& c = t.classes[k].signature;
    if (c.size() != signature.size()) continue;
    bool same = true;
    for (size_t i = 0; i < c.size() && same; ++i) {
      same = c[i].first == signature[i].first &&
             IsMultiple(signature[i].second, c[i].second, multiplier);
    }
    if (same) return k;
  }
  return -1;
}

// Adds `n` atoms of `e` to a composition signature.
void AddToSignature(const Element* e, const Rational& n,
                    absl::InlinedVector<std::pair<int, Rational>, 8>* sig) {
  auto it = std::find_if(sig->begin(), sig->end(), [&](const auto& s) {
    return s.first == e->atomic_number;
  });
  if (it == sig->end()) {
    sig->emplace_back(e->atomic_number, n);
  } else {
    it->second = it->second + n;
  }
}

UnitMatch MakeMatch(const Tables& t, int unit_class, int first, int end,
                    int group, int enclosing, const Rational& count) {
  const Tables::UnitClass& c = t.classes[unit_class];
  UnitMatch m;
  m.units = absl::MakeConstSpan(c.units);
  m.first_term = first;
  m.end_term = end;
  m.group = group;
  m.enclosing = enclosing;
  m.count = count;
  m.weak = group < 0 && c.weak;
  return m;
}

}  // namespace

std::string Ligand::Name() const {
  if (unit != nullptr) return unit->name;
  static constexpr std::pair<absl::string_view, absl::string_view> kAnions[] = {
      {"F", "fluoride"},  {"Cl", "chloride"},  {"Br", "bromide"},
      {"I", "iodide"},    {"O", "oxide"},      {"S", "sulfide"},
      {"Se", "selenide"}, {"Te", "telluride"}, {"N", "nitride"},
      {"H", "hydride"},   {"P", "phosphide"},  {"As", "arsenide"},
      {"C", "carbide"}};
  for (const auto& [symbol, name] : kAnions) {
    if (anion->symbol == symbol) return std::string(name);
  }
  return absl::StrCat(anion->symbol, " anion");
}

bool IsPiAcceptor(const Ligand& l) {
  return l.unit != nullptr && l.unit->charge >= 0 &&
         (l.f >= kPiAcceptorF || l.donor->atomic_number == 15);
}

bool IsAnionicPiAcceptor(const Ligand& l) {
  return l.unit != nullptr && l.unit->charge < 0 && l.denticity == 1 &&
         l.donor->atomic_number == 6 && l.f >= 1.5;
}

bool Unit::AcceptsCation(const Element& cation) const {
  return accepted_cations[cation.atomic_number];
}

absl::Span<const Unit> AllUnits() { return GetTables().units; }

const Unit* FindUnit(absl::string_view name) {
  for (const Unit& u : GetTables().units) {
    if (u.name == name) return &u;
  }
  return nullptr;
}

const Ligand* FindAnionLigand(const Element& element) {
  return GetTables().anion_ligand[element.atomic_number];
}

const SpinCrossover* FindSpinCrossover(const Element& element, int state) {
  for (const SpinCrossover* c :
       GetTables().crossover_by_z[element.atomic_number]) {
    if (c->element == &element && c->state == state) return c;
  }
  return nullptr;
}

// Whether every element written in `group` belongs to some unit class:
// otherwise neither the group nor a span ending with it is a unit (the
// rock-salt group of (Mg0.2Co0.2Ni0.2Cu0.2Zn0.2)O), and its signature
// need not be built.
bool MayBeUnit(const Tables& t, const Formula& formula,
               const WrittenGroup& group) {
  for (int i = group.first_term; i < group.end_term; ++i) {
    if (!t.in_a_class[formula.terms[i].element->atomic_number]) return false;
  }
  return true;
}

UnitMatches FindUnitMatches(const Formula& formula) {
  const Tables& t = GetTables();
  UnitMatches matches;
  // Groups that may be units (MayBeUnit), by index.
  absl::InlinedVector<bool, 8> may_be_unit(formula.groups.size(), false);
  for (size_t g = 0; g < formula.groups.size(); ++g) {
    may_be_unit[g] = MayBeUnit(t, formula, formula.groups[g]);
  }
  // Written groups whose contents are a unit's atoms.
  absl::InlinedVector<bool, 8> whole(formula.groups.size(), false);
  for (size_t g = 0; g < formula.groups.size(); ++g) {
    const WrittenGroup& group = formula.groups[g];
    if (!may_be_unit[g]) continue;
    absl::InlinedVector<std::pair<int, Rational>, 8> signature;
    for (int i = group.first_term; i < group.end_term; ++i) {
      const WrittenTerm& term = formula.terms[i];
      AddToSignature(term.element, term.count * term.multiplier, &signature);
    }
    std::sort(signature.begin(), signature.end(),
              [](const auto& a, const auto& b) { return a.first < b.first; });
    const int k = FindClass(t, signature, group.multiplier);
    if (k < 0) continue;
    whole[g] = true;
    // A group written zero times ("(C5H5)δ" read as no atoms) holds no
    // unit.
    if (matches.size() < kMaxUnitMatches && !group.multiplier.IsZero()) {
      matches.push_back(MakeMatch(t, k, group.first_term, group.end_term,
                                  static_cast<int>(g), group.parent,
                                  group.multiplier));
    }
  }
  // A group with up to three symbols written just before it, whose atoms
  // together are a unit's: CH(NH2)2 (formamidinium), C(NH2)3
  // (guanidinium). Longer than the group alone, these go first.
  UnitMatches spans;
  for (size_t g = 0; g < formula.groups.size(); ++g) {
    const WrittenGroup& group = formula.groups[g];
    if (group.bracket == '*' || !may_be_unit[g]) continue;
    const int level = group.parent;
    absl::InlinedVector<std::pair<int, Rational>, 8> signature;
    for (int i = group.first_term; i < group.end_term; ++i) {
      AddToSignature(formula.terms[i].element,
                     formula.terms[i].count * formula.terms[i].multiplier,
                     &signature);
    }
    // A phosphine or a quaternary ammonium written with its substituents
    // first: Ph3P (the group (C6H5)3, then P) in Ph3PAuCl, (CH3)4N in
    // (CH3)4NCl, as chemists often write them (the ammonium read N+5 beside
    // four methyl anions before).
    const int after = group.end_term;
    if (after < static_cast<int>(formula.terms.size()) &&
        formula.terms[after].group == level &&
        (formula.terms[after].element->atomic_number == 15 ||
         formula.terms[after].element->atomic_number == 7)) {
      const WrittenTerm& term = formula.terms[after];
      absl::InlinedVector<std::pair<int, Rational>, 8> with_p = signature;
      AddToSignature(term.element, term.count * term.multiplier, &with_p);
      std::sort(with_p.begin(), with_p.end(),
                [](const auto& a, const auto& b) { return a.first < b.first; });
      const int c = FindClass(t, with_p, term.multiplier);
      if (c >= 0 && !t.classes[c].groups_only &&
          spans.size() < kMaxUnitMatches && !term.multiplier.IsZero()) {
        spans.push_back(MakeMatch(t, c, group.first_term, after + 1, -1, level,
                                  term.multiplier));
      }
    }
    for (int k = group.first_term - 1;
         k >= 0 && k >= group.first_term - 3 && formula.terms[k].group == level;
         --k) {
      const WrittenTerm& term = formula.terms[k];
      AddToSignature(term.element, term.count * term.multiplier, &signature);
      auto sorted = signature;
      std::sort(sorted.begin(), sorted.end(),
                [](const auto& a, const auto& b) { return a.first < b.first; });
      const int c = FindClass(t, sorted, term.multiplier);
      if (c >= 0 && !t.classes[c].groups_only &&
          spans.size() < kMaxUnitMatches && !term.multiplier.IsZero()) {
        spans.push_back(
            MakeMatch(t, c, k, group.end_term, -1, level, term.multiplier));
      }
    }
  }
  if (!spans.empty()) {
    matches.insert(matches.begin(), spans.begin(), spans.end());
    if (matches.size() > kMaxUnitMatches) matches.resize(kMaxUnitMatches);
  }
  // Runs of terms written as a unit is written, inside one group.
  const size_t groups_found = matches.size();
  const std::vector<WrittenTerm>& terms = formula.terms;
  for (size_t i = 0; i < terms.size(); ++i) {
    const WrittenTerm& first = terms[i];
    if (first.group >= 0 && whole[first.group]) continue;
    if (first.multiplier.IsZero()) continue;  // Written zero times.
    // The forms run from the longest: skip those longer than the terms
    // left.
    const std::vector<WrittenForm>& forms =
        t.forms_by_first[first.element->atomic_number];
    const size_t left = terms.size() - i;
    for (auto form_it = std::partition_point(
             forms.begin(), forms.end(),
             [left](const WrittenForm& f) { return f.terms.size() > left; });
         form_it != forms.end(); ++form_it) {
      const WrittenForm& form = *form_it;
      const size_t n = form.terms.size();
      bool same = true;
      for (size_t k = 0; k < n && same; ++k) {
        const WrittenTerm& term = terms[i + k];
        same = term.group == first.group && term.part == first.part &&
               term.element == form.terms[k].first && term.count.IsInteger() &&
               term.count.num() == form.terms[k].second;
      }
      if (!same) continue;
      // A run that is a whole group was found as the group.
      if (matches.size() >= kMaxUnitMatches) break;
      matches.push_back(MakeMatch(
          t, form.unit_class, static_cast<int>(i), static_cast<int>(i + n), -1,
          first.group,
          form.parts == 1 ? first.multiplier
                          : Rational(first.multiplier.num(),
                                     first.multiplier.den() * form.parts)));
    }
  }
  // Longer runs first, runs of one length in written order. No two runs of
  // one length start at the same term (the forms of an element differ), so
  // this order is total, and std::sort needs no buffer as std::stable_sort
  // does.
  std::sort(matches.begin() + groups_found, matches.end(),
            [](const UnitMatch& a, const UnitMatch& b) {
              const int a_length = a.end_term - a.first_term;
              const int b_length = b.end_term - b.first_term;
              if (a_length != b_length) return a_length > b_length;
              return a.first_term < b.first_term;
            });
  return matches;
}

}  // namespace shellwright
