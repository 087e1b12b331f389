// The caution that every client shows with moment and spin-state figures.
//
// Moments and spin states are idealised estimates; the product defers to
// measurement. Human-readable output (the CLI's atom, compound and check
// reports, and any other client built on api/) states it in these words.
//
// Example:
//
//   std::cout << report_text << "\n" << shellwright::kMomentCaution << "\n";
//
// Thread safety: a constant.

#ifndef SHELLWRIGHT_API_CAUTION_H_
#define SHELLWRIGHT_API_CAUTION_H_

namespace shellwright {

inline constexpr char kMomentCaution[] =
    "Caution: moments and spin states are idealised estimates from the "
    "composition alone (free-ion, crystal-field, sublattice and metallic "
    "models); verify them against measurement before relying on them.";

}  // namespace shellwright

#endif  // SHELLWRIGHT_API_CAUTION_H_
