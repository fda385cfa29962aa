// Scenarios for the loan-level model: house-price paths by month, the shipped set, the scenario
// file read and written, and finding one by name.
#include <fmt/core.h>
#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <nlohmann/json.hpp>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "curves/curve_forms.h"
#include "curves/model_json.h"

namespace poolbid {
namespace {

using detail::model_fail;
using detail::Place;
using nlohmann::ordered_json;

constexpr double kMaxShockBp = 5000;
constexpr double kMaxMultiplier = 100;
// Annual house-price changes, percent: a year may not take prices to zero.
constexpr double kMinAnnualPercent = -90;
constexpr double kMaxAnnualPercent = 100;
constexpr double kMaxKeyYears = 50;

constexpr std::string_view kScenarioKeys =
    "name, description, house_prices, rate_shock, prepay_multiplier, default_multiplier";
constexpr std::string_view kScenarioExample =
    R"({"name": "base", "house_prices": {"annual": [3]}, "rate_shock": {"parallel_bp": 0}})";

void house_prices_at(const detail::ModelDocument& file, const ordered_json& object,
                     std::string_view source, const std::string& key, Scenario& scenario) {
  detail::require_object(object, {source, key},
                         R"({"annual": [-5, -2, 1, 2]} (percent a year) or {"monthly": [100, )"
                         R"(99.6, 99.1]} (an index by month))");
  for (const auto& [name, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, name);
    const bool annual = name == "annual";
    if (!annual && name != "monthly")
      model_fail({source, at}, value,
                 "unknown key; house_prices takes annual (percent change by year) or monthly (an "
                 "index by month from cut-off)");
    if (!value.is_array() || value.empty())
      model_fail({source, at}, value,
                 annual
                     ? "must be a non-empty array of annual changes in percent, such as [3, 2]"
                     : "must be a non-empty array of index levels by month, such as [100, 100.3]");
    std::vector<double>& out = annual ? scenario.house_price_annual : scenario.house_price_monthly;
    for (std::size_t i = 0; i < value.size(); ++i) {
      const std::string element = fmt::format("{}[{}]", at, i);
      const Place place{source, element};
      if (annual) {
        out.push_back(detail::percent_in(file.numbers, value[i], place, kMinAnnualPercent,
                                         kMaxAnnualPercent,
                                         "an annual change in percent (-5 = prices fall 5%)"));
      } else {
        const double level = value[i].is_number() ? value[i].get<double>() : 0.0;
        if (!(level > 0 && std::isfinite(level)))
          model_fail(place, value[i], "must be a positive index level, such as 100");
        out.push_back(level);
      }
    }
  }
  if (scenario.house_price_annual.empty() == scenario.house_price_monthly.empty())
    model_fail({source, key}, object,
               scenario.house_price_annual.empty()
                   ? "needs annual or monthly (leave house_prices out for flat prices)"
                   : "give one, not both, of annual or monthly");
}

CurveShift rate_shock_at(const ordered_json& object, std::string_view source,
                         const std::string& key) {
  detail::require_object(object, {source, key},
                         R"({"parallel_bp": 50, "key_rates": {"2": 25, "10": -10}})");
  CurveShift shift;
  for (const auto& [name, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, name);
    if (name == "parallel_bp") {
      shift.parallel_bp = detail::number_in(value, {source, at}, -kMaxShockBp, kMaxShockBp,
                                            "a shift in basis points");
    } else if (name == "key_rates") {
      detail::require_object(value, {source, at}, R"({"2": 25, "10": -10} (years: bp))");
      std::vector<std::pair<double, double>> keys;
      for (const auto& [tenor, bp] : value.items()) {
        const std::string tenor_at = fmt::format("{}.{}", at, tenor);
        double years = 0;
        const auto [end, error] = std::from_chars(tenor.data(), tenor.data() + tenor.size(), years);
        if (tenor.empty() || error != std::errc() || end != tenor.data() + tenor.size() ||
            !(years > 0 && years <= kMaxKeyYears))
          model_fail({source, tenor_at}, ordered_json(tenor),
                     fmt::format("is not a tenor: a number of years above 0, at most {}, such as "
                                 "\"2\" or \"0.5\"",
                                 kMaxKeyYears));
        for (const auto& [other, unused] : keys)
          if (other == years)
            model_fail({source, tenor_at}, ordered_json(tenor),
                       "names a tenor given already under another spelling");
        keys.emplace_back(years, detail::number_in(bp, {source, tenor_at}, -kMaxShockBp,
                                                   kMaxShockBp, "a shift in basis points"));
      }
      std::sort(keys.begin(), keys.end());  // CurveShift wants ascending tenors
      for (const auto& [years, bp] : keys) {
        shift.key_years.push_back(years);
        shift.key_bp.push_back(bp);
      }
    } else {
      model_fail({source, at}, value, "unknown key; rate_shock takes parallel_bp and key_rates");
    }
  }
  return shift;
}

Scenario scenario_at(const detail::ModelDocument& file, const ordered_json& object,
                     std::string_view source, const std::string& key) {
  detail::require_object(object, {source, key}, kScenarioExample);
  Scenario scenario;
  bool has_name = false;
  for (const auto& [name, value] : object.items()) {
    const std::string at = fmt::format("{}.{}", key, name);
    const Place place{source, at};
    if (name == "name") {
      has_name = true;
      if (!value.is_string() || value.get<std::string>().empty() ||
          value.get<std::string>().find_first_of(" \t\r\n") != std::string::npos)
        model_fail(
            place, value,
            "must be a name without spaces, such as \"mild_downturn\" (--scenario takes it)");
      scenario.name = value.get<std::string>();
    } else if (name == "description") {
      if (!value.is_string()) model_fail(place, value, "must be text");
      scenario.description = value.get<std::string>();
    } else if (name == "house_prices") {
      house_prices_at(file, value, source, at, scenario);
    } else if (name == "rate_shock") {
      scenario.rate_shock = rate_shock_at(value, source, at);
    } else if (name == "prepay_multiplier") {
      scenario.prepay_multiplier =
          detail::number_in(value, place, 0, kMaxMultiplier, "a multiplier of modelled prepayment");
    } else if (name == "default_multiplier") {
      scenario.default_multiplier =
          detail::number_in(value, place, 0, kMaxMultiplier, "a multiplier of modelled defaults");
    } else {
      model_fail(place, value, fmt::format("unknown key; a scenario takes {}", kScenarioKeys));
    }
  }
  if (!has_name) model_fail({source, key}, object, "lacks name; each scenario needs a name");
  return scenario;
}

ordered_json scenario_json(const Scenario& s) {
  ordered_json out;
  out["name"] = s.name;
  out["description"] = s.description;
  if (!s.house_price_annual.empty() || !s.house_price_monthly.empty()) {
    ordered_json prices = ordered_json::object();
    if (!s.house_price_annual.empty()) {
      ordered_json annual = ordered_json::array();
      for (const double g : s.house_price_annual) annual.push_back(detail::percent_number(g));
      prices["annual"] = std::move(annual);
    }
    if (!s.house_price_monthly.empty()) {
      ordered_json monthly = ordered_json::array();
      for (const double level : s.house_price_monthly)
        monthly.push_back(detail::plain_number(level));
      prices["monthly"] = std::move(monthly);
    }
    out["house_prices"] = std::move(prices);
  }
  ordered_json shock;
  shock["parallel_bp"] = detail::plain_number(s.rate_shock.parallel_bp);
  if (s.rate_shock.key_years.size() != s.rate_shock.key_bp.size())
    throw std::invalid_argument(
        fmt::format("scenarios_json: scenario '{}' has {} key-rate tenors and {} shifts", s.name,
                    s.rate_shock.key_years.size(), s.rate_shock.key_bp.size()));
  if (!s.rate_shock.key_years.empty()) {
    ordered_json keys = ordered_json::object();
    for (std::size_t k = 0; k < s.rate_shock.key_years.size(); ++k)
      keys[fmt::format("{}", s.rate_shock.key_years[k])] =
          detail::plain_number(s.rate_shock.key_bp[k]);
    shock["key_rates"] = std::move(keys);
  }
  out["rate_shock"] = std::move(shock);
  out["prepay_multiplier"] = detail::plain_number(s.prepay_multiplier);
  out["default_multiplier"] = detail::plain_number(s.default_multiplier);
  return out;
}

}  // namespace

// Annual changes compound geometrically within each year: month m (1..12) of a year with change g
// stands at (start of year) x (1 + g)^(m / 12), so month 12 closes the year at exactly (1 + g)
// times its start. Monthly indexes are divided by their first level.
std::vector<double> house_price_index(const Scenario& scenario, int months) {
  if (months < 0) throw std::invalid_argument(fmt::format("house_price_index: {} months", months));
  const std::vector<double>& annual = scenario.house_price_annual;
  const std::vector<double>& monthly = scenario.house_price_monthly;
  if (!annual.empty() && !monthly.empty())
    throw std::invalid_argument(fmt::format(
        "house_price_index: scenario '{}' gives both annual changes and a monthly index",
        scenario.name));
  for (const double g : annual)
    if (!(g > -1 && std::isfinite(g)))
      throw std::invalid_argument(fmt::format(
          "house_price_index: scenario '{}' has an annual change of {}", scenario.name, g));
  for (const double level : monthly)
    if (!(level > 0 && std::isfinite(level)))
      throw std::invalid_argument(fmt::format(
          "house_price_index: scenario '{}' has an index level of {}", scenario.name, level));

  std::vector<double> index(static_cast<std::size_t>(months) + 1, 1.0);
  if (!annual.empty()) {
    double year_start = 1.0;
    for (int t = 1; t <= months; ++t) {
      const int year = (t - 1) / 12, month = (t - 1) % 12 + 1;
      const double growth = 1 + annual[std::min(static_cast<std::size_t>(year), annual.size() - 1)];
      index[t] = year_start * std::pow(growth, month / 12.0);
      if (month == 12) year_start = index[t];
    }
  } else if (!monthly.empty()) {
    for (int t = 0; t <= months; ++t)
      index[t] = monthly[std::min(static_cast<std::size_t>(t), monthly.size() - 1)] / monthly[0];
  }
  return index;
}

// Invented and plausible; not a forecast.
std::vector<Scenario> default_scenarios() {
  std::vector<Scenario> out(4);
  out[0].name = "boom";
  out[0].description =
      "House prices rise 8% then cool to 3% a year, and mortgage rates fall 50 bp, so borrowers "
      "refinance more and default less.";
  out[0].house_price_annual = {0.08, 0.06, 0.04, 0.03};
  out[0].rate_shock.parallel_bp = -50;
  out[0].prepay_multiplier = 1.2;
  out[0].default_multiplier = 0.8;

  out[1].name = "base";
  out[1].description = "House prices rise 3% a year and rates follow today's curve.";
  out[1].house_price_annual = {0.03};

  out[2].name = "mild_downturn";
  out[2].description =
      "A shallow recession: house prices fall about 7% over two years before recovering, rates "
      "rise 25 bp, and defaults run half again above normal.";
  out[2].house_price_annual = {-0.05, -0.02, 0.01, 0.02};
  out[2].rate_shock.parallel_bp = 25;
  out[2].prepay_multiplier = 0.9;
  out[2].default_multiplier = 1.5;

  out[3].name = "severe_downturn";
  out[3].description =
      "A deep recession: house prices fall about 30% over three years, rates rise 100 bp, "
      "refinancing dries up and defaults run two and a half times normal.";
  out[3].house_price_annual = {-0.20, -0.10, -0.03, 0.01, 0.02};
  out[3].rate_shock.parallel_bp = 100;
  out[3].prepay_multiplier = 0.7;
  out[3].default_multiplier = 2.5;
  return out;
}

std::vector<Scenario> parse_scenarios(std::string_view json_text, std::string_view source_name) {
  const detail::ModelDocument file = detail::parse_model_document(
      json_text, source_name,
      R"(it must hold one JSON object such as {"scenarios": [{"name": "base", ...}]})");
  std::vector<Scenario> scenarios;
  bool has_scenarios = false;
  for (const auto& [key, value] : file.root.items()) {
    if (key != "scenarios")
      model_fail({source_name, key}, value, "unknown key; a scenario file takes scenarios");
    has_scenarios = true;
    if (!value.is_array() || value.empty())
      model_fail(
          {source_name, key}, value,
          fmt::format("must be a non-empty array of scenarios such as {}", kScenarioExample));
    for (std::size_t i = 0; i < value.size(); ++i) {
      const std::string at = fmt::format("scenarios[{}]", i);
      Scenario scenario = scenario_at(file, value[i], source_name, at);
      for (std::size_t j = 0; j < scenarios.size(); ++j)
        if (scenarios[j].name == scenario.name)
          model_fail({source_name, at + ".name"}, ordered_json(scenario.name),
                     fmt::format("is the name of scenarios[{}] too; names must differ", j));
      scenarios.push_back(std::move(scenario));
    }
  }
  if (!has_scenarios)
    model_fail({source_name, ""}, file.root,
               fmt::format("lacks scenarios; a scenario file holds {{\"scenarios\": [{}, ...]}}",
                           kScenarioExample));
  return scenarios;
}

std::vector<Scenario> load_scenarios(const std::string& path) {
  return parse_scenarios(detail::read_model_file(path, "scenario file"), path);
}

std::string scenarios_json(std::span<const Scenario> scenarios) {
  ordered_json list = ordered_json::array();
  for (const Scenario& s : scenarios) list.push_back(scenario_json(s));
  ordered_json doc;
  doc["scenarios"] = std::move(list);
  return detail::laid_out(doc);
}

const Scenario& find_scenario(std::span<const Scenario> scenarios, std::string_view name,
                              std::string_view option) {
  for (const Scenario& s : scenarios)
    if (s.name == name) return s;
  std::vector<std::string_view> names;
  for (const Scenario& s : scenarios) names.push_back(s.name);
  throw detail::assumption_error(
      {option, ""}, name,
      names.empty()
          ? std::string("unknown scenario; no scenarios are defined")
          : fmt::format("unknown scenario; the scenarios are {}", fmt::join(names, ", ")));
}

}  // namespace poolbid
