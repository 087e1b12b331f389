// Benchmarks for writing `check` report lines (clients/cli/report_lines.h),
// without the analysis itself:
//   - BM_EngineReportLine: from the engine report (`check` in process);
//   - BM_MessageReportLine: from a RecordReport message (`check --server`);
//   - BM_TranslateThenWrite: translating the engine report into an
//     arena-allocated RecordReport (one arena per 256-record batch), then
//     writing from the message: what a single, message-only path would
//     cost in process (docs/performance.md, "Report lines").
// Run: build/tests/clients/report_lines_benchmark --benchmark_repetitions=5
//        --benchmark_report_aggregates_only=true
// Figures go in docs/performance.md.

#include <memory>
#include <random>
#include <string>
#include <vector>

#include "absl/strings/str_format.h"
#include "api/records.h"
#include "benchmark/benchmark.h"
#include "clients/cli/report_lines.h"
#include "engine/composition.h"
#include "google/protobuf/arena.h"

namespace shellwright::cli {
namespace {

// Distinct perovskites, layered oxides, spinels and alloys with random
// two-decimal fractions, analysed once up front.
struct Analysed {
  std::vector<v1::CompositionRecord> records;
  std::vector<CompositionReport> reports;
  std::vector<v1::RecordReport> messages;
};

const Analysed& Reports() {
  static const Analysed* const kReports = [] {
    auto* a = new Analysed;
    std::mt19937 rng(7);
    std::uniform_int_distribution<int> pct(1, 99);
    const char* b_site[] = {"Mn", "Fe", "Co", "Ni", "Cr"};
    const char* alloy[] = {"Al", "Co", "Cr", "Fe", "Ni", "Cu", "Ti", "V"};
    // Few enough to stay in cache, as a report just made by the analysis
    // is when `check` writes it.
    for (int i = 0; i < 400; ++i) {
      const double x = pct(rng) / 100.0;
      std::string f;
      switch (i % 4) {
        case 0:
          f = absl::StrFormat("La%.2fSr%.2f%sO3", 1 - x, x, b_site[i % 5]);
          break;
        case 1:
          f = absl::StrFormat("LiNi%.2fCo%.2fMn%.2fO2", x / 2, x / 2, 1 - x);
          break;
        case 2:
          f = absl::StrFormat("ZnFe%.2fAl%.2fO4", 2 - x, x);
          break;
        default:
          for (int k = 0; k < 5; ++k) {
            f += absl::StrFormat("%s%.2f", alloy[(i + 3 * k) % 8],
                                 pct(rng) / 100.0);
          }
      }
      v1::CompositionRecord record;
      record.set_id(absl::StrFormat("r%07d", i));
      record.set_formula(f);
      record.set_row(i + 2);
      a->reports.push_back(
          AnalyzeComposition(CompositionInputFromProto(record)));
      a->messages.emplace_back();
      RecordReportToProto(a->reports.back(), record, &a->messages.back());
      a->records.push_back(std::move(record));
    }
    return a;
  }();
  return *kReports;
}

// Writes one line per iteration with `write(i, format, &text)`, cycling
// through the reports; counts the bytes written.
template <typename Write>
void WriteLines(benchmark::State& state, Write write) {
  const auto format =
      state.range(0) == 0 ? ReportLineFormat::kJsonl : ReportLineFormat::kCsv;
  const size_t n = Reports().reports.size();
  std::string text;
  size_t i = 0, bytes = 0;
  for (auto _ : state) {
    if (text.size() > (1 << 20)) text.clear();
    const size_t before = text.size();
    write(i, format, &text);
    bytes += text.size() - before;
    if (++i == n) i = 0;
  }
  state.SetBytesProcessed(static_cast<int64_t>(bytes));
  state.SetLabel(state.range(0) == 0 ? "jsonl" : "csv");
}

void BM_EngineReportLine(benchmark::State& state) {
  const Analysed& a = Reports();
  WriteLines(state, [&](size_t i, ReportLineFormat format, std::string* out) {
    AppendReportLine(format, a.reports[i], a.records[i], out);
  });
}
BENCHMARK(BM_EngineReportLine)->Arg(0)->Arg(1);

void BM_MessageReportLine(benchmark::State& state) {
  const Analysed& a = Reports();
  WriteLines(state, [&](size_t i, ReportLineFormat format, std::string* out) {
    AppendReportLine(format, a.messages[i], out);
  });
}
BENCHMARK(BM_MessageReportLine)->Arg(0)->Arg(1);

void BM_TranslateThenWrite(benchmark::State& state) {
  const Analysed& a = Reports();
  auto arena = std::make_unique<google::protobuf::Arena>();
  int in_batch = 0;
  WriteLines(state, [&](size_t i, ReportLineFormat format, std::string* out) {
    if (++in_batch == 256) {
      arena = std::make_unique<google::protobuf::Arena>();
      in_batch = 0;
    }
    auto* message =
        google::protobuf::Arena::CreateMessage<v1::RecordReport>(arena.get());
    RecordReportToProto(a.reports[i], a.records[i], message);
    AppendReportLine(format, *message, out);
  });
}
BENCHMARK(BM_TranslateThenWrite)->Arg(0)->Arg(1);

}  // namespace
}  // namespace shellwright::cli

BENCHMARK_MAIN();
