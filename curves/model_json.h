// Private to curves/: reading and writing the numbers of the credit-model and scenario JSON files
// -- percents read exactly as the assumptions file reads them, percents written so that they read
// back to the same double, range checks that name the key, and the files' layout.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <string_view>
#include <unordered_map>

#include "curves/curve_forms.h"
#include "curves/curves.h"

namespace poolbid::detail {

// Each number with a fraction or an exponent as the file writes it, by its path
// ("ltv_default.upper[2]" -> "110.5"): percents read from these digits, not from the double.
using NumberTexts = std::unordered_map<std::string, std::string>;

// A file's JSON object, keys in the file's order, and its numbers' texts.
struct ModelDocument {
  nlohmann::ordered_json root;
  NumberTexts numbers;
};
// Refuses what the other curves/ readers refuse (text that is not JSON, a key given twice, a
// document that is not an object: "holds an array; <must_hold>"), naming `source_name`.
ModelDocument parse_model_document(std::string_view json_text, std::string_view source_name,
                                   std::string_view must_hold);
// The whole file at `path` ("cannot open the <what> (...)"), errors naming the path.
std::string read_model_file(const std::string& path, std::string_view what);

// Throws the AssumptionError for `value` at `place` (the value shown as the user wrote it).
[[noreturn]] void model_fail(Place place, const nlohmann::ordered_json& value,
                             std::string_view message);

// A number from `low` to `high` as given; `form` completes "must be ..." ("a multiplier such
// as 1.5").
double number_in(const nlohmann::ordered_json& value, Place place, double low, double high,
                 std::string_view form);
// A percent from `low` to `high` (percent units) as a decimal, read in one rounding from the
// digits the file writes at `place.key` (6.5 -> 0.065 exactly as "0.065" reads), so that any
// decimal has a percent that reads back to it exactly (percent_number writes it).
double percent_in(const NumberTexts& numbers, const nlohmann::ordered_json& value, Place place,
                  double low, double high, std::string_view form);
// A whole number from `low` to `high` (6.0 is accepted as 6).
int whole_in(const nlohmann::ordered_json& value, Place place, int low, int high,
             std::string_view form);
// `value` must be an object, or model_fail with "must be an object such as <example>".
void require_object(const nlohmann::ordered_json& value, Place place, std::string_view example);

// A CPR (prepay) or CDR (default) curve: a text form ("sda:60", "cpr:0..6/30@age") or an object
// of monthly percents as the assumptions file takes it ({"cdr": [0.5, 1]}, {"sda": 60},
// optional "clock").
SpeedCurve speed_curve_at(const NumberTexts& numbers, CurveKind kind,
                          const nlohmann::ordered_json& value, Place place);
// The curve's canonical text form (prepay_text / default_text), which reads back equal.
std::string speed_curve_text(CurveKind kind, const SpeedCurve& curve);

// The JSON number to write for `decimal` as a percent: the shortest digits that percent_in reads
// back as exactly `decimal` (7 for 0.07, 110 for 1.1, 33.33333333333333 for 1/3). Digits that
// are not the double's own shortest form travel as a raw number (see laid_out).
nlohmann::ordered_json percent_number(double decimal);
// A plain number that reads back exactly (integers without ".0").
nlohmann::ordered_json plain_number(double value);

// The document laid out for people: objects one key per line, except an object or array that
// holds no object and fits on one line, which stays on one line. A binary value is a raw number
// from percent_number: its bytes are written as they are.
std::string laid_out(const nlohmann::ordered_json& document);

}  // namespace poolbid::detail
