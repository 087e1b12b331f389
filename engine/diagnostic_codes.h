// The stable codes of report diagnostics, in one place. Reports carry them
// (RecordReport.diagnostics[].code), `check` counts them in its summary,
// and users filter on them, so a code never changes once released: add a
// new one here instead.
//
// Each code always comes with the same severity, the one of its group
// below. A record is valid exactly when none of its diagnostics is an
// error.
//
// Example:
//
//   for (const shellwright::Diagnostic& d : report.diagnostics) {
//     if (d.code == shellwright::codes::kChargeNotBalanced) ...
//   }
//
// Thread safety: constants.

#ifndef SHELLWRIGHT_ENGINE_DIAGNOSTIC_CODES_H_
#define SHELLWRIGHT_ENGINE_DIAGNOSTIC_CODES_H_

namespace shellwright::codes {

// Errors: the record is invalid.
//
// The formula (engine/formula.h).
inline constexpr char kEmptyFormula[] = "empty_formula";
inline constexpr char kFormulaTooLong[] = "formula_too_long";
inline constexpr char kMalformedFormula[] = "malformed_formula";
inline constexpr char kUnknownElement[] = "unknown_element";
inline constexpr char kNestingTooDeep[] = "nesting_too_deep";
inline constexpr char kCountTooLarge[] = "count_too_large";
// A count uses x, y or z and the record gives no value for it.
inline constexpr char kVariableWithoutValue[] = "variable_without_value";
// A record's variables field that cannot be read.
inline constexpr char kMalformedVariables[] = "malformed_variables";
// The formula's charge suffix ("NH4+") and the record's charge differ.
inline constexpr char kChargeContradictsFormula[] =
    "charge_contradicts_formula";
// The record (engine/composition.h). kMalformedRecord also answers a line
// that the clients' readers cannot read as a record.
inline constexpr char kIdTooLong[] = "id_too_long";
inline constexpr char kMalformedRecord[] = "malformed_record";
inline constexpr char kMalformedDeclaredStates[] = "malformed_declared_states";
inline constexpr char kMalformedElementSettings[] =
    "malformed_element_settings";
// Charge balance and the measured moment.
inline constexpr char kChargeNotBalanced[] = "charge_not_balanced";
inline constexpr char kDeclaredStateContradictsBalance[] =
    "declared_state_contradicts_balance";
inline constexpr char kMomentOutOfRange[] = "moment_out_of_range";
// The record needs more search than the per-record work budget allows
// (engine/oxidation.h).
inline constexpr char kSearchBudgetExceeded[] = "search_budget_exceeded";

// Warnings: valid, but worth a look.
inline constexpr char kPossibleHydrateTypo[] = "possible_hydrate_typo";
inline constexpr char kUncommonOxidationState[] = "uncommon_oxidation_state";
inline constexpr char kDeclaredStateUnknown[] = "declared_state_unknown";
inline constexpr char kIonNotDescribed[] = "ion_not_described";
// The clients' record readers (clients/cli/record_io.h): a JSONL key or a
// CSV column that no record field has, which is ignored.
inline constexpr char kUnknownField[] = "unknown_field";
// `check`: a record whose id an earlier record of the same input has
// (counted in the summary and named on stderr, not in either report).
inline constexpr char kDuplicateId[] = "duplicate_id";
// The record's structure_family does not fit the composition (engine/
// sites.h says why); no ions are placed on sites.
inline constexpr char kStructureFamilyNotMatched[] =
    "structure_family_not_matched";

// Info.
inline constexpr char kMixedValence[] = "mixed_valence";
inline constexpr char kMetallicComposition[] = "metallic_composition";
inline constexpr char kElementalComposition[] = "elemental_composition";
inline constexpr char kIntermetallicComposition[] = "intermetallic_composition";
inline constexpr char kZintlComposition[] = "zintl_composition";
inline constexpr char kMomentCheckSkipped[] = "moment_check_skipped";
// The search stopped early: the answer stands, but a mixed-valence split
// or further alternatives may have been left out.
inline constexpr char kMixedValenceSearchLimited[] =
    "mixed_valence_search_limited";
inline constexpr char kAlternativesLimited[] = "alternatives_limited";
// Formula notations (engine/formula.h): δ or d taken as 0, and a part
// "·nH2O" of unknown hydration left out.
inline constexpr char kNonstoichiometryAssumed[] = "nonstoichiometry_assumed";
inline constexpr char kUnknownHydration[] = "unknown_hydration";
// A leading geometric-isomer prefix ("cis-", "trans-", "fac-", "mer-")
// was read and set aside: it names an arrangement, not a composition.
inline constexpr char kIsomerPrefix[] = "isomer_prefix";
// A leading polymorph prefix ("γ-", "gamma-") was read and set aside.
inline constexpr char kPolymorphPrefix[] = "polymorph_prefix";
// A mineral site mixture "(Fe,Ni)9S8" was read as an equal split of the
// site among its members.
inline constexpr char kSiteMixtureEqualSplit[] = "site_mixture_equal_split";

}  // namespace shellwright::codes

#endif  // SHELLWRIGHT_ENGINE_DIAGNOSTIC_CODES_H_
