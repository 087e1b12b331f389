// Composition records in the shellwright.v1 API: translation of a
// CompositionRecord into engine input and of the engine's report into a
// RecordReport, and the one function that answers a record.
//
// shellwrightd (AnalyzeCompound, AnalyzeRecords) and the shellwright CLI
// answer every record through AnalyzeRecord, and a line that cannot be
// read as a record through MalformedRecordReport, so each input gets
// exactly one report, the same whichever way it came.
//
// Example:
//
//   shellwright::v1::CompositionRecord record;
//   record.set_id("sample-7");
//   record.set_formula("LiFePO4");
//   shellwright::v1::RecordReport report;
//   shellwright::AnalyzeRecord(record, &report);
//   // report.id() == "sample-7"; report.valid() == true
//
// Thread safety: all functions are thread-safe.

#ifndef SHELLWRIGHT_API_RECORDS_H_
#define SHELLWRIGHT_API_RECORDS_H_

#include "absl/strings/string_view.h"
#include "api/report_mask.h"
#include "engine/composition.h"
#include "engine/formula.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "util/utf8.h"

namespace shellwright {

// Most alternatives a record may ask for.
inline constexpr int kMaxAlternatives = 5;

// Most records in one RecordBatch; a larger batch ends an AnalyzeRecords
// stream with INVALID_ARGUMENT (it is the client's framing, not a bad
// record).
inline constexpr int kMaxRecordsPerBatch = 10000;

// Translates a record into engine input. Never fails: out-of-range values
// are clamped or left for AnalyzeComposition to diagnose.
CompositionInput CompositionInputFromProto(const v1::CompositionRecord& record);

// The record's formula as a report echoes it: cut to kMaxFormulaLength at a
// character boundary.
inline absl::string_view EchoedFormula(const v1::CompositionRecord& record) {
  return Utf8Prefix(record.formula(), kMaxFormulaLength);
}

// Fills `out` (cleared first) from an engine report; `record` supplies the
// echoed row and formula. The fields are those api/report_view.h's
// VisitRecordReport walks that `mask` wants; the others are left at their
// defaults, and their values are not built.
void RecordReportToProto(const CompositionReport& report,
                         const v1::CompositionRecord& record,
                         v1::RecordReport* out,
                         const ReportMask& mask = ReportMask());

// Analyses one record into `out` (cleared first): exactly one report,
// never an error, with the fields `mask` wants. The report's id is the
// record's (cut to kMaxRecordIdLength). REQUIRES: out != nullptr.
void AnalyzeRecord(const v1::CompositionRecord& record, v1::RecordReport* out,
                   const ReportMask& mask = ReportMask());

// The report for an input line that could not be read as a record: invalid,
// with one malformed_record error "row N: <problem>". `partial` holds the
// row and whatever could be read (the id, the formula); both are echoed,
// cut at character boundaries.
void MalformedRecordReport(const v1::CompositionRecord& partial,
                           absl::string_view problem, v1::RecordReport* out);

}  // namespace shellwright

#endif  // SHELLWRIGHT_API_RECORDS_H_
