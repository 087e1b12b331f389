// Human-readable and JSON renderings of shellwright.v1 messages for the CLI.
//
// Both renderings work from the proto message, never from engine types, so
// output is byte-identical whether the message came from the in-process
// engine or from a shellwrightd server.
//
// Example:
//
//   shellwright::v1::AtomDescription d = ...;
//   std::cout << shellwright::cli::FormatAtomHuman(d);
//   std::cout << shellwright::cli::ToJson(d, /*pretty=*/true) << "\n";
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_CLIENTS_CLI_ATOM_FORMAT_H_
#define SHELLWRIGHT_CLIENTS_CLI_ATOM_FORMAT_H_

#include <string>

#include "google/protobuf/message.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

// JSON with proto field names and every default-valued primitive field
// printed, so consumers get stable keys. `pretty` adds indentation.
std::string ToJson(const google::protobuf::Message& message, bool pretty);

// Boxes for one subshell or split level in Hund order: "[↑↓][↑ ][↑ ]".
std::string OrbitalBoxes(int orbitals, int electrons);

// The multi-line human report for `atom`.
std::string FormatAtomHuman(const v1::AtomDescription& d);

// A table of all elements for `elements`.
std::string FormatElementsHuman(const v1::ListElementsResponse& elements);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_ATOM_FORMAT_H_
