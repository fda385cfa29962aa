// The loan-level credit and prepayment model's tables: band and category lookups, the illustrative
// defaults (sources in the README, "Loan-level model"), and the JSON model file read and written.
#include <fmt/core.h>
#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <nlohmann/json.hpp>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "curves/curve_forms.h"
#include "curves/model_json.h"

namespace poolbid {
namespace {

using detail::CurveKind;
using detail::model_fail;
using detail::Place;
using nlohmann::ordered_json;

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kMaxMultiplier = 1000;
constexpr int kMaxTimelineMonths = 120;
constexpr int kMaxRollMonths = 120;

constexpr std::string_view kKeys =
    "base_default, score_default, ltv_default, dti_default, documentation_default, "
    "occupancy_default, purpose_default, property_default, delinquency_roll, cured_multiplier, "
    "assumed_ltv, distressed_discount, sale_cost, carrying_cost, foreclosure_cost, "
    "timeline_months, default_timeline_months, turnover, refi_max_cpr, refi_midpoint, refi_width, "
    "burnout, score_refi, ltv_refi, ltv_turnover, delinquent_refi, description";

// The categories each table takes: the tape's spellings (tape/tape.h to_string, without
// "unknown", which reads `missing`). tests/curves/credit_model_test.cpp checks them against tape/.
const std::vector<std::string_view> kDocumentation{"full", "limited", "none"};
const std::vector<std::string_view> kOccupancy{"owner", "second_home", "investor"};
const std::vector<std::string_view> kPurpose{"purchase", "rate_term_refi", "cash_out_refi"};
const std::vector<std::string_view> kPropertyType{"single_family", "condo",        "pud",
                                                  "two_to_four",   "manufactured", "coop"};
const std::vector<std::string_view> kDelinquency{"30", "60", "90+", "foreclosure"};

// What a band table's bounds are: score points, or a percent of value or income (LTV, DTI).
enum class Bounds { points, percent };

// ---- Reading ------------------------------------------------------------------------------------

std::string joined(const std::vector<std::string_view>& names) {
  return fmt::format("{}", fmt::join(names, ", "));
}

double multiplier_at(const ordered_json& value, Place place) {
  return detail::number_in(value, place, 0, kMaxMultiplier, "a multiplier");
}

BandTable band_at(const detail::ModelDocument& file, const ordered_json& object,
                  std::string_view source, const std::string& key, Bounds bounds) {
  const std::string_view example =
      bounds == Bounds::points
          ? R"({"upper": [620, 660, 700], "multiplier": [3.0, 2.0, 1.3, 1.0], "missing": 1.8})"
          : R"({"upper": [80, 90], "multiplier": [1.0, 1.4, 2.0], "missing": 1.5} (bounds in )"
            R"(percent))";
  detail::require_object(object, {source, key}, example);
  BandTable table;
  bool has_upper = false, has_multiplier = false, has_missing = false;
  for (const auto& [name, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, name);
    if (name == "upper") {
      has_upper = true;
      if (!value.is_array())
        model_fail({source, at}, value, "must be an array of bounds in ascending order");
      for (std::size_t i = 0; i < value.size(); ++i) {
        const std::string element = fmt::format("{}[{}]", at, i);
        const Place place{source, element};
        const double bound =
            bounds == Bounds::points
                ? detail::number_in(value[i], place, 0, 1000, "a bound in score points")
                : detail::percent_in(file.numbers, value[i], place, 1, 1000,
                                     "a bound in percent (80 = 80%)");
        if (!table.upper.empty() && !(bound > table.upper.back()))
          model_fail(place, value[i],
                     fmt::format("must be above the bound before it ({}); bounds are strictly "
                                 "ascending",
                                 value[i - 1].dump()));
        table.upper.push_back(bound);
      }
    } else if (name == "multiplier") {
      has_multiplier = true;
      if (!value.is_array() || value.empty())
        model_fail({source, at}, value, "must be a non-empty array of multipliers");
      for (std::size_t i = 0; i < value.size(); ++i) {
        const std::string element = fmt::format("{}[{}]", at, i);
        table.multiplier.push_back(multiplier_at(value[i], {source, element}));
      }
    } else if (name == "missing") {
      has_missing = true;
      table.missing = multiplier_at(value, {source, at});
    } else {
      model_fail({source, at}, value,
                 "unknown key; a band table takes upper, multiplier and missing");
    }
  }
  if (!has_upper || !has_multiplier || !has_missing)
    model_fail({source, key}, object,
               fmt::format("lacks {}; a band table needs upper, multiplier and missing, such as {}",
                           !has_upper        ? "upper"
                           : !has_multiplier ? "multiplier"
                                             : "missing",
                           example));
  if (table.multiplier.size() != table.upper.size() + 1)
    model_fail({source, key + ".multiplier"}, object["multiplier"],
               fmt::format("has {} multipliers; {} bounds need {} (below the first bound, between "
                           "each two, at or above the last)",
                           table.multiplier.size(), table.upper.size(), table.upper.size() + 1));
  return table;
}

CategoryTable category_at(const ordered_json& object, std::string_view source,
                          const std::string& key, const std::vector<std::string_view>& names) {
  const std::string example = fmt::format(R"({{"{}": 1.0, ..., "missing": 1.5}})", names.front());
  detail::require_object(object, {source, key}, example);
  CategoryTable table;
  bool has_missing = false;
  for (const auto& [name, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, name);
    if (name == "missing") {
      has_missing = true;
      table.missing = multiplier_at(value, {source, at});
    } else if (std::find(names.begin(), names.end(), name) != names.end()) {
      table.multiplier.emplace_back(name, multiplier_at(value, {source, at}));
    } else {
      model_fail({source, at}, value,
                 fmt::format("unknown key; {} takes {} and missing (the tape's spellings)", key,
                             joined(names)));
    }
  }
  if (!has_missing)
    model_fail({source, key}, object,
               fmt::format("lacks missing: the multiplier of a loan whose {} is not on the tape",
                           key.substr(0, key.find('_'))));
  return table;
}

std::vector<std::pair<std::string, DelinquencyRoll>> rolls_at(const detail::ModelDocument& file,
                                                              const ordered_json& object,
                                                              std::string_view source,
                                                              const std::string& key) {
  constexpr std::string_view kExample = R"({"60": {"default_share": 40, "months": 4}})";
  detail::require_object(object, {source, key}, kExample);
  std::vector<std::pair<std::string, DelinquencyRoll>> rolls;
  for (const auto& [status, entry] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, status);
    if (std::find(kDelinquency.begin(), kDelinquency.end(), status) == kDelinquency.end())
      model_fail({source, at}, entry,
                 fmt::format("unknown key; {} takes {} (the tape's delinquency spellings)", key,
                             joined(kDelinquency)));
    detail::require_object(entry, {source, at}, R"({"default_share": 40, "months": 4})");
    DelinquencyRoll roll;
    bool has_share = false, has_months = false;
    for (const auto& [name, value] : entry.items()) {
      const std::string field = fmt::format("{}.{}", at, name);
      if (name == "default_share") {
        has_share = true;
        roll.default_share = detail::percent_in(file.numbers, value, {source, field}, 0, 100,
                                                "a percent of the balance (40 = 40%)");
      } else if (name == "months") {
        has_months = true;
        roll.months = detail::whole_in(value, {source, field}, 1, kMaxRollMonths, "months");
      } else {
        model_fail({source, field}, value, "unknown key; a roll takes default_share and months");
      }
    }
    if (!has_share || !has_months)
      model_fail({source, at}, entry,
                 fmt::format("lacks {}; a roll needs default_share (percent) and months",
                             has_share ? "months" : "default_share"));
    rolls.emplace_back(status, roll);
  }
  return rolls;
}

bool postal_code(std::string_view code) {
  return code.size() == 2 && code[0] >= 'A' && code[0] <= 'Z' && code[1] >= 'A' && code[1] <= 'Z';
}

std::vector<std::pair<std::string, int>> timelines_at(const ordered_json& object,
                                                      std::string_view source,
                                                      const std::string& key) {
  detail::require_object(object, {source, key}, R"({"FL": 27, "GA": 11})");
  std::vector<std::pair<std::string, int>> timelines;
  for (const auto& [state, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, state);
    if (!postal_code(state))
      model_fail({source, at}, ordered_json(state),
                 "is not a state postal code (two capital letters, such as FL)");
    timelines.emplace_back(state, detail::whole_in(value, {source, at}, 0, kMaxTimelineMonths,
                                                   "months from default to liquidation"));
  }
  return timelines;
}

// ---- Writing ------------------------------------------------------------------------------------

ordered_json band_json(const BandTable& table, Bounds bounds) {
  ordered_json upper = ordered_json::array(), multiplier = ordered_json::array();
  for (const double bound : table.upper)
    upper.push_back(bounds == Bounds::percent ? detail::percent_number(bound)
                                              : detail::plain_number(bound));
  for (const double m : table.multiplier) multiplier.push_back(detail::plain_number(m));
  ordered_json out;
  out["upper"] = std::move(upper);
  out["multiplier"] = std::move(multiplier);
  out["missing"] = detail::plain_number(table.missing);
  return out;
}

ordered_json category_json(const CategoryTable& table) {
  ordered_json out = ordered_json::object();
  for (const auto& [name, m] : table.multiplier) out[name] = detail::plain_number(m);
  out["missing"] = detail::plain_number(table.missing);
  return out;
}

// A label bound: `bound` x `scale`, without float noise (0.07 x 100 shows as 7).
std::string bound_text(double bound, double scale) { return fmt::format("{:.10g}", bound * scale); }

}  // namespace

// ---- Lookups ------------------------------------------------------------------------------------

std::size_t band_index(const BandTable& table, double value) {
  if (std::isnan(value)) return table.upper.size() + 1;
  // The first bound above `value`: a value exactly at a bound reads the band above it.
  return static_cast<std::size_t>(std::upper_bound(table.upper.begin(), table.upper.end(), value) -
                                  table.upper.begin());
}

double band_value(const BandTable& table, double value) {
  const std::size_t band = band_index(table, value);
  return band == table.upper.size() + 1 ? table.missing : table.multiplier.at(band);
}

std::string band_label(const BandTable& table, std::size_t band, double scale) {
  const std::size_t bands = table.upper.size();
  if (band == bands + 1) return "missing";
  if (band > bands)
    throw std::out_of_range(
        fmt::format("band_label: band {} of a table with {} bands", band, bands + 1));
  if (bands == 0) return "all";
  if (band == 0) return "< " + bound_text(table.upper.front(), scale);
  if (band == bands) return ">= " + bound_text(table.upper.back(), scale);
  const double low = table.upper[band - 1] * scale, high = table.upper[band] * scale;
  // Whole-number bounds on the number's own scale (score points): the band's last whole value.
  if (scale == 1.0 && low == std::floor(low) && high == std::floor(high))
    return fmt::format("{:.10g}-{:.10g}", low, high - 1);
  return fmt::format("{}-{}", bound_text(table.upper[band - 1], scale),
                     bound_text(table.upper[band], scale));
}

double category_value(const CategoryTable& table, std::string_view key) {
  for (const auto& [name, multiplier] : table.multiplier)
    if (name == key) return multiplier;
  return table.missing;
}

// ---- Defaults -----------------------------------------------------------------------------------
// Illustrative. The reference borrower (every multiplier 1): score 740-779, LTV 70-80%, DTI 30-36%,
// full documentation, owner-occupied, purchase, single family. Where each number comes from is in
// the README ("Loan-level model"): shapes as commonly practised, magnitudes from memory, the three
// foreclosure timelines DESIGN.md section 8 cites.

CreditModel default_credit_model() {
  CreditModel m;
  m.base_default = standard_curve(CurveShape::sda, 0.6);  // 60 SDA: peaks at 0.36% CDR
  m.score_default = {{580, 620, 660, 700, 740, 780}, {6.0, 4.0, 2.6, 1.7, 1.25, 1.0, 0.7}, 2.0};
  m.ltv_default = {
      {0.6, 0.7, 0.8, 0.9, 1.0, 1.1, 1.25}, {0.45, 0.7, 1.0, 1.4, 2.0, 3.0, 4.2, 5.5}, 1.5};
  m.dti_default = {{0.30, 0.36, 0.43, 0.50}, {0.85, 1.0, 1.2, 1.5, 1.9}, 1.3};
  m.documentation_default = {{{"full", 1.0}, {"limited", 1.6}, {"none", 2.2}}, 1.5};
  m.occupancy_default = {{{"owner", 1.0}, {"second_home", 1.2}, {"investor", 1.6}}, 1.2};
  m.purpose_default = {{{"purchase", 1.0}, {"rate_term_refi", 1.1}, {"cash_out_refi", 1.35}}, 1.15};
  m.property_default = {{{"single_family", 1.0},
                         {"pud", 0.95},
                         {"condo", 1.15},
                         {"two_to_four", 1.35},
                         {"manufactured", 1.8},
                         {"coop", 1.1}},
                        1.1};
  m.delinquency_roll = {
      {"30", {0.20, 6}}, {"60", {0.40, 4}}, {"90+", {0.70, 3}}, {"foreclosure", {0.90, 2}}};
  m.cured_multiplier = 2.0;
  m.assumed_ltv = 0.80;

  m.distressed_discount = 0.30;
  m.sale_cost = 0.07;
  m.carrying_cost = 0.03;
  m.foreclosure_cost = 6000;
  // Months from default to liquidation. GA 11, FL 27, NJ 50: a GSE servicing guide's 2019
  // maximums in days (330, 810, 1,530; DESIGN.md section 8) over 30.44 days a month. The rest
  // from memory: judicial states slower, non-judicial 9-12 months.
  const std::vector<std::pair<std::string, int>> judicial{
      {"FL", 27}, {"NJ", 50}, {"NY", 40}, {"IL", 26}, {"PA", 24}, {"OH", 20}, {"CT", 26},
      {"MA", 20}, {"IN", 18}, {"KY", 18}, {"LA", 18}, {"ME", 24}, {"NE", 14}, {"NM", 20},
      {"ND", 14}, {"OK", 16}, {"SC", 18}, {"SD", 14}, {"VT", 26}, {"WI", 20}, {"HI", 26},
      {"DE", 20}, {"IA", 18}, {"KS", 14}, {"MD", 20}};
  const std::vector<std::pair<std::string, int>> non_judicial{
      {"GA", 11}, {"CA", 12}, {"TX", 9},  {"AZ", 9},  {"CO", 11}, {"NV", 12}, {"WA", 12},
      {"OR", 12}, {"VA", 10}, {"NC", 12}, {"TN", 10}, {"MI", 10}, {"MN", 12}, {"MO", 10},
      {"AL", 9},  {"MS", 10}, {"UT", 11}, {"ID", 12}, {"MT", 12}, {"WY", 10}, {"AK", 12},
      {"AR", 10}, {"NH", 10}, {"RI", 12}, {"WV", 10}, {"DC", 24}};
  m.timeline_months = judicial;
  m.timeline_months.insert(m.timeline_months.end(), non_judicial.begin(), non_judicial.end());
  std::sort(m.timeline_months.begin(), m.timeline_months.end());  // written in this order
  m.default_timeline_months = 18;

  m.turnover = ramp_curve(0, 0.06, 30, CurveClock::loan_age);  // 0 to 6% CPR over 30 months
  m.refi_max_cpr = 0.45;
  m.refi_midpoint = 0.0075;
  m.refi_width = 0.0025;
  m.burnout = 0.04;
  m.score_refi = {{620, 680, 740}, {0.4, 0.65, 0.85, 1.0}, 0.7};
  m.ltv_refi = {{0.8, 0.9, 1.0, 1.1}, {1.0, 0.85, 0.5, 0.08, 0.03}, 0.8};
  m.ltv_turnover = {{1.0, 1.1}, {1.0, 0.7, 0.5}, 1.0};
  m.delinquent_refi = 0.1;
  return m;
}

// ---- The model file -----------------------------------------------------------------------------

CreditModel parse_credit_model(std::string_view json_text, std::string_view source_name,
                               const CreditModel& base) {
  const detail::ModelDocument file = detail::parse_model_document(
      json_text, source_name,
      R"(it must hold one JSON object such as {"score_default": {"upper": [620, 700], )"
      R"("multiplier": [2.5, 1.4, 1.0], "missing": 1.8}})");
  CreditModel m = base;
  const auto percent = [&file, source_name](const ordered_json& value, const std::string& key,
                                            double low, double high, std::string_view form) {
    return detail::percent_in(file.numbers, value, {source_name, key}, low, high, form);
  };
  for (const auto& [key, value] : file.root.items()) {
    const Place place{source_name, key};
    if (key == "base_default") {
      m.base_default = detail::speed_curve_at(file.numbers, CurveKind::default_rate, value, place);
    } else if (key == "score_default") {
      m.score_default = band_at(file, value, source_name, key, Bounds::points);
    } else if (key == "ltv_default") {
      m.ltv_default = band_at(file, value, source_name, key, Bounds::percent);
    } else if (key == "dti_default") {
      m.dti_default = band_at(file, value, source_name, key, Bounds::percent);
    } else if (key == "documentation_default") {
      m.documentation_default = category_at(value, source_name, key, kDocumentation);
    } else if (key == "occupancy_default") {
      m.occupancy_default = category_at(value, source_name, key, kOccupancy);
    } else if (key == "purpose_default") {
      m.purpose_default = category_at(value, source_name, key, kPurpose);
    } else if (key == "property_default") {
      m.property_default = category_at(value, source_name, key, kPropertyType);
    } else if (key == "delinquency_roll") {
      m.delinquency_roll = rolls_at(file, value, source_name, key);
    } else if (key == "cured_multiplier") {
      m.cured_multiplier = multiplier_at(value, place);
    } else if (key == "assumed_ltv") {
      m.assumed_ltv = percent(value, key, 1, 200, "an LTV in percent (80 = 80%)");
    } else if (key == "distressed_discount") {
      m.distressed_discount = percent(value, key, 0, 100, "a percent of the market value");
    } else if (key == "sale_cost") {
      m.sale_cost = percent(value, key, 0, 100, "a percent of the sale price");
    } else if (key == "carrying_cost") {
      m.carrying_cost = percent(value, key, 0, 100, "a percent of the property value a year");
    } else if (key == "foreclosure_cost") {
      m.foreclosure_cost = detail::number_in(value, place, 0, 1e7, "dollars per loan");
    } else if (key == "timeline_months") {
      m.timeline_months = timelines_at(value, source_name, key);
    } else if (key == "default_timeline_months") {
      m.default_timeline_months = detail::whole_in(value, place, 0, kMaxTimelineMonths,
                                                   "months from default to liquidation");
    } else if (key == "turnover") {
      m.turnover = detail::speed_curve_at(file.numbers, CurveKind::prepay, value, place);
    } else if (key == "refi_max_cpr") {
      m.refi_max_cpr = percent(value, key, 0, 100, "a CPR in annual percent");
    } else if (key == "refi_midpoint") {
      m.refi_midpoint = percent(value, key, -20, 20, "an incentive in percent (0.75 = 75 bp)");
    } else if (key == "refi_width") {
      m.refi_width = percent(value, key, 0.01, 20, "an incentive in percent (0.25 = 25 bp)");
    } else if (key == "burnout") {
      m.burnout =
          percent(value, key, 0, 100, "a percent lost a month per percentage point of incentive");
    } else if (key == "score_refi") {
      m.score_refi = band_at(file, value, source_name, key, Bounds::points);
    } else if (key == "ltv_refi") {
      m.ltv_refi = band_at(file, value, source_name, key, Bounds::percent);
    } else if (key == "ltv_turnover") {
      m.ltv_turnover = band_at(file, value, source_name, key, Bounds::percent);
    } else if (key == "delinquent_refi") {
      m.delinquent_refi = multiplier_at(value, place);
    } else if (key == "description") {
      if (!value.is_string()) model_fail(place, value, "must be text");
    } else {
      model_fail(place, value, fmt::format("unknown key; the keys are {}", kKeys));
    }
  }
  return m;
}

CreditModel load_credit_model(const std::string& path, const CreditModel& base) {
  return parse_credit_model(detail::read_model_file(path, "model file"), path, base);
}

std::string credit_model_json(const CreditModel& m) {
  ordered_json doc;
  doc["base_default"] = detail::speed_curve_text(CurveKind::default_rate, m.base_default);
  doc["score_default"] = band_json(m.score_default, Bounds::points);
  doc["ltv_default"] = band_json(m.ltv_default, Bounds::percent);
  doc["dti_default"] = band_json(m.dti_default, Bounds::percent);
  doc["documentation_default"] = category_json(m.documentation_default);
  doc["occupancy_default"] = category_json(m.occupancy_default);
  doc["purpose_default"] = category_json(m.purpose_default);
  doc["property_default"] = category_json(m.property_default);
  ordered_json rolls = ordered_json::object();
  for (const auto& [status, roll] : m.delinquency_roll)
    rolls[status] = {{"default_share", detail::percent_number(roll.default_share)},
                     {"months", roll.months}};
  doc["delinquency_roll"] = std::move(rolls);
  doc["cured_multiplier"] = detail::plain_number(m.cured_multiplier);
  doc["assumed_ltv"] = detail::percent_number(m.assumed_ltv);
  doc["distressed_discount"] = detail::percent_number(m.distressed_discount);
  doc["sale_cost"] = detail::percent_number(m.sale_cost);
  doc["carrying_cost"] = detail::percent_number(m.carrying_cost);
  doc["foreclosure_cost"] = detail::plain_number(m.foreclosure_cost);
  ordered_json timelines = ordered_json::object();
  for (const auto& [state, months] : m.timeline_months) timelines[state] = months;
  doc["timeline_months"] = std::move(timelines);
  doc["default_timeline_months"] = m.default_timeline_months;
  doc["turnover"] = detail::speed_curve_text(CurveKind::prepay, m.turnover);
  doc["refi_max_cpr"] = detail::percent_number(m.refi_max_cpr);
  doc["refi_midpoint"] = detail::percent_number(m.refi_midpoint);
  doc["refi_width"] = detail::percent_number(m.refi_width);
  doc["burnout"] = detail::percent_number(m.burnout);
  doc["score_refi"] = band_json(m.score_refi, Bounds::points);
  doc["ltv_refi"] = band_json(m.ltv_refi, Bounds::percent);
  doc["ltv_turnover"] = band_json(m.ltv_turnover, Bounds::percent);
  doc["delinquent_refi"] = detail::plain_number(m.delinquent_refi);
  return detail::laid_out(doc);
}

}  // namespace poolbid
