// The distinct formulas of the composition benchmark
// (tests/engine/composition_benchmark.cc), shared with the steady-state
// instruction driver (tests/engine/composition_instructions.cc) so that
// both analyse the same records. Changing the generator changes the
// figures of docs/performance.md.
#ifndef SHELLWRIGHT_TESTS_ENGINE_BENCHMARK_FORMULAS_H_
#define SHELLWRIGHT_TESTS_ENGINE_BENCHMARK_FORMULAS_H_

#include <random>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"

namespace shellwright::testing {

// A random fraction lo/100..hi/100 written with two decimals.
inline std::string Fraction(std::mt19937& rng, int lo, int hi) {
  std::uniform_int_distribution<int> d(lo, hi);
  return absl::StrFormat("%.2f", d(rng) / 100.0);
}

// Mostly distinct formulas from the families real datasets hold:
// perovskites, layered oxides, spinels, hydrates, high-entropy oxides and
// alloys, with random two-decimal fractions.
inline std::vector<std::string> DistinctFormulas(int n) {
  std::mt19937 rng(20261202);
  const char* a_site[] = {"La", "Pr", "Nd", "Sm", "Gd", "Y"};
  const char* dopant[] = {"Sr", "Ca", "Ba"};
  const char* b_site[] = {"Mn", "Fe", "Co", "Ni", "Cr", "Ti"};
  const char* tm[] = {"Mg", "Co", "Ni", "Cu", "Zn", "Fe", "Mn", "Cr"};
  const char* alloy[] = {"Al", "Co", "Cr", "Fe", "Ni", "Mn", "Cu", "Ti", "V"};
  const char* hydrate[] = {"CuSO4·5H2O", "FeSO4·7H2O", "CoCl2·6H2O",
                           "NiSO4·6H2O", "MnCl2·4H2O"};
  std::vector<std::string> out;
  std::uniform_int_distribution<int> family(0, 5), pick(0, 100);
  for (int i = 0; i < n; ++i) {
    switch (family(rng)) {
      case 0: {  // A1-xA'xBO3
        const std::string x = Fraction(rng, 1, 60);
        out.push_back(absl::StrCat(
            a_site[pick(rng) % 6], absl::StrFormat("%.2f", 1 - std::stod(x)),
            dopant[pick(rng) % 3], x, b_site[pick(rng) % 6], "O3"));
        break;
      }
      case 1: {  // LiNi_a Co_b Mn_c O2
        const int a = 30 + pick(rng) % 60, b = (100 - a) / 2;
        out.push_back(absl::StrFormat("LiNi%.2fCo%.2fMn%.2fO2", a / 100.0,
                                      b / 100.0, (100 - a - b) / 100.0));
        break;
      }
      case 2: {  // spinel A B2 O4 with B-site substitution
        const std::string y = Fraction(rng, 1, 99);
        out.push_back(absl::StrCat(tm[pick(rng) % 8], "Fe",
                                   absl::StrFormat("%.2f", 2 - std::stod(y)),
                                   "Al", y, "O4"));
        break;
      }
      case 3:
        out.push_back(absl::StrCat(hydrate[pick(rng) % 5]));
        if (pick(rng) % 2)
          out.back() = absl::StrCat("Li", Fraction(rng, 1, 99), "CoO2");
        break;
      case 4: {  // high-entropy rock salt (M1..M5)O with random fractions
        std::string f = "(";
        int left = 100;
        for (int k = 0; k < 4; ++k) {
          const int share = 10 + pick(rng) % 10;
          absl::StrAppend(&f, tm[(k + pick(rng)) % 8],
                          absl::StrFormat("%.2f", share / 100.0));
          left -= share;
        }
        absl::StrAppend(&f, "Zn", absl::StrFormat("%.2f", left / 100.0), ")O");
        out.push_back(f);
        break;
      }
      default: {  // high-entropy alloy
        std::string f;
        for (int k = 0; k < 5; ++k) {
          absl::StrAppend(&f, alloy[(k * 2 + pick(rng)) % 9],
                          Fraction(rng, 5, 40));
        }
        out.push_back(f);
        break;
      }
    }
  }
  return out;
}

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_ENGINE_BENCHMARK_FORMULAS_H_
