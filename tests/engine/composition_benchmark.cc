// Benchmarks for analysing composition records (engine/composition.h) and
// the oxidation-state solver's growth with element count.
// Run: build/tests/engine/composition_benchmark --benchmark_repetitions=5
//        --benchmark_report_aggregates_only=true
// Figures go in docs/performance.md.

#include <random>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "benchmark/benchmark.h"
#include "engine/composition.h"
#include "engine/formula.h"
#include "engine/oxidation.h"
#include "engine/sites.h"
#include "tests/engine/benchmark_formulas.h"

namespace shellwright {
namespace {

using testing::DistinctFormulas;
using testing::Fraction;

// Analyses `formulas` in turn, with `alternatives` alternatives each.
void AnalyzeInTurn(benchmark::State& state,
                   const std::vector<std::string>& formulas, int alternatives) {
  CompositionInput in;
  in.max_alternatives = alternatives;
  size_t i = 0;
  for (auto _ : state) {
    in.formula = formulas[i];
    CompositionReport r = AnalyzeComposition(in);
    benchmark::DoNotOptimize(r);
    if (++i == formulas.size()) i = 0;
  }
}

void BM_AnalyzeDistinctFormula(benchmark::State& state) {
  AnalyzeInTurn(state, DistinctFormulas(20000),
                static_cast<int>(state.range(0)));
}
BENCHMARK(BM_AnalyzeDistinctFormula)->Arg(0)->Arg(2);

// Formulas whose reading needs units (issue: polyatomic and molecular
// units): complexes, hydrates, organic salts, peroxides and disulfides,
// each with a random counter-ion or hydration count so that they are
// mostly distinct.
std::vector<std::string> UnitFormulas(int n) {
  std::mt19937 rng(20261203);
  const char* alkali[] = {"Li", "Na", "K", "Rb", "Cs"};
  const char* tm[] = {"Mn", "Fe", "Co", "Ni", "Cu", "Zn"};
  std::vector<std::string> out;
  std::uniform_int_distribution<int> family(0, 7), pick(0, 100);
  for (int i = 0; i < n; ++i) {
    const char* a = alkali[pick(rng) % 5];
    const char* m = tm[pick(rng) % 6];
    const int h = 1 + pick(rng) % 12;
    switch (family(rng)) {
      case 0:
        out.push_back(absl::StrCat(a, "4[", m, "(CN)6]·", h, "H2O"));
        break;
      case 1:
        out.push_back(absl::StrCat("[", m, "(NH3)6]Cl2·", h, "H2O"));
        break;
      case 2:
        out.push_back(absl::StrCat(m, "SO4·", h, "H2O"));
        break;
      case 3:
        out.push_back(absl::StrCat(m, "(CH3COO)2·", h, "H2O"));
        break;
      case 4:
        out.push_back(absl::StrCat("NH4", a, "SO4·", h, "H2O"));
        break;
      case 5:
        out.push_back(absl::StrCat(m, "S2"));
        break;
      case 6:
        out.push_back(absl::StrCat(a, "2O2·", h, "H2O"));
        break;
      default: {
        const int lead = 50 + pick(rng) % 50;  // Pb(1-x)Sn(x)
        out.push_back(absl::StrFormat("CH3NH3Pb%.2fSn%.2fI3", lead / 100.0,
                                      (100 - lead) / 100.0));
        break;
      }
    }
  }
  return out;
}

void BM_AnalyzeUnitFormula(benchmark::State& state) {
  AnalyzeInTurn(state, UnitFormulas(20000), 0);
}
BENCHMARK(BM_AnalyzeUnitFormula);

// Metallic phases (engine/metallic_moments.h): 3d alloys, Heusler
// compounds, rare-earth magnets and rare-earth alloys with random
// two-decimal fractions, mostly distinct.
std::vector<std::string> MetallicFormulas(int n) {
  std::mt19937 rng(20261204);
  const char* late[] = {"Fe", "Co", "Ni"};
  const char* heusler_y[] = {"Mn", "Fe", "Cr", "V", "Ti"};
  const char* heusler_z[] = {"Al", "Ga", "In", "Sn"};
  const char* rare_earth[] = {"Nd", "Sm", "Pr", "Gd", "Dy", "Y"};
  std::vector<std::string> out;
  std::uniform_int_distribution<int> family(0, 3), pick(0, 100);
  for (int i = 0; i < n; ++i) {
    switch (family(rng)) {
      case 0: {  // Binary 3d alloy
        const std::string x = Fraction(rng, 1, 99);
        out.push_back(absl::StrCat(late[pick(rng) % 3],
                                   absl::StrFormat("%.2f", 1 - std::stod(x)),
                                   late[pick(rng) % 3], x));
        break;
      }
      case 1:  // Full Heusler, Co or Fe based
        out.push_back(absl::StrCat(pick(rng) % 2 ? "Co2" : "Fe2",
                                   heusler_y[pick(rng) % 5],
                                   heusler_z[pick(rng) % 4]));
        break;
      case 2: {  // Rare-earth cobalt or iron magnet, doped
        const std::string x = Fraction(rng, 1, 60);
        out.push_back(absl::StrCat(rare_earth[pick(rng) % 6], "Co",
                                   absl::StrFormat("%.2f", 5 - std::stod(x)),
                                   "Fe", x));
        break;
      }
      default: {  // Rare-earth binary alloy
        const std::string x = Fraction(rng, 1, 99);
        out.push_back(absl::StrCat(rare_earth[pick(rng) % 6],
                                   absl::StrFormat("%.2f", 1 - std::stod(x)),
                                   rare_earth[pick(rng) % 6], x));
        break;
      }
    }
  }
  return out;
}

void BM_AnalyzeMetallicFormula(benchmark::State& state) {
  AnalyzeInTurn(state, MetallicFormulas(20000), 0);
}
BENCHMARK(BM_AnalyzeMetallicFormula);

void BM_ParseDistinctFormula(benchmark::State& state) {
  const std::vector<std::string> formulas = DistinctFormulas(20000);
  size_t i = 0;
  for (auto _ : state) {
    auto f = ParseFormula(formulas[i]);
    benchmark::DoNotOptimize(f);
    if (++i == formulas.size()) i = 0;
  }
}
BENCHMARK(BM_ParseDistinctFormula);

// PlaceIons alone on the distinct formulas, with their assignments solved
// beforehand: the cost the sites stage adds to a record. Arg 0 runs every
// formula; arg 1 only those of no family (the miss path).
void BM_PlaceIonsDistinctFormula(benchmark::State& state) {
  struct Input {
    Formula formula;
    OxidationAssignment assignment;
  };
  std::vector<Input> inputs;
  for (const std::string& text : DistinctFormulas(20000)) {
    absl::StatusOr<Formula> f = ParseFormula(text);
    if (!f.ok()) continue;
    absl::StatusOr<OxidationResult> r =
        AssignOxidationStates(*f, OxidationOptions());
    if (!r.ok() || !r->best.has_value()) continue;
    const bool miss = !PlaceIons(*f, *r->best, FamilyChoice::kAuto).has_value();
    if (state.range(0) == 1 && !miss) continue;
    inputs.push_back({*std::move(f), *std::move(r->best)});
  }
  size_t i = 0;
  for (auto _ : state) {
    auto p =
        PlaceIons(inputs[i].formula, inputs[i].assignment, FamilyChoice::kAuto);
    benchmark::DoNotOptimize(p);
    if (++i == inputs.size()) i = 0;
  }
  state.counters["records"] = static_cast<double>(inputs.size());
}
BENCHMARK(BM_PlaceIonsDistinctFormula)->Arg(0)->Arg(1);

// Equimolar N multivalent metals plus oxygen, solver only.
void BM_SolveEquimolarMultivalent(benchmark::State& state) {
  const char* metals[] = {"Ti", "V",  "Cr", "Mn", "Fe", "Co", "Ni", "Cu",
                          "Nb", "Mo", "W",  "Ru", "Sn", "Ce", "Pr", "Re"};
  const int n = static_cast<int>(state.range(0));
  std::string formula;
  for (int k = 0; k < n; ++k) absl::StrAppend(&formula, metals[k]);
  absl::StrAppend(&formula, "O", absl::StrFormat("%.1f", 1.5 * n));
  const Formula f = *ParseFormula(formula);
  OxidationOptions options;
  options.max_alternatives = 0;
  for (auto _ : state) {
    auto r = AssignOxidationStates(f, options);
    benchmark::DoNotOptimize(r);
  }
  state.SetLabel(formula);
}
BENCHMARK(BM_SolveEquimolarMultivalent)->DenseRange(1, 16);

// The same 12 metals with too little oxygen for common states alone
// (O8.37: average metal state +1.4), which forces the search past its
// cheap stages.
void BM_SolveReducedTwelveMetalOxide(benchmark::State& state) {
  const Formula f = *ParseFormula("TiVCrMnFeCoNiCuNbMoWRuO8.37");
  OxidationOptions options;
  options.max_alternatives = 0;
  for (auto _ : state) {
    auto r = AssignOxidationStates(f, options);
    benchmark::DoNotOptimize(r);
  }
}
BENCHMARK(BM_SolveReducedTwelveMetalOxide);

// Records found by fuzzing that made the exhaustive search pseudo-
// polynomial in the counts' denominator (a count of 0.99999 scales every
// other count by 10^5): their cost is bounded by the per-record work
// budget (engine/internal/charge_dp.h). Arg: alternatives asked for.
void BM_AnalyzeWorstCaseRecord(benchmark::State& state) {
  const char* formulas[] = {
      "SbWFeMoPrPbCoMnVO0.99999", "SbWFeMoPrPbCoO2.49497",
      "TiVCrMnFeCoNiCuNbMoWRuO8.3713",
      "Fe0.12345Co0.23456Ni0.34567Mn0.45678Cr0.56789O1.23456",
      "Fe0.1234Co0.2345Ni0.3456Mn0.4567Cr0.5678Cu0.6789V0.7891Ti0.8912O1."
      "2345"};
  CompositionInput in;
  in.max_alternatives = static_cast<int>(state.range(1));
  in.formula = formulas[state.range(0)];
  for (auto _ : state) {
    CompositionReport r = AnalyzeComposition(in);
    benchmark::DoNotOptimize(r);
  }
  state.SetLabel(in.formula);
}
BENCHMARK(BM_AnalyzeWorstCaseRecord)
    ->ArgsProduct({{0, 1, 2, 3, 4}, {0, 2}})
    ->Unit(benchmark::kMillisecond);

}  // namespace
}  // namespace shellwright

BENCHMARK_MAIN();
