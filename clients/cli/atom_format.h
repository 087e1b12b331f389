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

#include <optional>
#include <string>

#include "absl/strings/string_view.h"
#include "google/protobuf/message.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

// JSON with proto field names and every default-valued primitive field
// printed, so consumers get stable keys. `pretty` adds indentation.
std::string ToJson(const google::protobuf::Message& message, bool pretty);

// Boxes for one subshell or split level in Hund order: "[↑↓][↑ ][↑ ]".
std::string OrbitalBoxes(int orbitals, int electrons);

// A ligand field as human output shows it.
struct LigandFieldText {
  std::string geometry;  // "octahedral".
  std::string occupancy;  // With superscript counts: "t2g⁶ eg⁰", "e⁴ t2³".
  // "low spin"; or, where high and low spin give the same occupancy,
  // "d3: one spin state only", "empty d subshell: no spin state".
  std::string spin;
  bool has_spin_choice = false;
};

// The human form of a report's ligand field from its geometry name, spin
// state name and occupancy ("e4 t23", as IonReport.ligand_field_occupancy
// writes it). nullopt when no field applies (free, or no occupancy) or the
// occupancy does not read as the geometry's levels.
std::optional<LigandFieldText> DescribeLigandField(absl::string_view geometry,
                                                   absl::string_view spin_state,
                                                   absl::string_view occupancy);

// Whether an ion's spin state is worth showing: false exactly where
// DescribeLigandField gives has_spin_choice false (d0, d10, octahedral d3:
// high and low spin give the same occupancy), true also where it gives
// nullopt. Makes no text, so it is cheap enough for every report line.
bool SpinStateMatters(absl::string_view geometry, absl::string_view occupancy);

// The multi-line human report for `atom`, without the moment caution (the
// caller ends its output with it once, api/caution.h).
std::string FormatAtomHuman(const v1::AtomDescription& d);

// Which elements `elements` lists; empty or 0 fields do not filter.
struct ElementFilter {
  std::string block;  // "s", "p", "d" or "f".
  int period = 0;
  int group = 0;
};

// Removes from `elements` those `filter` does not select.
void FilterElements(const ElementFilter& filter,
                    v1::ListElementsResponse* elements);

// A table of the elements for `elements`: weights as published, Pauling
// electronegativities.
std::string FormatElementsHuman(const v1::ListElementsResponse& elements);

// The same columns as CSV with a header row; a blank cell where a value is
// not defined (group, electronegativity).
std::string FormatElementsCsv(const v1::ListElementsResponse& elements);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_ATOM_FORMAT_H_
