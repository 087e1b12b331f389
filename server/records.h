// Per-record analysis behind the AnalyzeRecords and AnalyzeCompound RPCs.
//
// shellwrightd answers every CompositionRecord, in AnalyzeCompound and in
// AnalyzeRecords, through this one function: engine/composition.h via the
// proto translation in convert.h. It never fails; a malformed record gets
// an error report.
//
// Example:
//
//   shellwright::v1::CompositionRecord record;
//   record.set_id("sample-7");
//   record.set_formula("LiFePO4");
//   shellwright::v1::RecordReport report;
//   shellwright::AnalyzeRecordMessage(record, &report);
//   // report.id() == "sample-7"; report.valid() == true
//
// Thread safety: thread-safe; no shared state.

#ifndef SHELLWRIGHT_SERVER_RECORDS_H_
#define SHELLWRIGHT_SERVER_RECORDS_H_

#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright {

// Fills `report` (cleared first) with the verdict on `record`. The report's
// id is always the record's id. REQUIRES: report != nullptr.
void AnalyzeRecordMessage(const v1::CompositionRecord& record,
                          v1::RecordReport* report);

}  // namespace shellwright

#endif  // SHELLWRIGHT_SERVER_RECORDS_H_
