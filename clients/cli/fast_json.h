// A fast JSON printer for shellwright.v1 messages, byte-identical to the
// protobuf JSON printer with the CLI's options (proto field names, every
// default-valued primitive field printed, no whitespace).
//
// `check` prints one report per record; the protobuf printer builds a tree
// of default values for every message it prints and costs about 100 µs per
// report here, which would dominate a batch run. This printer walks the
// message with reflection straight into a string. Tests compare its output
// with the protobuf printer's on every kind of field and character.
//
// Example:
//   std::string line;
//   shellwright::cli::AppendCompactJson(report, &line);
//
// Thread safety: thread-safe.

#ifndef SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_
#define SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_

#include <string>

#include "google/protobuf/message.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

// Appends the compact JSON form of `message` to `out`. Map fields and the
// well-known wrapper types are not supported (the shellwright.v1 schema
// uses neither).
void AppendCompactJson(const google::protobuf::Message& message,
                       std::string* out);

// The same bytes as AppendCompactJson(report, out), written field by field
// with the generated accessors instead of reflection: `check` prints one
// of these per input row, and reflection cost more than the analysis.
// Tests compare the two on fully populated reports, so a field added to
// the schema and missed here fails them.
void AppendRecordReportJson(const v1::RecordReport& report, std::string* out);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_
