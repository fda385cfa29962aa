// The JSON assumptions file: prepay, default, severity (text forms, a severity percent, or objects
// with explicit monthly percents), lag_months, advancing, delinquent_default; over a base. A key
// given twice in one object is an error, not a silent override.
#include <cmath>
#include <string>

#include <fmt/core.h>
#include <nlohmann/json.hpp>

#include "curves/curve_forms.h"
#include "curves/json_duplicates.h"

namespace poolbid {
namespace {

using detail::CurveKind;
using detail::Place;
using detail::shown;
using nlohmann::json;

constexpr std::string_view kKeys =
    "prepay, default, severity, lag_months, advancing, delinquent_default";

[[noreturn]] void fail(Place place, const json& value, std::string_view message) {
  throw detail::assumption_error(place, shown(value), message);
}

// What a curve key accepts, for type errors.
std::string_view curve_types(CurveKind kind) {
  switch (kind) {
    case CurveKind::prepay:
      return R"(must be text such as "psa:150" or "cpr:8", or an object such as )"
             R"({"cpr": [4, 6, 8]} or {"psa": 150})";
    case CurveKind::default_rate:
      return R"(must be text such as "sda:200" or "cdr:1.5", or an object such as )"
             R"({"cdr": [0.5, 1, 1.5]} or {"sda": 200})";
    case CurveKind::severity:
      break;
  }
  return R"(must be a percent such as 45, text such as "45,40,35", or an object such as )"
         R"({"severity": [45, 40, 35]})";
}

// {"cpr": 8 | [4, 5, 6]} or {"psa": 150}, with an optional "clock"; values in percent.
SpeedCurve curve_from_object(CurveKind kind, const json& object, Place place) {
  const detail::KindInfo& info = detail::kind_info(kind);
  const std::string_view rate_key = kind == CurveKind::severity ? "severity" : info.rate_prefix;
  const std::string one_of = info.standard_prefix.empty()
                                 ? std::string(rate_key)
                                 : fmt::format("{} or {}", rate_key, info.standard_prefix);
  SpeedCurve curve;
  bool has_rate = false, has_standard = false, has_clock = false;
  for (const auto& [name, value] : object.items()) {
    const std::string key = fmt::format("{}.{}", place.key, name);
    const Place at{place.source, key};
    if (name == "clock") {
      has_clock = true;
      if (value == "loan_age")
        curve.clock = CurveClock::loan_age;
      else if (value == "projection_month")
        curve.clock = CurveClock::projection_month;
      else
        fail(at, value, R"(must be "loan_age" or "projection_month")");
    } else if (name == rate_key) {
      has_rate = true;
      const auto percent = [&](const json& v, const Place& where) {
        if (!v.is_number()) fail(where, v, "must be a number (percent)");
        return detail::checked_percent(kind, {v.get<double>(), v.dump()}, where, shown(v));
      };
      if (value.is_number()) {
        curve.value = percent(value, at);
      } else if (value.is_array() && !value.empty()) {
        curve.shape = CurveShape::vector;
        for (std::size_t i = 0; i < value.size(); ++i)
          curve.values.push_back(percent(value[i], {place.source, fmt::format("{}[{}]", key, i)}));
      } else {
        fail(at, value, "must be a percent or a non-empty array of percents by month");
      }
    } else if (!info.standard_prefix.empty() && name == info.standard_prefix) {
      has_standard = true;
      if (!value.is_number())
        fail(at, value, "must be a number: the multiple in percent, 100 = standard");
      curve.shape = kind == CurveKind::prepay ? CurveShape::psa : CurveShape::sda;
      curve.value =
          detail::checked_multiple(kind, {value.get<double>(), value.dump()}, at, shown(value));
    } else {
      fail(at, value, fmt::format("unknown key; a curve object takes {} and clock", one_of));
    }
  }
  if (has_rate == has_standard)
    fail(place, object,
         fmt::format("{} {}", has_rate ? "give one, not both, of" : "needs", one_of));
  if (!has_clock) curve.clock = detail::default_clock(curve.shape);
  return curve;
}

SpeedCurve curve_from_json(CurveKind kind, const json& value, Place place) {
  if (value.is_string()) return detail::parse_curve(kind, value.get<std::string>(), place);
  if (value.is_object()) return curve_from_object(kind, value, place);
  if (kind == CurveKind::severity && value.is_number()) {
    SpeedCurve curve;
    curve.value =
        detail::checked_percent(kind, {value.get<double>(), value.dump()}, place, shown(value));
    return curve;
  }
  fail(place, value, curve_types(kind));
}

int lag_from_json(const json& value, Place place) {
  const double months = value.is_number() ? value.get<double>() : -1.0;
  if (!value.is_number() || months != std::floor(months) || months < 0 ||
      months > detail::kMaxLagMonths)
    fail(place, value,
         fmt::format("must be a whole number of months from 0 to {}", detail::kMaxLagMonths));
  return static_cast<int>(months);
}

}  // namespace

Assumptions parse_assumptions(std::string_view json_text, std::string_view source_name,
                              const Assumptions& base) {
  const json doc = detail::parse_json_object(
      json_text, R"(it must hold one JSON object such as {"prepay": "psa:150"})",
      [source_name](std::string_view key, std::string_view message) {
        return detail::assumption_error({source_name, key}, "", message);
      });

  Assumptions out = base;
  for (const auto& [key, value] : doc.items()) {
    const Place place{source_name, key};
    if (key == "prepay") {
      out.prepay = curve_from_json(CurveKind::prepay, value, place);
    } else if (key == "default") {
      out.default_rate = curve_from_json(CurveKind::default_rate, value, place);
    } else if (key == "severity") {
      out.severity = curve_from_json(CurveKind::severity, value, place);
    } else if (key == "lag_months") {
      out.lag_months = lag_from_json(value, place);
    } else if (key == "advancing") {
      if (value == "none")
        out.advancing = Advancing::none;
      else if (value == "interest")
        out.advancing = Advancing::interest;
      else
        fail(place, value, R"(must be "none" or "interest")");
    } else if (key == "delinquent_default") {
      if (!value.is_boolean()) fail(place, value, "must be true or false");
      out.delinquent_default = value.get<bool>();
    } else {
      fail(place, value, fmt::format("unknown key; the keys are {}", kKeys));
    }
  }
  return out;
}

Assumptions load_assumptions(const std::string& path, const Assumptions& base) {
  const std::string text = detail::read_text_file(
      path, "assumptions file", [&path](std::string_view key, std::string_view message) {
        return detail::assumption_error({path, key}, "", message);
      });
  return parse_assumptions(text, path, base);
}

}  // namespace poolbid
