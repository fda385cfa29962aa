// Private to report/: the pieces the `compare` and `matrix` reports share -- the run's heading
// (dates, curve, model, scenario, target), pool names, one view's JSON, rejected rows of several
// tapes -- defined in report/compare_report.cpp.
#pragma once

#include <cstddef>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "report/format.h"

namespace poolbid {
struct BidRequest;
struct PoolView;
struct Scenario;
struct YieldCurve;
}  // namespace poolbid

namespace poolbid::detail {

// Lines of free text (verdicts, descriptions) are wrapped to this many columns.
inline constexpr std::size_t kTextWidth = 98;

// "A", "B", ..., "Z", "AA", ...: how the text reports name pool k.
std::string pool_letter(std::size_t k);

// The lines every comparison report starts with after its title: cut-off, settlement, payment
// delay, curve, model, target. `tapes` supply the cut-off check (each tape's, when it has one,
// must be the settlement's).
std::string run_heading(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                        const BidRequest& request, std::string_view model_source);
// "loss-adjusted yield 6.500% BEY" or "loss-adjusted Z-spread 250 bp".
std::string target_text(const BidRequest& request);
// One line on a scenario: house prices, rate shock, multipliers.
std::string scenario_text(const Scenario& scenario);

Json run_json_head(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                   const BidRequest& request, std::string_view model_source);
Json scenario_json(const Scenario& scenario);
Json target_json(const BidRequest& request);
// {"cash_flow_yield", "bey", "z_spread", "par_yield_at_wal", "spread_at_wal", "wal_years",
//  "modified_duration"}; null where NaN.
Json view_json(const PoolView& view);
// {"name", "file", "loans", "cutoff_balance", "rows_read", "rows_rejected", "upb_rejected"}.
Json tape_json(const TapeRead& tape, std::string_view name);

// The rejected rows of every tape that has any (each under its pool's letter and file), a line
// for accepted rows with warnings, then the caution.
std::string rejects_and_caution_of(std::span<const TapeRead* const> tapes,
                                   std::span<const std::string> names, std::string_view done);

// `text` (already safe for a terminal) broken at spaces into lines of at most `width` columns (a
// word longer than that gets a line of its own).
std::vector<std::string> wrapped(std::string_view text, std::size_t width);
// The same as one string: each line but the first starts with `indent`, every line ends in "\n".
std::string wrapped_text(std::string_view text, std::size_t width, std::string_view indent = "");

// Percent of a decimal (0.065 -> "6.500"), basis points of a decimal (0.0125 -> "125.0"); "-"
// when not finite.
std::string percent_text(double rate, int decimals = 3);
std::string bp_text(double spread);

}  // namespace poolbid::detail
