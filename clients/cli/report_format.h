// Human-readable rendering of a shellwright.v1.RecordReport for
// `shellwright compound`.
//
// Example:
//   std::cout << shellwright::cli::FormatReportHuman(report);
//
// Thread safety: pure function.

#ifndef SHELLWRIGHT_CLIENTS_CLI_REPORT_FORMAT_H_
#define SHELLWRIGHT_CLIENTS_CLI_REPORT_FORMAT_H_

#include <string>

#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

// Verdict, balanced assignment, alternatives, an ion table, per-formula-unit
// magnetic figures and diagnostics; the caller adds the moment caution
// (api/caution.h) once at the end of its output.
std::string FormatReportHuman(const v1::RecordReport& report);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_REPORT_FORMAT_H_
