// Benchmarks for describing atoms and ions in-process (engine/atom.h).
// Run: build/tests/engine/atom_benchmark --benchmark_repetitions=5
// Figures go in docs/performance.md.

#include <string>
#include <vector>

#include "benchmark/benchmark.h"
#include "engine/atom.h"
#include "engine/element.h"

namespace shellwright {
namespace {

// Spec parsing + lookup of a precomputed description, the common query.
void BM_DescribeAtomFromSpec(benchmark::State& state) {
  std::vector<std::string> specs;
  for (const Element& e : AllElements()) specs.emplace_back(e.symbol);
  for (const char* ion : {"Fe3+", "Gd3+", "Co(III)", "O2-", "Mn+4", "Cl-"}) {
    specs.emplace_back(ion);
  }
  (void)DescribeAtom(*ParseAtomQuery("H", std::nullopt));  // Warm the cache.
  size_t i = 0;
  for (auto _ : state) {
    absl::StatusOr<AtomQuery> q = ParseAtomQuery(specs[i], std::nullopt);
    absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(*q);
    benchmark::DoNotOptimize(d);
    if (++i == specs.size()) i = 0;
  }
}
BENCHMARK(BM_DescribeAtomFromSpec);

// By atomic number and charge, without spec parsing.
void BM_DescribeAtomByNumber(benchmark::State& state) {
  AtomQuery q;
  q.element = *ElementByAtomicNumber(26);
  q.charge = 3;
  (void)DescribeAtom(q);
  for (auto _ : state) {
    absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(q);
    benchmark::DoNotOptimize(d);
  }
}
BENCHMARK(BM_DescribeAtomByNumber);

// A ligand-field query is computed, not looked up.
void BM_DescribeAtomOctahedral(benchmark::State& state) {
  AtomQuery q = *ParseAtomQuery("Co3+", std::nullopt);
  q.geometry = Geometry::kOctahedral;
  q.spin_state = SpinStatePreference::kLow;
  for (auto _ : state) {
    absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(q);
    benchmark::DoNotOptimize(d);
  }
}
BENCHMARK(BM_DescribeAtomOctahedral);

void BM_ParseConfiguration(benchmark::State& state) {
  for (auto _ : state) {
    auto c = Configuration::Parse("[Xe] 4f14 5d10 6s2 6p2");
    benchmark::DoNotOptimize(c);
  }
}
BENCHMARK(BM_ParseConfiguration);

}  // namespace
}  // namespace shellwright

BENCHMARK_MAIN();
