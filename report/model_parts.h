// Private to report/: the model pieces the cash-flow, price and shock reports share -- the model
// line and section, the "model" JSON object, one loan's explanation -- defined in
// report/explain_report.cpp.
#pragma once

#include <string>
#include <string_view>

#include "report/format.h"
#include "report/report.h"

namespace poolbid {
struct Assumptions;
struct CreditModel;
}  // namespace poolbid

namespace poolbid::detail {

// The text section that replaces the pool-wide assumptions with a model: the model line, the
// scenario's description, the tables and scenario set, what the assumptions still give
// (advancing).
std::string model_section(const ModelNote& note, const Assumptions& assumptions);
// A blank line and the loan's explanation (explain_text), or "" without one.
std::string explanation_section(const ModelNote& note);
// {"tables", "scenarios", "scenario" (as a scenarios file writes it), "explanation" (or null)}.
Json model_json(const ModelNote& note);
// {"advancing"}: all an assumptions file gives a model run.
Json model_assumptions_json(const Assumptions& assumptions);
Json explanation_json(const LoanExplanation& explanation);
// `document` with `key` set to `value` right after `after` (at the end if `after` is absent).
Json insert_after(const Json& document, std::string_view after, std::string_view key, Json value);
// "built-in" when `model` has the built-in tables, "custom" otherwise (reports without a note).
std::string tables_name(const CreditModel& model);

}  // namespace poolbid::detail
