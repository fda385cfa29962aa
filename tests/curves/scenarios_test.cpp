// Tests for scenarios (curves/scenarios.cpp): house-price indexes by hand, the shipped set and its
// file in demo-pools/, exact round trips, every class of error with its place, find_scenario.
#include <fmt/core.h>
#include <gtest/gtest.h>

#include <cmath>
#include <optional>
#include <ostream>
#include <random>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "curves/curves.h"

// Failures print scenarios as their file.
namespace poolbid {
void PrintTo(const Scenario& scenario, std::ostream* out) {
  *out << scenarios_json(std::span<const Scenario>(&scenario, 1));
}
}  // namespace poolbid

namespace {

using namespace poolbid;

const std::string kScenarioFile = POOLBID_SOURCE_DIR "/demo-pools/scenarios.json";

std::vector<Scenario> parse(std::string_view json) { return parse_scenarios(json, "s.json"); }

Scenario annual(std::vector<double> changes) {
  Scenario s;
  s.name = "test";
  s.house_price_annual = std::move(changes);
  return s;
}

// ---- House-price index
// ---------------------------------------------------------------------------

TEST(HousePriceIndex, AnnualChangesByHand) {
  const std::vector<double> index = house_price_index(annual({-0.12, 0.06}), 40);
  ASSERT_EQ(index.size(), 41u);
  EXPECT_EQ(index[0], 1.0);
  EXPECT_EQ(index[12], 0.88);  // identity: month 12 closes year 1 at exactly 1 + g1
  EXPECT_NEAR(index[24], 0.88 * 1.06, 1e-12);
  EXPECT_NEAR(index[36], 0.88 * 1.06 * 1.06, 1e-12);  // identity: the last change continues
  EXPECT_NEAR(index[6], std::sqrt(0.88), 1e-15);
  EXPECT_NEAR(index[18], 0.88 * std::sqrt(1.06), 1e-12);
  // identity: geometric monthly steps within each year
  for (int t = 1; t <= 12; ++t)
    EXPECT_NEAR(index[t] / index[t - 1], std::pow(0.88, 1.0 / 12), 1e-14) << t;
  for (int t = 13; t <= 40; ++t)
    EXPECT_NEAR(index[t] / index[t - 1], std::pow(1.06, 1.0 / 12), 1e-14) << t;
}

TEST(HousePriceIndex, MonthlyIndexAndFlat) {
  Scenario s;
  s.house_price_monthly = {200, 202, 204};
  const std::vector<double> index = house_price_index(s, 5);
  const std::vector<double> expected{1.0, 1.01, 1.02, 1.02, 1.02, 1.02};  // the last level holds
  ASSERT_EQ(index.size(), expected.size());
  for (std::size_t t = 0; t < index.size(); ++t) EXPECT_DOUBLE_EQ(index[t], expected[t]) << t;
  EXPECT_EQ(index[0], 1.0);

  EXPECT_EQ(house_price_index(Scenario{}, 3), (std::vector<double>{1, 1, 1, 1}));
  EXPECT_EQ(house_price_index(annual({0.05}), 0), (std::vector<double>{1}));
  s.house_price_monthly = {150};
  EXPECT_EQ(house_price_index(s, 2), (std::vector<double>{1, 1, 1}));
}

TEST(HousePriceIndex, BadScenariosThrow) {
  Scenario both = annual({0.03});
  both.house_price_monthly = {100, 101};
  EXPECT_THROW(house_price_index(both, 12), std::invalid_argument);
  EXPECT_THROW(house_price_index(annual({-1.0}), 12), std::invalid_argument);
  EXPECT_THROW(house_price_index(annual({NAN}), 12), std::invalid_argument);
  Scenario zero;
  zero.house_price_monthly = {100, 0};
  EXPECT_THROW(house_price_index(zero, 12), std::invalid_argument);
  EXPECT_THROW(house_price_index(Scenario{}, -1), std::invalid_argument);
}

// ---- The shipped set
// -----------------------------------------------------------------------------

TEST(DefaultScenarios, Shape) {
  const std::vector<Scenario> set = default_scenarios();
  ASSERT_EQ(set.size(), 4u);
  EXPECT_EQ(set[0].name, "boom");
  EXPECT_EQ(set[1].name, "base");
  EXPECT_EQ(set[2].name, "mild_downturn");
  EXPECT_EQ(set[3].name, "severe_downturn");
  for (const Scenario& s : set) {
    // One sentence each.
    ASSERT_FALSE(s.description.empty()) << s.name;
    EXPECT_EQ(s.description.back(), '.') << s.name;
    EXPECT_EQ(s.description.find(". "), std::string::npos) << s.name;
    EXPECT_TRUE(s.house_price_monthly.empty());
    EXPECT_TRUE(s.rate_shock.key_years.empty());
  }
  const auto index = [&](std::string_view name, int month) {
    return house_price_index(find_scenario(set, name), 120)[month];
  };
  EXPECT_EQ(index("boom", 12), 1.08);
  EXPECT_NEAR(index("boom", 48), 1.08 * 1.06 * 1.04 * 1.03, 1e-12);
  EXPECT_NEAR(index("boom", 60), 1.08 * 1.06 * 1.04 * 1.03 * 1.03, 1e-12);
  EXPECT_EQ(index("base", 12), 1.03);
  EXPECT_NEAR(index("mild_downturn", 24), 0.95 * 0.98, 1e-12);
  EXPECT_NEAR(index("severe_downturn", 36), 0.8 * 0.9 * 0.97, 1e-12);  // the trough, about -30%
  EXPECT_NEAR(index("severe_downturn", 60), 0.8 * 0.9 * 0.97 * 1.01 * 1.02, 1e-12);
  EXPECT_EQ(set[0].rate_shock.parallel_bp, -50);
  EXPECT_EQ(set[1].rate_shock.parallel_bp, 0);
  EXPECT_EQ(set[2].rate_shock.parallel_bp, 25);
  EXPECT_EQ(set[3].rate_shock.parallel_bp, 100);
  EXPECT_EQ(set[0].prepay_multiplier, 1.2);
  EXPECT_EQ(set[0].default_multiplier, 0.8);
  EXPECT_EQ(set[1].prepay_multiplier, 1.0);
  EXPECT_EQ(set[1].default_multiplier, 1.0);
  EXPECT_EQ(set[2].prepay_multiplier, 0.9);
  EXPECT_EQ(set[2].default_multiplier, 1.5);
  EXPECT_EQ(set[3].prepay_multiplier, 0.7);
  EXPECT_EQ(set[3].default_multiplier, 2.5);
}

TEST(DefaultScenarios, TheFileInDemoPoolsIsTheDefaultSet) {
  EXPECT_EQ(load_scenarios(kScenarioFile), default_scenarios());
}

// ---- The scenario file
// ---------------------------------------------------------------------------

TEST(ScenarioFile, DefaultsRoundTripExactly) {
  const std::vector<Scenario> set = default_scenarios();
  const std::string text = scenarios_json(set);
  EXPECT_EQ(parse(text), set);
  EXPECT_NE(text.find(R"("house_prices": {"annual": [-20, -10, -3, 1, 2]})"), std::string::npos)
      << text;
}

TEST(ScenarioFile, AnyScenarioRoundTripsExactly) {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> change(-0.5, 0.5), level(50, 500);
  std::vector<Scenario> set;
  for (int k = 0; k < 200; ++k) {
    Scenario s;
    s.name = fmt::format("s{}", k);
    s.description = k % 2 ? "quoted \"text\", unicode \u00e9" : "";
    if (k % 3 == 0) {
      for (int i = 0; i <= k % 7; ++i) s.house_price_annual.push_back(change(rng));
    } else if (k % 3 == 1) {
      for (int i = 0; i <= k % 11; ++i) s.house_price_monthly.push_back(level(rng));
    }
    s.rate_shock.parallel_bp = change(rng) * 1000;
    if (k % 4 == 0) {
      s.rate_shock.key_years = {0.25, 1.0 / 3, 2, 10, 30};
      s.rate_shock.key_bp = {change(rng), 25, -10, 0.1 + 0.2, 1e-3};
    }
    s.prepay_multiplier = 1 + change(rng);
    s.default_multiplier = 2 + change(rng);
    set.push_back(std::move(s));
  }
  const std::string text = scenarios_json(set);
  EXPECT_EQ(parse(text), set);
}

TEST(ScenarioFile, Forms) {
  const std::vector<Scenario> set = parse(R"({"scenarios": [
    {"name": "flat"},
    {"name": "index", "description": "d", "house_prices": {"monthly": [100, 100.5, 99]},
     "rate_shock": {"key_rates": {"10": -10, "2": 25, "0.5": 5}}, "prepay_multiplier": 0.5,
     "default_multiplier": 3},
    {"name": "annual", "house_prices": {"annual": [6.5, -1.25]},
     "rate_shock": {"parallel_bp": -12.5}}]})");
  ASSERT_EQ(set.size(), 3u);
  EXPECT_EQ(set[0], (Scenario{"flat", "", {}, {}, {}, 1, 1}));
  EXPECT_EQ(set[1].house_price_monthly, (std::vector<double>{100, 100.5, 99}));
  // Key rates are sorted by tenor, whatever the file's order.
  EXPECT_EQ(set[1].rate_shock.key_years, (std::vector<double>{0.5, 2, 10}));
  EXPECT_EQ(set[1].rate_shock.key_bp, (std::vector<double>{5, 25, -10}));
  EXPECT_EQ(set[1].rate_shock.parallel_bp, 0);
  EXPECT_EQ(set[1].prepay_multiplier, 0.5);
  EXPECT_EQ(set[1].default_multiplier, 3);
  EXPECT_EQ(set[2].house_price_annual, (std::vector<double>{0.065, -0.0125}));
  EXPECT_EQ(set[2].rate_shock.parallel_bp, -12.5);
}

struct BadScenarios {
  std::string_view json;
  std::string_view key;
  std::optional<std::string_view> value;
  std::string_view fragment;
};

TEST(ScenarioFile, ErrorsNameTheKeyAndValue) {
  const BadScenarios cases[] = {
      {R"({"scenarios": [{"name": "a"}, {"name": "b", "house_prices": {"annual": [-95]}}]})",
       "scenarios[1].house_prices.annual[0]", "-95",
       "s.json key scenarios[1].house_prices.annual[0], value '-95': must be an annual change in "
       "percent (-5 = prices fall 5%), from -90 to 100"},
      {R"({"scenarios": [{"name": "a", "house_prices": {"annual": [3, "2"]}}]})",
       "scenarios[0].house_prices.annual[1]", "2", "must be an annual change in percent"},
      {R"({"scenarios": [{"name": "a", "house_prices": {"annual": []}}]})",
       "scenarios[0].house_prices.annual", "[]",
       "must be a non-empty array of annual changes in percent"},
      {R"({"scenarios": [{"name": "a", "house_prices": {"annual": [3], "monthly": [100]}}]})",
       "scenarios[0].house_prices", std::nullopt, "give one, not both, of annual or monthly"},
      {R"({"scenarios": [{"name": "a", "house_prices": {}}]})", "scenarios[0].house_prices", "{}",
       "needs annual or monthly (leave house_prices out for flat prices)"},
      {R"({"scenarios": [{"name": "a", "house_prices": {"monthly": [100, 0]}}]})",
       "scenarios[0].house_prices.monthly[1]", "0", "must be a positive index level, such as 100"},
      {R"({"scenarios": [{"name": "a", "house_prices": {"quarterly": [1]}}]})",
       "scenarios[0].house_prices.quarterly", "[1]", "unknown key; house_prices takes annual"},
      {R"({"scenarios": [{"name": "a", "house_prices": [3]}]})", "scenarios[0].house_prices", "[3]",
       "must be an object such as"},
      {R"({"scenarios": [{"name": "a", "rate_shock": {"parallel_bp": "50"}}]})",
       "scenarios[0].rate_shock.parallel_bp", "50",
       "must be a shift in basis points, from -5000 to 5000"},
      {R"({"scenarios": [{"name": "a", "rate_shock": {"key_rates": {"2y": 25}}}]})",
       "scenarios[0].rate_shock.key_rates.2y", "2y",
       "is not a tenor: a number of years above 0, at most 50"},
      {R"({"scenarios": [{"name": "a", "rate_shock": {"key_rates": {"0": 25}}}]})",
       "scenarios[0].rate_shock.key_rates.0", "0", "is not a tenor"},
      {R"({"scenarios": [{"name": "a", "rate_shock": {"key_rates": {"2": 25, "2.0": 5}}}]})",
       "scenarios[0].rate_shock.key_rates.2.0", "2.0",
       "names a tenor given already under another spelling"},
      {R"({"scenarios": [{"name": "a", "rate_shock": {"key_rates": {"2": 6000}}}]})",
       "scenarios[0].rate_shock.key_rates.2", "6000", "must be a shift in basis points"},
      {R"({"scenarios": [{"name": "a", "rate_shock": {"twist": 5}}]})",
       "scenarios[0].rate_shock.twist", "5",
       "unknown key; rate_shock takes parallel_bp and key_rates"},
      {R"({"scenarios": [{"description": "no name"}]})", "scenarios[0]", std::nullopt,
       "lacks name; each scenario needs a name"},
      {R"({"scenarios": [{"name": "a"}, {"name": "b"}, {"name": "a"}]})", "scenarios[2].name", "a",
       "is the name of scenarios[0] too; names must differ"},
      {R"({"scenarios": [{"name": "mild downturn"}]})", "scenarios[0].name", "mild downturn",
       "must be a name without spaces"},
      {R"({"scenarios": [{"name": ""}]})", "scenarios[0].name", "", "must be a name"},
      {R"({"scenarios": [{"name": 5}]})", "scenarios[0].name", "5", "must be a name"},
      {R"({"scenarios": [{"name": "a", "description": 5}]})", "scenarios[0].description", "5",
       "must be text"},
      {R"({"scenarios": [{"name": "a", "prepay_multiplier": -1}]})",
       "scenarios[0].prepay_multiplier", "-1",
       "must be a multiplier of modelled prepayment, from 0 to 100"},
      {R"({"scenarios": [{"name": "a", "default_multiplier": null}]})",
       "scenarios[0].default_multiplier", "null", "must be a multiplier of modelled defaults"},
      {R"({"scenarios": [{"name": "a", "hpi": [3]}]})", "scenarios[0].hpi", "[3]",
       "unknown key; a scenario takes name, description, house_prices, rate_shock"},
      {R"({"scenarios": ["base"]})", "scenarios[0]", "base", "must be an object such as"},
      {R"({"scenarios": []})", "scenarios", "[]", "must be a non-empty array of scenarios"},
      {R"({"scenarios": {"name": "a"}})", "scenarios", std::nullopt,
       "must be a non-empty array of scenarios"},
      {R"({"scenario": []})", "scenario", "[]", "unknown key; a scenario file takes scenarios"},
      {R"({})", "", "{}", "lacks scenarios"},
      {R"({"scenarios": [{"name": "a", "name": "b"}]})", "scenarios[0].name", "",
       "s.json key scenarios[0].name: duplicate key"},
      {R"({"scenarios": [{"name": "a"},]})", "", "", "s.json: not valid JSON at byte"},
      {R"([])", "", "", "s.json: holds an array; it must hold one JSON object"},
  };
  for (const BadScenarios& c : cases) {
    SCOPED_TRACE(c.json);
    try {
      parse(c.json);
      ADD_FAILURE() << "accepted";
    } catch (const AssumptionError& e) {
      EXPECT_EQ(e.source, "s.json");
      EXPECT_EQ(e.key, c.key);
      if (c.value) {
        EXPECT_EQ(e.value, *c.value);
      }
      EXPECT_NE(std::string_view(e.what()).find(c.fragment), std::string_view::npos) << e.what();
    }
  }
}

TEST(ScenarioFile, UnreadableFile) {
  const std::string path = "/nonexistent-dir/scenarios.json";
  try {
    load_scenarios(path);
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, path);
    EXPECT_NE(std::string_view(e.what()).find("cannot open the scenario file"), std::string::npos)
        << e.what();
  }
}

// ---- Finding one
// ---------------------------------------------------------------------------------

TEST(FindScenario, ByNameOrAnErrorListingTheNames) {
  const std::vector<Scenario> set = default_scenarios();
  EXPECT_EQ(&find_scenario(set, "mild_downturn"), &set[2]);
  try {
    find_scenario(set, "recession");
    FAIL() << "found";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, "--scenario");
    EXPECT_EQ(e.key, "");
    EXPECT_EQ(e.value, "recession");
    EXPECT_STREQ(e.what(),
                 "--scenario 'recession': unknown scenario; the scenarios are boom, base, "
                 "mild_downturn, severe_downturn");
  }
  try {
    find_scenario({}, "base", "scenario");
    FAIL() << "found";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, "scenario");
    EXPECT_NE(std::string_view(e.what()).find("no scenarios are defined"), std::string::npos);
  }
}

}  // namespace
