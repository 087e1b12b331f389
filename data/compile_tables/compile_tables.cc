// compile_tables: validates the TSV tables in data/ and turns them into a C++
// source file that defines the tables declared in
// engine/internal/data_tables.h.
//
// It runs at build time (see data/CMakeLists.txt). Any problem in a table
// stops the build with "FILE:LINE: problem". Configurations and term
// symbols are checked with the engine's own parsers, so a table can never
// hold a value that the engine would reject.
//
// Usage:
//   compile_tables --elements=elements.tsv
//       --exceptions=configuration_exceptions.tsv
//       --departures=ground_level_departures.tsv
//       --moments=measured_moments.tsv --oxidation=oxidation_states.tsv
//       --units=units.tsv --abbreviations=ligand_abbreviations.tsv
//       --ligands=spectrochemical_series.tsv
//       --crossover=spin_crossover.tsv
//       --chalcogenide=chalcogenide_states.tsv
//       --intervals=multiplet_intervals.tsv
//       --actinides=actinide_moments.tsv
//       --spin_orbit=spin_orbit_constants.tsv --out=data_tables.cc
//       --sites=site_preferences.tsv --out=data_tables.cc

#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <iostream>
#include <map>
#include <optional>
#include <set>
#include <sstream>
#include <string>
#include <tuple>
#include <utility>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "engine/configuration.h"
#include "engine/term_symbol.h"
#include "util/command_line.h"

namespace {

struct Row {
  int line = 0;
  std::vector<std::string> fields;
};

struct Table {
  std::string path;
  std::vector<std::string> header;
  std::vector<Row> rows;
};

[[noreturn]] void Fail(const std::string& path, int line,
                       const std::string& problem) {
  std::cerr << path << ":" << line << ": " << problem << "\n";
  std::exit(1);
}

Table ReadTable(const std::string& path,
                const std::vector<std::string>& expected_header) {
  std::ifstream in(path);
  if (!in) Fail(path, 0, "cannot open file");
  Table t;
  t.path = path;
  std::string text;
  int line_no = 0;
  while (std::getline(in, text)) {
    ++line_no;
    if (!text.empty() && text.back() == '\r') {
      Fail(path, line_no, "CRLF line ending; use LF");
    }
    if (text.empty() || text[0] == '#') continue;
    if (text.back() == ' ' || text.back() == '\t') {
      Fail(path, line_no, "trailing whitespace");
    }
    std::vector<std::string> fields = absl::StrSplit(text, '\t');
    if (t.header.empty()) {
      if (fields != expected_header) {
        std::string want;
        for (const auto& h : expected_header) absl::StrAppend(&want, h, " ");
        Fail(path, line_no, "header row must be (tab-separated): " + want);
      }
      t.header = fields;
      continue;
    }
    if (fields.size() != t.header.size()) {
      Fail(path, line_no,
           absl::StrCat("expected ", t.header.size(),
                        " tab-separated fields, "
                        "found ",
                        fields.size()));
    }
    for (size_t i = 0; i < fields.size(); ++i) {
      if (fields[i].empty()) {
        Fail(path, line_no,
             absl::StrCat("column '", t.header[i], "' is empty (use '-')"));
      }
    }
    t.rows.push_back(Row{line_no, std::move(fields)});
  }
  if (t.header.empty()) Fail(path, line_no, "no header row");
  return t;
}

long ParseInt(const Table& t, const Row& r, size_t col, long lo, long hi) {
  const std::string& s = r.fields[col];
  char* end = nullptr;
  errno = 0;
  long v = std::strtol(s.c_str(), &end, 10);
  if (errno != 0 || end == s.c_str() || *end != '\0' || v < lo || v > hi) {
    Fail(t.path, r.line,
         absl::StrCat("column '", t.header[col], "': expected an integer from ",
                      lo, " to ", hi, ", got '", s, "'"));
  }
  return v;
}

double ParseDecimal(const Table& t, const Row& r, size_t col,
                    const std::string& s, double lo, double hi) {
  char* end = nullptr;
  errno = 0;
  double v = std::strtod(s.c_str(), &end);
  if (errno != 0 || end == s.c_str() || *end != '\0' || !std::isfinite(v) ||
      v < lo || v > hi) {
    Fail(t.path, r.line,
         absl::StrCat("column '", t.header[col], "': expected a number from ",
                      lo, " to ", hi, ", got '", s, "'"));
  }
  return v;
}

// A C++ string literal for `s`.
std::string Literal(const std::string& s) {
  std::string out = "\"";
  for (char c : s) {
    if (c == '"' || c == '\\') out.push_back('\\');
    out.push_back(c);
  }
  out.push_back('"');
  return out;
}

std::string Double(double v) {
  char buf[64];
  std::snprintf(buf, sizeof(buf), "%.17g", v);
  return buf;
}

// The table files, by the name of the option that gives each.
using Paths = std::map<std::string, std::string>;

// Parses argv into `paths`. Returns nullopt to go on, or an exit code.
std::optional<int> ParseArgs(int argc, char** argv, Paths* paths) {
  CLI::App app{
      "Validates data/*.tsv and compiles them into the C++ source that "
      "defines engine/internal/data_tables.h's tables.",
      "compile_tables"};
  const struct {
    const char* name;
    const char* what;
  } kTables[] = {
      {"elements", "elements.tsv"},
      {"exceptions", "configuration_exceptions.tsv"},
      {"departures", "ground_level_departures.tsv"},
      {"moments", "measured_moments.tsv"},
      {"oxidation", "oxidation_states.tsv"},
      {"units", "units.tsv"},
      {"abbreviations", "ligand_abbreviations.tsv"},
      {"ligands", "spectrochemical_series.tsv"},
      {"crossover", "spin_crossover.tsv"},
      {"chalcogenide", "chalcogenide_states.tsv"},
      {"bound_only", "bound_only_states.tsv"},
      {"preferences", "state_preferences.tsv"},
      {"pairs", "mixed_valence_pairs.tsv"},
      {"state_en", "state_electronegativities.tsv"},
      {"potentials", "reduction_potentials.tsv"},
      {"orbital", "orbital_ranges.tsv"},
      {"intervals", "multiplet_intervals.tsv"},
      {"actinides", "actinide_moments.tsv"},
      {"spin_orbit", "spin_orbit_constants.tsv"},
      {"sites", "site_preferences.tsv"},
      {"out", "the C++ file to write"},
  };
  for (const auto& table : kTables) {
    app.add_option(std::string("--") + table.name, (*paths)[table.name],
                   table.what)
        ->required();
  }
  return shellwright::ParseCommandLine(app, argc, argv, std::cout, std::cerr);
}

}  // namespace

int main(int argc, char** argv) {
  Paths args;
  if (std::optional<int> exit = ParseArgs(argc, argv, &args)) return *exit;
  std::ostringstream out;
  out << "// Generated by data/compile_tables from the TSV tables in data/.\n"
         "// Do not edit: change the TSV files instead.\n\n"
         "#include \"engine/internal/data_tables.h\"\n\n"
         "namespace shellwright::internal {\nnamespace {\n\n";

  // --- elements.tsv ---------------------------------------------------------
  const Table elements =
      ReadTable(args.at("elements"),
                {"atomic_number", "symbol", "name", "period", "group", "block",
                 "standard_atomic_weight", "pauling_electronegativity",
                 "electronegativity_estimated"});
  std::map<std::string, int> z_by_symbol;
  std::set<std::string> names;
  out << "constexpr ElementRow kElements[] = {\n";
  for (const Row& r : elements.rows) {
    const int z = static_cast<int>(ParseInt(elements, r, 0, 1, 118));
    if (z != static_cast<int>(z_by_symbol.size()) + 1) {
      Fail(elements.path, r.line,
           absl::StrCat("atomic_number ", z, " out of sequence; expected ",
                        z_by_symbol.size() + 1));
    }
    const std::string& symbol = r.fields[1];
    const bool symbol_ok =
        (symbol.size() == 1 || symbol.size() == 2 || symbol.size() == 3) &&
        std::isupper(static_cast<unsigned char>(symbol[0])) &&
        (symbol.size() < 2 ||
         std::islower(static_cast<unsigned char>(symbol[1]))) &&
        (symbol.size() < 3 ||
         std::islower(static_cast<unsigned char>(symbol[2])));
    if (!symbol_ok) {
      Fail(
          elements.path, r.line,
          "symbol '" + symbol + "' must be one capital then lowercase letters");
    }
    if (!z_by_symbol.emplace(symbol, z).second) {
      Fail(elements.path, r.line, "duplicate symbol '" + symbol + "'");
    }
    if (!names.insert(r.fields[2]).second) {
      Fail(elements.path, r.line, "duplicate name '" + r.fields[2] + "'");
    }
    const long period = ParseInt(elements, r, 3, 1, 7);
    const long group = r.fields[4] == "-" ? 0 : ParseInt(elements, r, 4, 1, 18);
    const std::string& block = r.fields[5];
    if (block != "s" && block != "p" && block != "d" && block != "f") {
      Fail(elements.path, r.line,
           "column 'block': expected s, p, d or f, got '" + block + "'");
    }
    std::string weight_text = r.fields[6];
    bool mass_number = false;
    if (weight_text.size() > 2 && weight_text.front() == '[' &&
        weight_text.back() == ']') {
      mass_number = true;
      weight_text = weight_text.substr(1, weight_text.size() - 2);
    }
    const double weight = ParseDecimal(elements, r, 6, weight_text, 1, 300);
    const bool has_en = r.fields[7] != "-";
    const double en =
        has_en ? ParseDecimal(elements, r, 7, r.fields[7], 0.5, 4.0) : 0.0;
    if (r.fields[8] != "yes" && r.fields[8] != "no") {
      Fail(elements.path, r.line,
           "column 'electronegativity_estimated': expected yes or no");
    }
    if (r.fields[8] == "yes" && !has_en) {
      Fail(elements.path, r.line,
           "an estimated electronegativity needs a value");
    }
    out << "    {" << z << ", " << Literal(symbol) << ", "
        << Literal(r.fields[2]) << ", " << period << ", " << group << ", '"
        << block << "', " << Double(weight) << ", "
        << (mass_number ? "true" : "false") << ", "
        << (has_en ? "true" : "false") << ", " << Double(en) << ", "
        << Literal(r.fields[6]) << ", "
        << (r.fields[8] == "yes" ? "true" : "false") << "},\n";
  }
  if (z_by_symbol.size() != 118) {
    Fail(elements.path, 0,
         absl::StrCat("expected 118 elements, found ", z_by_symbol.size()));
  }
  out << "};\n\n";

  auto symbol_to_z = [&](const Table& t, const Row& r, size_t col) {
    auto it = z_by_symbol.find(r.fields[col]);
    if (it == z_by_symbol.end()) {
      Fail(t.path, r.line, "unknown element symbol '" + r.fields[col] + "'");
    }
    return it->second;
  };
  auto check_symbol_matches = [&](const Table& t, const Row& r, int z) {
    if (symbol_to_z(t, r, 1) != z) {
      Fail(t.path, r.line,
           absl::StrCat("symbol '", r.fields[1],
                        "' does not match atomic "
                        "number ",
                        z));
    }
  };

  // --- configuration_exceptions.tsv -----------------------------------------
  const Table exceptions =
      ReadTable(args.at("exceptions"),
                {"atomic_number", "symbol", "configuration", "source"});
  out << "constexpr ConfigurationExceptionRow kExceptions[] = {\n";
  std::set<int> exception_z;
  for (const Row& r : exceptions.rows) {
    const int z = static_cast<int>(ParseInt(exceptions, r, 0, 1, 118));
    check_symbol_matches(exceptions, r, z);
    if (!exception_z.insert(z).second) {
      Fail(exceptions.path, r.line, absl::StrCat("duplicate row for Z ", z));
    }
    auto config = shellwright::Configuration::Parse(r.fields[2]);
    if (!config.ok()) {
      Fail(exceptions.path, r.line, std::string(config.status().message()));
    }
    if (config->electrons() != z) {
      Fail(exceptions.path, r.line,
           absl::StrCat("configuration holds ", config->electrons(),
                        " electrons, but Z is ", z));
    }
    if (*config == shellwright::Configuration::Madelung(z)) {
      Fail(exceptions.path, r.line,
           "configuration equals Madelung filling; it is not an exception");
    }
    out << "    {" << z << ", " << Literal(r.fields[2]) << ", "
        << Literal(r.fields[3]) << "},\n";
  }
  out << "};\n\n";

  // --- ground_level_departures.tsv ------------------------------------------
  const Table departures = ReadTable(
      args.at("departures"),
      {"atomic_number", "symbol", "observed_level", "hund_level", "source"});
  out << "constexpr GroundLevelDepartureRow kDepartures[] = {\n";
  for (const Row& r : departures.rows) {
    const int z = static_cast<int>(ParseInt(departures, r, 0, 1, 118));
    check_symbol_matches(departures, r, z);
    for (size_t col : {2u, 3u}) {
      auto term = shellwright::TermSymbol::Parse(r.fields[col]);
      if (!term.ok()) {
        Fail(departures.path, r.line,
             absl::StrCat("column '", departures.header[col],
                          "': ", term.status().message()));
      }
    }
    if (r.fields[2] == r.fields[3]) {
      Fail(departures.path, r.line,
           "observed_level equals hund_level; it is not a departure");
    }
    out << "    {" << z << ", " << Literal(r.fields[2]) << ", "
        << Literal(r.fields[3]) << ", " << Literal(r.fields[4]) << "},\n";
  }
  out << "};\n\n";

  // --- measured_moments.tsv -------------------------------------------------
  const Table moments = ReadTable(
      args.at("moments"), {"symbol", "charge", "measured_moment", "source"});
  out << "constexpr MeasuredMomentRow kMoments[] = {\n";
  for (const Row& r : moments.rows) {
    const int z = symbol_to_z(moments, r, 0);
    const long charge = ParseInt(moments, r, 1, -8, 118);
    const bool has = r.fields[2] != "-";
    const double m = has ? ParseDecimal(moments, r, 2, r.fields[2], 0, 20) : 0;
    out << "    {" << z << ", " << charge << ", " << (has ? "true" : "false")
        << ", " << Double(m) << ", " << Literal(r.fields[3]) << "},\n";
  }
  out << "};\n\n";

  // --- oxidation_states.tsv -------------------------------------------------
  const Table oxidation =
      ReadTable(args.at("oxidation"), {"symbol", "state", "common", "source"});
  out << "constexpr OxidationStateRow kOxidation[] = {\n";
  int last_z = 0;
  int last_state = -100;
  for (const Row& r : oxidation.rows) {
    const int z = symbol_to_z(oxidation, r, 0);
    const long state = ParseInt(oxidation, r, 1, -5, 9);
    if (state == 0) {
      Fail(oxidation.path, r.line, "state 0 is implied; do not list it");
    }
    if (z < last_z || (z == last_z && state <= last_state)) {
      Fail(oxidation.path, r.line,
           "rows must be ordered by atomic number, then by increasing state, "
           "with no duplicates");
    }
    last_z = z;
    last_state = static_cast<int>(state);
    const std::string& common = r.fields[2];
    if (common != "yes" && common != "no") {
      Fail(oxidation.path, r.line,
           "column 'common': expected yes or no, got '" + common + "'");
    }
    out << "    {" << z << ", " << state << ", "
        << (common == "yes" ? "true" : "false") << ", " << Literal(r.fields[3])
        << "},\n";
  }
  out << "};\n\n";

  // --- units.tsv ------------------------------------------------------------
  const Table units = ReadTable(
      args.at("units"),
      {"name", "charge", "atoms", "unpaired", "written", "cations", "source"});
  std::ostringstream unit_atoms, unit_rows;
  std::set<std::string> unit_names;
  int atom_rows = 0;
  for (const Row& r : units.rows) {
    const std::string& name = r.fields[0];
    if (!unit_names.insert(name).second) {
      Fail(units.path, r.line, "duplicate unit name '" + name + "'");
    }
    const long charge = ParseInt(units, r, 1, -8, 8);
    // Positions "Sym:state:count", their states summing to the charge.
    std::map<int, long> composition;
    long total = 0;
    const int first = atom_rows;
    for (absl::string_view item : absl::StrSplit(r.fields[2], ',')) {
      std::vector<std::string> parts = absl::StrSplit(item, ':');
      if (parts.size() != 3) {
        Fail(units.path, r.line,
             "column 'atoms': expected Symbol:state:count, got '" +
                 std::string(item) + "'");
      }
      auto z = z_by_symbol.find(parts[0]);
      if (z == z_by_symbol.end()) {
        Fail(units.path, r.line, "unknown element symbol '" + parts[0] + "'");
      }
      char* end = nullptr;
      errno = 0;
      const long state = std::strtol(parts[1].c_str(), &end, 10);
      const bool state_ok = !parts[1].empty() && *end == '\0' && errno == 0 &&
                            state >= -5 && state <= 9;
      const long count = std::strtol(parts[2].c_str(), &end, 10);
      if (!state_ok || parts[2].empty() || *end != '\0' || count < 1 ||
          count > 48) {
        Fail(units.path, r.line,
             "column 'atoms': bad state or count in '" + std::string(item) +
                 "'");
      }
      composition[z->second] += count;
      total += state * count;
      unit_atoms << "    {" << z->second << ", " << state << ", " << count
                 << "},\n";
      ++atom_rows;
    }
    if (total != charge) {
      Fail(units.path, r.line,
           absl::StrCat("the atoms' states sum to ", total,
                        ", not to the unit's charge ", charge));
    }
    const long unpaired = ParseInt(units, r, 3, 0, 4);
    // Every written form holds exactly the unit's atoms, or an integral
    // fraction of them: PS3, half of P2S6 as MPS3 formulas write it.
    for (absl::string_view form : absl::StrSplit(r.fields[4], '|')) {
      std::map<int, long> written;
      size_t i = 0;
      const std::string f(form);
      while (i < f.size()) {
        size_t j = i + 1;
        if (!std::isupper(static_cast<unsigned char>(f[i]))) j = f.size() + 1;
        while (j < f.size() && std::islower(static_cast<unsigned char>(f[j]))) {
          ++j;
        }
        if (j > f.size()) {
          Fail(units.path, r.line,
               "column 'written': '" + f + "' is not a run of element symbols");
        }
        auto z = z_by_symbol.find(f.substr(i, j - i));
        if (z == z_by_symbol.end()) {
          Fail(units.path, r.line,
               "column 'written': unknown element in '" + f + "'");
        }
        long n = 0;
        size_t k = j;
        while (k < f.size() && std::isdigit(static_cast<unsigned char>(f[k]))) {
          n = n * 10 + (f[k] - '0');
          ++k;
        }
        written[z->second] += k == j ? 1 : n;
        i = k;
      }
      bool proportional = written.size() == composition.size();
      long parts = 0;
      for (auto w = written.begin(), c = composition.begin();
           proportional && w != written.end(); ++w, ++c) {
        proportional = w->first == c->first && c->second % w->second == 0 &&
                       (parts == 0 || c->second / w->second == parts);
        parts = c->second / w->second;
      }
      if (!proportional) {
        Fail(
            units.path, r.line,
            "column 'written': '" + f +
                "' does not hold the unit's atoms or a whole fraction of them");
      }
    }
    // Allowed cations: '-', 'none' (written groups only), or blocks and
    // element symbols.
    if (r.fields[5] != "-" && r.fields[5] != "none") {
      for (absl::string_view c : absl::StrSplit(r.fields[5], ',')) {
        if (c != "s" && c != "p" && c != "d" && c != "f" &&
            z_by_symbol.count(std::string(c)) == 0) {
          Fail(units.path, r.line,
               "column 'cations': '" + std::string(c) +
                   "' is neither a block nor an element symbol");
        }
      }
    }
    unit_rows << "    {" << Literal(name) << ", " << charge << ", " << first
              << ", " << atom_rows - first << ", " << unpaired << ", "
              << Literal(r.fields[4]) << ", " << Literal(r.fields[5]) << ", "
              << Literal(r.fields[6]) << "},\n";
  }
  out << "constexpr UnitAtomRow kUnitAtoms[] = {\n"
      << unit_atoms.str() << "};\n\n";
  out << "constexpr UnitRow kUnits[] = {\n" << unit_rows.str() << "};\n\n";

  // --- ligand_abbreviations.tsv ---------------------------------------------
  // Each abbreviation names a unit; it must never be read as element
  // symbols, so that no formula that parses without it changes meaning.
  const Table abbreviations =
      ReadTable(args.at("abbreviations"), {"abbreviation", "unit", "source"});
  out << "constexpr LigandAbbreviationRow kLigandAbbreviations[] = {\n";
  std::set<std::string> abbreviation_names;
  for (const Row& r : abbreviations.rows) {
    const std::string& a = r.fields[0];
    if (!abbreviation_names.insert(a).second) {
      Fail(abbreviations.path, r.line, "duplicate abbreviation '" + a + "'");
    }
    // Lower case ("bpy"), a capital and lower case ("Cp"), or a joined
    // form whose later capitals start parts ("OAc"), with an optional
    // closing '*' ("Cp*"); the parser reads joined forms before symbols.
    const size_t letters_end =
        !a.empty() && a.back() == '*' ? a.size() - 1 : a.size();
    bool letters = letters_end >= 2 && a.size() <= 8;
    const bool capital_first =
        !a.empty() && std::isupper(static_cast<unsigned char>(a[0]));
    for (size_t i = 0; i < letters_end && letters; ++i) {
      const unsigned char c = static_cast<unsigned char>(a[i]);
      letters =
          std::islower(c) || (std::isupper(c) && (i == 0 || capital_first));
    }
    if (!letters) {
      Fail(abbreviations.path, r.line,
           "abbreviation '" + a +
               "' must be 2 to 8 ASCII letters (lower case, or capitals "
               "starting its parts) with an optional closing '*'");
    }
    if (z_by_symbol.count(a) > 0) {
      Fail(abbreviations.path, r.line,
           "abbreviation '" + a + "' is an element symbol");
    }
    int unit = -1;
    for (size_t k = 0; k < units.rows.size(); ++k) {
      if (units.rows[k].fields[0] == r.fields[1]) unit = static_cast<int>(k);
    }
    if (unit < 0) {
      Fail(abbreviations.path, r.line,
           "unit '" + r.fields[1] + "' is not a unit in units.tsv");
    }
    out << "    {" << Literal(a) << ", " << unit << ", " << Literal(r.fields[2])
        << "},\n";
  }
  out << "};\n\n";

  // --- spectrochemical_series.tsv -------------------------------------------
  const Table ligands =
      ReadTable(args.at("ligands"),
                {"ligand", "f", "donor", "denticity", "plane", "source"});
  out << "constexpr LigandRow kLigands[] = {\n";
  std::set<std::string> ligand_names;
  for (const Row& r : ligands.rows) {
    const std::string& ligand = r.fields[0];
    if (!ligand_names.insert(ligand).second) {
      Fail(ligands.path, r.line, "duplicate ligand '" + ligand + "'");
    }
    const bool is_unit = unit_names.count(ligand) > 0;
    const auto anion = z_by_symbol.find(ligand);
    if (!is_unit && anion == z_by_symbol.end()) {
      Fail(ligands.path, r.line,
           "ligand '" + ligand +
               "' is neither a unit in units.tsv nor an element symbol");
    }
    const double f = ParseDecimal(ligands, r, 1, r.fields[1], 0.3, 3.0);
    const int donor = symbol_to_z(ligands, r, 2);
    const long denticity = ParseInt(ligands, r, 3, 1, 6);
    // 'planar': a tetradentate ligand holding its donors in one plane.
    if (r.fields[4] != "planar" && r.fields[4] != "-") {
      Fail(ligands.path, r.line,
           "plane '" + r.fields[4] + "' must be 'planar' or '-'");
    }
    const bool planar = r.fields[4] == "planar";
    if (planar && denticity != 4) {
      Fail(ligands.path, r.line, "a planar ligand must be tetradentate");
    }
    out << "    {" << Literal(is_unit ? ligand : "") << ", "
        << (is_unit ? 0 : anion->second) << ", " << Double(f) << ", " << donor
        << ", " << denticity << ", " << (planar ? "true" : "false") << ", "
        << Literal(r.fields[5]) << "},\n";
  }
  out << "};\n\n";

  // A cation written "Fe+2" in column 0: its atomic number and state.
  auto parse_ion = [&](const Table& t, const Row& r) {
    const std::string& ion = r.fields[0];
    const size_t sign = ion.find_first_of("+-");
    if (sign == std::string::npos || sign == 0) {
      Fail(t.path, r.line, "ion '" + ion + "' must look like Fe+2");
    }
    auto z = z_by_symbol.find(ion.substr(0, sign));
    if (z == z_by_symbol.end()) {
      Fail(t.path, r.line, "unknown element in ion '" + ion + "'");
    }
    char* end = nullptr;
    const long state = std::strtol(ion.c_str() + sign, &end, 10);
    if (*end != '\0' || state < 0 || state > 9) {
      Fail(t.path, r.line, "bad state in ion '" + ion + "'");
    }
    return std::pair<int, long>(z->second, state);
  };

  // --- spin_crossover.tsv ---------------------------------------------------
  const Table crossover =
      ReadTable(args.at("crossover"),
                {"ion", "g", "f_crossover", "f_crossover_chalcogenide",
                 "pairing_cm1", "source"});
  out << "constexpr SpinCrossoverRow kCrossover[] = {\n";
  std::set<std::pair<int, long>> crossover_ions;
  for (const Row& r : crossover.rows) {
    const std::pair<int, long> ion = parse_ion(crossover, r);
    if (!crossover_ions.insert(ion).second) {
      Fail(crossover.path, r.line, "duplicate ion '" + r.fields[0] + "'");
    }
    const int z_ion = ion.first;
    const long state = ion.second;
    const double g = r.fields[1] == "-"
                         ? 0.0
                         : ParseDecimal(crossover, r, 1, r.fields[1], 1, 60);
    const double fc = ParseDecimal(crossover, r, 2, r.fields[2], 0.3, 3.0);
    const double fc_soft =
        r.fields[3] == "-"
            ? fc
            : ParseDecimal(crossover, r, 3, r.fields[3], 0.3, 3.0);
    const long pairing =
        r.fields[4] == "-" ? 0 : ParseInt(crossover, r, 4, 1000, 60000);
    out << "    {" << z_ion << ", " << state << ", " << Double(g) << ", "
        << Double(fc) << ", " << Double(fc_soft) << ", " << pairing << ", "
        << Literal(r.fields[5]) << "},\n";
  }
  out << "};\n\n";

  // --- site_preferences.tsv -------------------------------------------------
  const Table sites =
      ReadTable(args.at("sites"),
                {"ion", "spin", "ospe", "families", "preference", "source"});
  out << "constexpr SitePreferenceRow kSitePreferences[] = {\n";
  std::set<std::string> site_keys;
  for (const Row& r : sites.rows) {
    const std::string& key = r.fields[0];
    if (!site_keys.insert(key).second) {
      Fail(sites.path, r.line, "duplicate ion '" + key + "'");
    }
    int z = 0;
    long state = 0;
    long d = -1;
    if (key.size() >= 2 && key[0] == 'd' &&
        std::isdigit(static_cast<unsigned char>(key[1]))) {
      char* end = nullptr;
      d = std::strtol(key.c_str() + 1, &end, 10);
      if (*end != '\0' || d > 10) {
        Fail(sites.path, r.line, "ion '" + key + "' must be d0 to d10");
      }
    } else {
      std::tie(z, state) = parse_ion(sites, r);
    }
    const std::string& spin = r.fields[1];
    if (spin != "high" && spin != "low" && spin != "-") {
      Fail(sites.path, r.line, "column 'spin': expected high, low or -");
    }
    const double ospe = ParseDecimal(sites, r, 2, r.fields[2], 0, 400);
    if (r.fields[3] != "all" && r.fields[3] != "spinel") {
      Fail(sites.path, r.line, "column 'families': expected all or spinel");
    }
    static const std::map<std::string, char> kPreferences = {
        {"tetrahedral", 't'},
        {"octahedral", 'o'},
        {"weak_octahedral", 'w'},
        {"-", '-'}};
    const auto preference = kPreferences.find(r.fields[4]);
    if (preference == kPreferences.end()) {
      Fail(sites.path, r.line,
           "column 'preference': expected tetrahedral, octahedral, "
           "weak_octahedral or -");
    }
    out << "    {" << z << ", " << state << ", " << d << ", "
        << (spin == "low" ? "true" : "false") << ", " << Double(ospe) << ", "
        << (r.fields[3] == "spinel" ? "true" : "false") << ", '"
        << preference->second << "', " << Literal(r.fields[5]) << "},\n";
  }
  out << "};\n\n";

  // --- chalcogenide_states.tsv ----------------------------------------------
  const Table chalcogenide =
      ReadTable(args.at("chalcogenide"), {"symbol", "max_state", "source"});
  out << "constexpr ChalcogenideStateRow kChalcogenide[] = {\n";
  std::set<int> chalcogenide_z;
  for (const Row& r : chalcogenide.rows) {
    const int z = symbol_to_z(chalcogenide, r, 0);
    if (!chalcogenide_z.insert(z).second) {
      Fail(chalcogenide.path, r.line, "duplicate row for " + r.fields[0]);
    }
    const long max_state = ParseInt(chalcogenide, r, 1, 0, 8);
    out << "    {" << z << ", " << max_state << ", " << Literal(r.fields[2])
        << "},\n";
  }
  out << "};\n\n";

  // The known states, for the tables below that refer to them.
  std::set<std::pair<int, long>> known_states;
  for (const Row& r : oxidation.rows) {
    known_states.insert({z_by_symbol.at(r.fields[0]),
                         std::strtol(r.fields[1].c_str(), nullptr, 10)});
  }
  auto known_state = [&](const Table& t, const Row& r, size_t col, int z) {
    const long state = ParseInt(t, r, col, -8, 9);
    if (!known_states.count({z, state})) {
      Fail(t.path, r.line,
           absl::StrCat(r.fields[0], " ", state,
                        " is not a state in oxidation_states.tsv"));
    }
    return state;
  };

  // --- bound_only_states.tsv ------------------------------------------------
  const Table bound_only =
      ReadTable(args.at("bound_only"), {"symbol", "state", "where", "source"});
  out << "constexpr BoundOnlyStateRow kBoundOnly[] = {\n";
  std::set<std::pair<int, long>> bound_only_keys;
  for (const Row& r : bound_only.rows) {
    const int z = symbol_to_z(bound_only, r, 0);
    const long state = known_state(bound_only, r, 1, z);
    if (!bound_only_keys.insert({z, state}).second) {
      Fail(bound_only.path, r.line,
           absl::StrCat("duplicate row for ", r.fields[0], " ", state));
    }
    out << "    {" << z << ", " << state << ", " << Literal(r.fields[3])
        << "},\n";
  }
  out << "};\n\n";

  // --- state_preferences.tsv ------------------------------------------------
  const Table preferences = ReadTable(
      args.at("preferences"), {"symbol", "anions", "state", "rank", "source"});
  out << "constexpr StatePreferenceRow kPreferences[] = {\n";
  std::set<std::tuple<int, std::string, long>> preference_keys;
  for (const Row& r : preferences.rows) {
    const int z = symbol_to_z(preferences, r, 0);
    if (r.fields[1] != "hard" && r.fields[1] != "soft" &&
        r.fields[1] != "double_perovskite" && r.fields[1] != "delafossite" &&
        r.fields[1] != "zintl") {
      Fail(preferences.path, r.line,
           "column 'anions': expected hard, soft, double_perovskite, "
           "delafossite or zintl");
    }
    const long state = known_state(preferences, r, 2, z);
    if (!preference_keys.insert({z, r.fields[1], state}).second) {
      Fail(preferences.path, r.line, "duplicate row");
    }
    const long rank = ParseInt(preferences, r, 3, 1, 6);
    const int context = r.fields[1] == "hard"                ? 0
                        : r.fields[1] == "soft"              ? 1
                        : r.fields[1] == "double_perovskite" ? 2
                        : r.fields[1] == "delafossite"       ? 3
                                                             : 4;
    out << "    {" << z << ", " << context << ", " << state << ", " << rank
        << ", " << Literal(r.fields[4]) << "},\n";
  }
  out << "};\n\n";

  // --- mixed_valence_pairs.tsv ----------------------------------------------
  const Table pairs = ReadTable(args.at("pairs"),
                                {"symbol", "low", "high", "anions", "source"});
  out << "constexpr MixedValencePairRow kPairs[] = {\n";
  for (const Row& r : pairs.rows) {
    const int z = symbol_to_z(pairs, r, 0);
    const long low = known_state(pairs, r, 1, z);
    const long high = known_state(pairs, r, 2, z);
    if (low >= high || (low < 0) != (high < 0)) {
      Fail(pairs.path, r.line, "low must be below high, with the same sign");
    }
    if (r.fields[3] != "oxide" && r.fields[3] != "any") {
      Fail(pairs.path, r.line, "column 'anions': expected oxide or any");
    }
    out << "    {" << z << ", " << low << ", " << high << ", "
        << (r.fields[3] == "oxide" ? "true" : "false") << ", "
        << Literal(r.fields[4]) << "},\n";
  }
  out << "};\n\n";

  // --- state_electronegativities.tsv ----------------------------------------
  const Table state_en = ReadTable(
      args.at("state_en"), {"symbol", "state", "electronegativity", "source"});
  out << "constexpr StateElectronegativityRow kStateEn[] = {\n";
  for (const Row& r : state_en.rows) {
    const int z = symbol_to_z(state_en, r, 0);
    const long state = known_state(state_en, r, 1, z);
    const double en = ParseDecimal(state_en, r, 2, r.fields[2], 0.5, 4.0);
    out << "    {" << z << ", " << state << ", " << Double(en) << ", "
        << Literal(r.fields[3]) << "},\n";
  }
  out << "};\n\n";

  // --- reduction_potentials.tsv --------------------------------------------
  const Table potentials =
      ReadTable(args.at("potentials"),
                {"symbol", "oxidised", "reduced", "volts", "source"});
  out << "constexpr ReductionPotentialRow kPotentials[] = {\n";
  std::set<std::pair<int, long>> couples;
  for (const Row& r : potentials.rows) {
    const int z = symbol_to_z(potentials, r, 0);
    const long oxidised = known_state(potentials, r, 1, z);
    const long reduced = known_state(potentials, r, 2, z);
    if (reduced >= oxidised || reduced <= 0) {
      Fail(potentials.path, r.line,
           "reduced must be a positive state below oxidised");
    }
    if (!couples.insert({z, oxidised}).second ||
        !couples.insert({z, -reduced}).second) {
      Fail(potentials.path, r.line,
           "a state may be the oxidised (or the reduced) state of one "
           "couple only");
    }
    const double volts = ParseDecimal(potentials, r, 3, r.fields[3], -4, 4);
    out << "    {" << z << ", " << oxidised << ", " << reduced << ", "
        << Double(volts) << ", " << Literal(r.fields[4]) << "},\n";
  }
  out << "};\n\n";

  // --- orbital_ranges.tsv --------------------------------------------------
  const Table orbital =
      ReadTable(args.at("orbital"), {"d_electrons", "geometry", "spin_state",
                                     "moment_low", "moment_high", "source"});
  out << "constexpr OrbitalRangeRow kOrbital[] = {\n";
  std::set<std::tuple<long, std::string, std::string>> orbital_keys;
  for (const Row& r : orbital.rows) {
    const long d = ParseInt(orbital, r, 0, 0, 10);
    const std::string& geometry = r.fields[1];
    if (geometry != "octahedral" && geometry != "tetrahedral" &&
        geometry != "square_planar" && geometry != "trigonal_prismatic") {
      Fail(orbital.path, r.line,
           "column 'geometry': expected octahedral, tetrahedral, "
           "square_planar or trigonal_prismatic");
    }
    const std::string& spin = r.fields[2];
    if (spin != "high" && spin != "low") {
      Fail(orbital.path, r.line, "column 'spin_state': expected high or low");
    }
    if (!orbital_keys.insert({d, geometry, spin}).second) {
      Fail(orbital.path, r.line, "duplicate row");
    }
    const double low = ParseDecimal(orbital, r, 3, r.fields[3], 0, 8);
    const double high = ParseDecimal(orbital, r, 4, r.fields[4], 0, 8);
    if (low > high) {
      Fail(orbital.path, r.line, "moment_low must not exceed moment_high");
    }
    out << "    {" << d << ", " << Literal(geometry) << ", "
        << (spin == "low" ? "true" : "false") << ", " << Double(low) << ", "
        << Double(high) << ", " << Literal(r.fields[5]) << "},\n";
  }
  out << "};\n\n";

  // --- multiplet_intervals.tsv ----------------------------------------------
  // Lanthanide ions with an open 4f shell of L > 0: the Landé interval rule
  // needs more than one J level.
  const Table intervals =
      ReadTable(args.at("intervals"),
                {"symbol", "charge", "first_interval_cm1", "source"});
  out << "constexpr MultipletIntervalRow kIntervals[] = {\n";
  std::set<std::pair<int, long>> interval_ions;
  for (const Row& r : intervals.rows) {
    const int z = symbol_to_z(intervals, r, 0);
    const long charge = ParseInt(intervals, r, 1, 1, 4);
    const long f_electrons = z - 54 - charge;
    if (z < 57 || z > 71 || f_electrons < 1 || f_electrons > 13 ||
        f_electrons == 7) {
      Fail(intervals.path, r.line,
           absl::StrCat(r.fields[0], " ", charge,
                        " is not a lanthanide ion with an open 4f shell of "
                        "L > 0 (4f1-4f6 or 4f8-4f13)"));
    }
    if (!interval_ions.insert({z, charge}).second) {
      Fail(intervals.path, r.line, "duplicate ion");
    }
    const double interval =
        ParseDecimal(intervals, r, 2, r.fields[2], 50, 20000);
    out << "    {" << z << ", " << charge << ", " << Double(interval) << ", "
        << Literal(r.fields[3]) << "},\n";
  }
  out << "};\n\n";

  // --- actinide_moments.tsv -------------------------------------------------
  const Table actinides =
      ReadTable(args.at("actinides"),
                {"symbol", "charge", "anion", "compound", "moment_low",
                 "moment_high", "tip_only", "source"});
  out << "constexpr ActinideMomentRow kActinides[] = {\n";
  std::set<std::tuple<int, long, int>> actinide_keys;
  for (const Row& r : actinides.rows) {
    const int z = symbol_to_z(actinides, r, 0);
    if (z < 89 || z > 103) {
      Fail(actinides.path, r.line, r.fields[0] + " is not an actinide");
    }
    const long charge = ParseInt(actinides, r, 1, 2, 7);
    const int anion = r.fields[2] == "-" ? 0 : symbol_to_z(actinides, r, 2);
    if (!actinide_keys.insert({z, charge, anion}).second) {
      Fail(actinides.path, r.line, "duplicate row for this ion and anion");
    }
    const double low = ParseDecimal(actinides, r, 4, r.fields[4], 0, 12);
    const double high = ParseDecimal(actinides, r, 5, r.fields[5], 0, 12);
    if (low > high) {
      Fail(actinides.path, r.line, "moment_low is above moment_high");
    }
    if (r.fields[6] != "yes" && r.fields[6] != "no") {
      Fail(actinides.path, r.line, "column 'tip_only': expected yes or no");
    }
    const bool tip_only = r.fields[6] == "yes";
    if (tip_only && high != 0) {
      Fail(actinides.path, r.line,
           "a tip_only row has no Curie moment: moments must be 0");
    }
    out << "    {" << z << ", " << charge << ", " << anion << ", "
        << Literal(r.fields[3]) << ", " << Double(low) << ", " << Double(high)
        << ", " << (tip_only ? "true" : "false") << ", " << Literal(r.fields[7])
        << "},\n";
  }
  out << "};\n\n";

  // --- spin_orbit_constants.tsv ---------------------------------------------
  // 4d and 5d ions whose low-spin octahedral configuration is t2g^1..t2g^5.
  const Table spin_orbit = ReadTable(
      args.at("spin_orbit"), {"symbol", "charge", "zeta_cm1", "source"});
  out << "constexpr SpinOrbitConstantRow kSpinOrbit[] = {\n";
  std::set<std::pair<int, long>> spin_orbit_ions;
  for (const Row& r : spin_orbit.rows) {
    const int z = symbol_to_z(spin_orbit, r, 0);
    const long charge = ParseInt(spin_orbit, r, 1, 1, 8);
    const bool is_4d = z >= 39 && z <= 48;
    const bool is_5d = z >= 72 && z <= 80;
    const long d_electrons = (is_4d ? z - 36 : z - 68) - charge;
    if ((!is_4d && !is_5d) || d_electrons < 1 || d_electrons > 5) {
      Fail(spin_orbit.path, r.line,
           absl::StrCat(r.fields[0], " ", charge,
                        " is not a 4d or 5d ion with 1 to 5 d electrons"));
    }
    if (!spin_orbit_ions.insert({z, charge}).second) {
      Fail(spin_orbit.path, r.line, "duplicate ion");
    }
    const double zeta = ParseDecimal(spin_orbit, r, 2, r.fields[2], 100, 10000);
    out << "    {" << z << ", " << charge << ", " << Double(zeta) << ", "
        << Literal(r.fields[3]) << "},\n";
  }
  out << "};\n\n";

  out << "}  // namespace\n\n"
         "absl::Span<const ElementRow> ElementRows() { return kElements; }\n"
         "absl::Span<const ConfigurationExceptionRow> "
         "ConfigurationExceptionRows() {\n  return kExceptions;\n}\n"
         "absl::Span<const GroundLevelDepartureRow> "
         "GroundLevelDepartureRows() {\n  return kDepartures;\n}\n"
         "absl::Span<const MeasuredMomentRow> MeasuredMomentRows() {\n"
         "  return kMoments;\n}\n"
         "absl::Span<const OxidationStateRow> OxidationStateRows() {\n"
         "  return kOxidation;\n}\n"
         "absl::Span<const UnitAtomRow> UnitAtomRows() { return kUnitAtoms; }\n"
         "absl::Span<const UnitRow> UnitRows() { return kUnits; }\n"
         "absl::Span<const LigandAbbreviationRow> LigandAbbreviationRows() {\n"
         "  return kLigandAbbreviations;\n}\n"
         "absl::Span<const LigandRow> LigandRows() { return kLigands; }\n"
         "absl::Span<const SpinCrossoverRow> SpinCrossoverRows() {\n"
         "  return kCrossover;\n}\n"
         "absl::Span<const ChalcogenideStateRow> ChalcogenideStateRows() {\n"
         "  return kChalcogenide;\n}\n"
         "absl::Span<const BoundOnlyStateRow> BoundOnlyStateRows() {\n"
         "  return kBoundOnly;\n}\n"
         "absl::Span<const StatePreferenceRow> StatePreferenceRows() {\n"
         "  return kPreferences;\n}\n"
         "absl::Span<const MixedValencePairRow> MixedValencePairRows() {\n"
         "  return kPairs;\n}\n"
         "absl::Span<const StateElectronegativityRow> "
         "StateElectronegativityRows() {\n  return kStateEn;\n}\n"
         "absl::Span<const ReductionPotentialRow> ReductionPotentialRows() {\n"
         "  return kPotentials;\n}\n"
         "absl::Span<const OrbitalRangeRow> OrbitalRangeRows() {\n"
         "  return kOrbital;\n}\n"
         "absl::Span<const MultipletIntervalRow> MultipletIntervalRows() {\n"
         "  return kIntervals;\n}\n"
         "absl::Span<const ActinideMomentRow> ActinideMomentRows() {\n"
         "  return kActinides;\n}\n"
         "absl::Span<const SpinOrbitConstantRow> SpinOrbitConstantRows() {\n"
         "  return kSpinOrbit;\n}\n"
         "absl::Span<const SitePreferenceRow> SitePreferenceRows() {\n"
         "  return kSitePreferences;\n}\n\n"
         "}  // namespace shellwright::internal\n";

  // Write only when changed, so that an unchanged table does not trigger a
  // rebuild of everything that depends on it.
  const std::string& out_path = args.at("out");
  const std::string generated = out.str();
  {
    std::ifstream existing(out_path);
    std::stringstream buf;
    buf << existing.rdbuf();
    if (existing && buf.str() == generated) return 0;
  }
  std::ofstream file(out_path, std::ios::trunc);
  file << generated;
  if (!file) {
    std::cerr << "compile_tables: cannot write " << out_path << "\n";
    return 1;
  }
  return 0;
}
