#include "server/records.h"

#include "server/convert.h"

namespace shellwright {

void AnalyzeRecordMessage(const v1::CompositionRecord& record,
                          v1::RecordReport* report) {
  AnalyzeRecordToReport(record, report);
}

}  // namespace shellwright
