// Tests for canonical field facts (tape/fields.h): names, dates, state codes, category spellings,
// rate fields and their unit-detection ceilings, and the error-kind names.
#include "tape/fields.h"

#include <gtest/gtest.h>

#include <set>
#include <string>

namespace {

using namespace poolbid;
using namespace std::chrono;

TEST(Fields, EveryNameRoundTrips) {
  std::set<std::string_view> names;
  for (std::size_t i = 0; i < kFieldCount; ++i) {
    const Field f = static_cast<Field>(i);
    const std::string_view name = field_name(f);
    EXPECT_FALSE(name.empty());
    EXPECT_TRUE(names.insert(name).second) << name << " appears twice";
    EXPECT_EQ(field_from_name(name), f);
  }
}

TEST(Fields, NameLookupIsExact) {
  EXPECT_EQ(field_from_name("current_balance"), Field::current_balance);
  EXPECT_FALSE(field_from_name("Current_Balance"));  // callers lower-case header cells first
  EXPECT_FALSE(field_from_name("balance"));
  EXPECT_FALSE(field_from_name(""));
}

TEST(ParseDate, Iso) {
  // source: ISO 8601 calendar date, extended format YYYY-MM-DD
  EXPECT_EQ(parse_date("2026-03-01"), Date(year{2026}, month{3}, day{1}));
  EXPECT_EQ(parse_date(" 2056-11-01 "), Date(year{2056}, month{11}, day{1}));
}

TEST(ParseDate, MonthDayYear) {
  EXPECT_EQ(parse_date("3/1/2026"), Date(year{2026}, month{3}, day{1}));
  EXPECT_EQ(parse_date("12/31/2025"), Date(year{2025}, month{12}, day{31}));
  EXPECT_EQ(parse_date("02/09/2024"), Date(year{2024}, month{2}, day{9}));
}

TEST(ParseDate, Rejects) {
  EXPECT_FALSE(parse_date(""));
  EXPECT_FALSE(parse_date("2026-02-30"));  // no such day
  EXPECT_FALSE(parse_date("2026-13-01"));
  EXPECT_FALSE(parse_date("3/1/26"));  // two-digit years are ambiguous
  EXPECT_FALSE(parse_date("26-03-01"));
  EXPECT_FALSE(parse_date("2026/03/01"));  // slashes mean month/day/year
  EXPECT_FALSE(parse_date("March 1, 2026"));
  EXPECT_FALSE(parse_date("2026-03-01x"));
  // std::chrono::month and day hold one byte: 257 must not wrap to 1.
  EXPECT_FALSE(parse_date("257/1/2056"));
  EXPECT_FALSE(parse_date("1/257/2026"));
  EXPECT_FALSE(parse_date("2056-259-01"));
  EXPECT_FALSE(parse_date("2026-01-257"));
  EXPECT_FALSE(parse_date("4294967297/1/2026"));
  // Years 1900-2200 only.
  EXPECT_FALSE(parse_date("1899-12-31"));
  EXPECT_FALSE(parse_date("2201-01-01"));
  EXPECT_FALSE(parse_date("1/1/9999"));
  EXPECT_TRUE(parse_date("1900-01-01"));
  EXPECT_TRUE(parse_date("12/31/2200"));
  // source: Gregorian calendar leap-year rule (2024 is a leap year, 2025 is not)
  EXPECT_TRUE(parse_date("2/29/2024"));
  EXPECT_FALSE(parse_date("2/29/2025"));
}

TEST(States, CodesRoundTripAndIgnoreCase) {
  // source: USPS Publication 28, Appendix B (state and territory abbreviations)
  for (std::string_view code : {"CA", "NY", "TX", "DC", "PR", "GU"}) {
    const auto index = state_index(code);
    ASSERT_TRUE(index) << code;
    EXPECT_EQ(state_code(*index), code);
  }
  EXPECT_EQ(state_index("ca"), state_index("CA"));
  EXPECT_FALSE(state_index("XX"));
  EXPECT_FALSE(state_index("C"));
  EXPECT_FALSE(state_index("CAL"));
  EXPECT_EQ(state_code(0), "");
}

TEST(Categories, FoldSpelling) {
  EXPECT_EQ(detail::fold_spelling("Cash-Out Refi"), "cashoutrefi");
  EXPECT_EQ(detail::fold_spelling("2-4 Unit"), "24unit");
  EXPECT_EQ(detail::fold_spelling("second_home"), "secondhome");
}

TEST(Categories, CommonSpellings) {
  using detail::parse_category;
  // common practice: the spellings sellers' tapes use for these values
  EXPECT_EQ(parse_category(Field::occupancy, "Owner Occupied"),
            static_cast<std::uint8_t>(Occupancy::owner));
  EXPECT_EQ(parse_category(Field::occupancy, "INVESTMENT"),
            static_cast<std::uint8_t>(Occupancy::investor));
  EXPECT_EQ(parse_category(Field::loan_purpose, "Cash-Out Refi"),
            static_cast<std::uint8_t>(Purpose::cash_out_refi));
  EXPECT_EQ(parse_category(Field::property_type, "SFR"),
            static_cast<std::uint8_t>(PropertyType::single_family));
  EXPECT_EQ(parse_category(Field::property_type, "2-4 Unit"),
            static_cast<std::uint8_t>(PropertyType::two_to_four));
  EXPECT_EQ(parse_category(Field::amortization_type, "ARM"),
            static_cast<std::uint8_t>(Amortization::arm));
  EXPECT_EQ(parse_category(Field::delinquency, "90+"),
            static_cast<std::uint8_t>(Delinquency::dq90_plus));
  EXPECT_EQ(parse_category(Field::documentation, "Full Doc"),
            static_cast<std::uint8_t>(Documentation::full));
  EXPECT_FALSE(parse_category(Field::occupancy, "castle"));
  EXPECT_FALSE(parse_category(Field::state, "CA"));  // not a category field
}

TEST(Categories, OurOwnSpellingsParse) {
  // Every spelling a message lists must itself be accepted.
  for (Field f : {Field::amortization_type, Field::occupancy, Field::property_type,
                  Field::loan_purpose, Field::documentation, Field::delinquency}) {
    EXPECT_TRUE(detail::is_category(f));
    const std::string list(detail::category_spellings(f));
    std::size_t start = 0;
    while (start < list.size()) {
      std::size_t end = list.find(", ", start);
      if (end == std::string::npos) end = list.size();
      const std::string spelling = list.substr(start, end - start);
      EXPECT_TRUE(detail::parse_category(f, spelling)) << field_name(f) << ": " << spelling;
      start = end + 2;
    }
  }
}

TEST(Categories, ToStringMatchesSpellings) {
  EXPECT_EQ(to_string(Amortization::interest_only), "interest_only");
  EXPECT_EQ(to_string(Occupancy::second_home), "second_home");
  EXPECT_EQ(to_string(Purpose::rate_term_refi), "rate_term_refi");
  EXPECT_EQ(to_string(Documentation::limited), "limited");
  EXPECT_EQ(to_string(PropertyType::two_to_four), "two_to_four");
  EXPECT_EQ(to_string(Delinquency::dq90_plus), "90+");
}

TEST(RateFields, WhichFieldsAndTheirCeilings) {
  for (Field f : {Field::note_rate, Field::servicing_fee, Field::arm_margin,
                  Field::arm_periodic_cap, Field::arm_lifetime_cap, Field::arm_floor,
                  Field::original_ltv, Field::combined_ltv, Field::dti})
    EXPECT_TRUE(detail::is_rate_field(f)) << field_name(f);
  for (Field f : {Field::current_balance, Field::credit_score, Field::original_term})
    EXPECT_FALSE(detail::is_rate_field(f)) << field_name(f);
  EXPECT_EQ(detail::decimal_detection_ceiling(Field::note_rate), 1.0);
  EXPECT_EQ(detail::decimal_detection_ceiling(Field::dti), 1.0);
  // A 105% CLTV written as a decimal is 1.05; LTVs run to 300% (3.0) and none is 3%.
  EXPECT_EQ(detail::decimal_detection_ceiling(Field::combined_ltv), 3.0);
  // A 0.25% fee written in percent is 0.25: above the fee ceiling, so read as percent.
  EXPECT_LT(detail::decimal_detection_ceiling(Field::servicing_fee), 0.25);
}

TEST(ErrorKinds, Names) {
  EXPECT_EQ(to_string(ErrorKind::unterminated_quote), "unterminated_quote");
  EXPECT_EQ(to_string(ErrorKind::bad_map), "bad_map");
}

TEST(TapeErrors, CarryTheirLocation) {
  const TapeError e(ErrorKind::missing_column, "pool.csv", 3, "RATE", "x", "message");
  EXPECT_EQ(e.kind, ErrorKind::missing_column);
  EXPECT_EQ(e.file, "pool.csv");
  EXPECT_EQ(e.row, 3u);
  EXPECT_EQ(e.column, "RATE");
  EXPECT_EQ(e.value, "x");
  EXPECT_STREQ(e.what(), "message");
}

}  // namespace
