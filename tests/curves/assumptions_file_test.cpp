// Tests for the JSON assumptions file (curves/assumptions_file.cpp): the full format, objects with
// monthly values, partial overrides of a base, and every class of error with its place (duplicate
// keys included).
#include "curves/curves.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <optional>
#include <string_view>

#include <unistd.h>

#include "tests/curves/curve_testing.h"

namespace {

using namespace poolbid;
using testing_curves::same_curve;

Assumptions parse(std::string_view json, const Assumptions& base = {}) {
  return parse_assumptions(json, "a.json", base);
}

TEST(AssumptionsFile, FullExample) {
  const Assumptions a = parse(R"({"prepay": "psa:150", "default": "sda:200", "severity": 45,
    "lag_months": 9, "advancing": "interest", "delinquent_default": true})");
  EXPECT_TRUE(same_curve(a.prepay, parse_prepay("psa:150")));
  EXPECT_TRUE(same_curve(a.default_rate, parse_default("sda:200")));
  EXPECT_TRUE(same_curve(a.severity, parse_severity("45")));
  EXPECT_EQ(a.lag_months, 9);
  EXPECT_EQ(a.advancing, Advancing::interest);
  EXPECT_TRUE(a.delinquent_default);
}

TEST(AssumptionsFile, TextFormsAndObjects) {
  const Assumptions a = parse(R"({"prepay": {"cpr": [4, 5, 6, 7, 8], "clock": "loan_age"},
    "default": {"cdr": [0.5, 1]}, "severity": {"severity": [45, 40, 35]}})");
  EXPECT_TRUE(same_curve(a.prepay, parse_prepay("cpr:4,5,6,7,8@age")));
  EXPECT_TRUE(same_curve(a.default_rate, parse_default("cdr:0.5,1")));
  EXPECT_TRUE(same_curve(a.severity, parse_severity("45,40,35")));

  const Assumptions b = parse(R"({"prepay": {"psa": 150}, "default": {"sda": 200,
    "clock": "projection_month"}, "severity": {"severity": 40, "clock": "loan_age"}})");
  EXPECT_TRUE(same_curve(b.prepay, parse_prepay("psa:150")));
  EXPECT_TRUE(same_curve(b.default_rate, parse_default("sda:200@month")));
  EXPECT_TRUE(same_curve(b.severity, parse_severity("40@age")));

  const Assumptions c = parse(R"({"prepay": "cpr:2..8/24@age", "default": {"cdr": 1.5},
    "severity": "60..40/24", "lag_months": 0, "advancing": "none"})");
  EXPECT_TRUE(same_curve(c.prepay, parse_prepay("cpr:2..8/24@age")));
  EXPECT_TRUE(same_curve(c.default_rate, parse_default("cdr:1.5")));
  EXPECT_TRUE(same_curve(c.severity, parse_severity("60..40/24")));
  EXPECT_EQ(c.lag_months, 0);
  EXPECT_EQ(parse(R"({"lag_months": 6.0})").lag_months, 6);

  // A JSON number reads exactly as the same digits in a text form.
  const Assumptions d = parse(R"({"prepay": {"cpr": [33.33333333333333, 7, 1e-3]},
    "severity": 0.1, "default": {"sda": 0.7}})");
  EXPECT_TRUE(same_curve(d.prepay, parse_prepay("cpr:33.33333333333333,7,0.001")));
  EXPECT_TRUE(same_curve(d.severity, parse_severity("0.1")));
  EXPECT_TRUE(same_curve(d.default_rate, parse_default("sda:0.7")));
}

TEST(AssumptionsFile, KeysLeftOutKeepTheBase) {
  Assumptions base;
  base.prepay = parse_prepay("cpr:12");
  base.default_rate = parse_default("cdr:2");
  base.severity = parse_severity("55");
  base.lag_months = 6;
  base.advancing = Advancing::interest;
  base.delinquent_default = true;

  const Assumptions a = parse(R"({"prepay": "psa:200"})", base);
  EXPECT_TRUE(same_curve(a.prepay, parse_prepay("psa:200")));
  EXPECT_TRUE(same_curve(a.default_rate, base.default_rate));
  EXPECT_TRUE(same_curve(a.severity, base.severity));
  EXPECT_EQ(a.lag_months, 6);
  EXPECT_EQ(a.advancing, Advancing::interest);
  EXPECT_TRUE(a.delinquent_default);

  const Assumptions b = parse(R"({"delinquent_default": false, "lag_months": 18})", base);
  EXPECT_FALSE(b.delinquent_default);
  EXPECT_EQ(b.lag_months, 18);
  EXPECT_TRUE(same_curve(b.prepay, base.prepay));

  const Assumptions c = parse("{}", base);
  EXPECT_TRUE(same_curve(c.severity, base.severity));
  EXPECT_EQ(c.lag_months, 6);
}

struct BadFile {
  std::string_view json;
  std::string_view key;       // AssumptionError::key
  std::string_view fragment;  // must appear in what()
};

// `c.json` is refused with an AssumptionError from "a.json" naming `c.key` and saying `c.fragment`;
// `value`, when given, is the error's value.
void expect_refused(const BadFile& c, std::optional<std::string_view> value = std::nullopt) {
  SCOPED_TRACE(c.json);
  try {
    parse(c.json);
    ADD_FAILURE() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, "a.json");
    EXPECT_EQ(e.key, c.key);
    if (value) {
      EXPECT_EQ(e.value, *value);
    }
    EXPECT_NE(std::string_view(e.what()).find(c.fragment), std::string_view::npos) << e.what();
  }
}

TEST(AssumptionsFile, ErrorsNameTheKey) {
  const BadFile cases[] = {
      {R"({"prepay_speed": "psa:150"})", "prepay_speed",
       "a.json key prepay_speed, value 'psa:150': unknown key; the keys are prepay, default, "
       "severity, lag_months, advancing, delinquent_default"},
      {R"({"prepay": "psb:150"})", "prepay",
       "a.json key prepay, value 'psb:150': unknown form; use cpr:RATE, psa:MULTIPLE"},
      {R"({"default": "cpr:2"})", "default", "unknown form; use cdr:RATE"},
      {R"({"severity": "101"})", "severity", "severity 101% is above 100%"},
      {R"({"severity": 120})", "severity", "value '120': severity 120% is above 100%"},
      {R"({"severity": -1})", "severity", "severity -1% is negative"},
      {R"({"severity": true})", "severity", "must be a percent such as 45"},
      {R"({"prepay": 8})", "prepay", R"(value '8': must be text such as "psa:150")"},
      {R"({"prepay": [8]})", "prepay", "must be text such as"},
      {R"({"default": null})", "default", R"(value 'null': must be text such as "sda:200")"},
      {R"({"lag_months": "12"})", "lag_months",
       "a.json key lag_months, value '12': must be a whole number of months from 0 to 360"},
      {R"({"lag_months": 12.5})", "lag_months", "must be a whole number of months"},
      {R"({"lag_months": 361})", "lag_months", "must be a whole number of months"},
      {R"({"lag_months": -1})", "lag_months", "must be a whole number of months"},
      {R"({"advancing": true})", "advancing", R"(value 'true': must be "none" or "interest")"},
      {R"({"advancing": "full"})", "advancing", R"(must be "none" or "interest")"},
      {R"({"delinquent_default": "yes"})", "delinquent_default", "must be true or false"},
      {R"({"delinquent_default": 1})", "delinquent_default", "must be true or false"},
      {R"({"prepay": {"cpr": [4, "x"]}})", "prepay.cpr[1]",
       "a.json key prepay.cpr[1], value 'x': must be a number (percent)"},
      {R"({"prepay": {"cpr": [4, -1]}})", "prepay.cpr[1]", "CPR -1% is negative"},
      {R"({"default": {"cdr": [1, 101]}})", "default.cdr[1]", "CDR 101% is above 100%"},
      {R"({"prepay": {"cpr": []}})", "prepay.cpr",
       "must be a percent or a non-empty array of percents by month"},
      {R"({"prepay": {"cpr": "8"}})", "prepay.cpr", "must be a percent or a non-empty array"},
      {R"({"prepay": {"cpr": [4], "psa": 100}})", "prepay", "give one, not both, of cpr or psa"},
      {R"({"prepay": {"clock": "loan_age"}})", "prepay", "needs cpr or psa"},
      {R"({"prepay": {"cpr": [4], "clock": "age"}})", "prepay.clock",
       R"(value 'age': must be "loan_age" or "projection_month")"},
      {R"({"prepay": {"cdr": [4]}})", "prepay.cdr",
       "unknown key; a curve object takes cpr or psa and clock"},
      {R"({"prepay": {"psa": "150"}})", "prepay.psa", "must be a number"},
      {R"({"prepay": {"psa": 2000}})", "prepay.psa", "psa:2000 peaks at 120% CPR"},
      {R"({"default": {"sda": 20000}})", "default.sda", "sda:20000 peaks at 120% CDR"},
      {R"({"severity": {"sda": 100}})", "severity.sda",
       "unknown key; a curve object takes severity and clock"},
  };
  for (const BadFile& c : cases) expect_refused(c);
}

TEST(AssumptionsFile, DuplicateKeysAreAnError) {
  // Each key given twice, at the top level or inside a curve object, is refused by its path,
  // whatever the two values are (the same value twice too).
  const BadFile cases[] = {
      {R"({"prepay": "psa:150", "prepay": "psa:200"})", "prepay",
       "a.json key prepay: duplicate key; each key may appear only once"},
      {R"({"lag_months": 6, "severity": 40, "lag_months": 6})", "lag_months", "duplicate key"},
      {R"({"delinquent_default": true, "delinquent_default": false})", "delinquent_default",
       "duplicate key"},
      {R"({"prepay": {"cpr": [4, 5], "cpr": [6]}})", "prepay.cpr",
       "a.json key prepay.cpr: duplicate key"},
      {R"({"default": {"sda": 100, "clock": "loan_age", "clock": "loan_age"}})", "default.clock",
       "duplicate key"},
      {R"({"severity": {"severity": 40, "severity": 45}, "lag_months": 3})", "severity.severity",
       "duplicate key"},
      // Found before the unknown key the same object holds.
      {R"({"prepay": {"psa": 100, "psa": 150}, "speed": 1})", "prepay.psa", "duplicate key"},
      // Deeper than the format reads: still named by its path.
      {R"({"x": [1, {"a": 1}, {"a": 1, "a": 2}]})", "x[2].a", "a.json key x[2].a: duplicate key"},
  };
  for (const BadFile& c : cases) expect_refused(c, "");

  // One key in each of two objects, or once in each of sibling curve objects, is no duplicate.
  const Assumptions a = parse(R"({"prepay": {"cpr": 4, "clock": "loan_age"},
    "default": {"cdr": 1, "clock": "loan_age"}, "severity": {"severity": 40}})");
  EXPECT_TRUE(same_curve(a.prepay, parse_prepay("cpr:4@age")));
  EXPECT_TRUE(same_curve(a.default_rate, parse_default("cdr:1@age")));
  EXPECT_TRUE(same_curve(a.severity, parse_severity("40")));
}

TEST(AssumptionsFile, SyntaxErrorsNameTheFileAndByte) {
  try {
    parse(R"({"prepay": "psa:150",})");
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, "a.json");
    EXPECT_EQ(e.key, "");
    // The byte is nlohmann's: the closing brace that came where a key should be.
    EXPECT_EQ(std::string_view(e.what()).rfind("a.json: not valid JSON at byte 22: ", 0), 0u)
        << e.what();
    EXPECT_NE(std::string_view(e.what()).find("line 1, column 22"), std::string_view::npos)
        << e.what();
    EXPECT_EQ(std::string_view(e.what()).find("[json.exception"), std::string_view::npos);
  }
  EXPECT_THROW(parse(""), AssumptionError);
  EXPECT_THROW(parse("{\"lag_months\": 1e999}"), AssumptionError);
  try {
    parse("[1, 2]");
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_STREQ(
        e.what(),
        R"(a.json: holds an array; it must hold one JSON object such as {"prepay": "psa:150"})");
  }
}

class AssumptionsFileOnDisk : public ::testing::Test {
 protected:
  std::filesystem::path dir_ = std::filesystem::path(::testing::TempDir()) /
                               ("curves_file_test_" + std::to_string(::getpid()));
  void SetUp() override { std::filesystem::create_directories(dir_); }
  void TearDown() override { std::filesystem::remove_all(dir_); }
};

TEST_F(AssumptionsFileOnDisk, LoadsAFile) {
  const std::string path = (dir_ / "base.json").string();
  std::ofstream(path) << R"({"prepay": "psa:150", "lag_months": 3})";
  Assumptions base;
  base.advancing = Advancing::interest;
  const Assumptions a = load_assumptions(path, base);
  EXPECT_TRUE(same_curve(a.prepay, parse_prepay("psa:150")));
  EXPECT_EQ(a.lag_months, 3);
  EXPECT_EQ(a.advancing, Advancing::interest);
}

TEST_F(AssumptionsFileOnDisk, ErrorsNameThePath) {
  const std::string missing = (dir_ / "missing.json").string();
  try {
    load_assumptions(missing);
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, missing);
    EXPECT_EQ(std::string(e.what()),
              missing + ": cannot open the assumptions file (No such file or directory)");
  }
  try {
    load_assumptions(dir_.string());
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, dir_.string());
    EXPECT_NE(std::string_view(e.what()).find("cannot read the assumptions file"),
              std::string_view::npos)
        << e.what();
  }
  const std::string bad = (dir_ / "bad.json").string();
  std::ofstream(bad) << "{\"severity\": 45,\n \"lag\": 3}";
  try {
    load_assumptions(bad);
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(std::string(e.what()).rfind(bad + " key lag, value '3': unknown key", 0), 0u)
        << e.what();
  }
  const std::string twice = (dir_ / "twice.json").string();
  std::ofstream(twice) << "{\"severity\": 45,\n \"severity\": 50}";
  try {
    load_assumptions(twice);
    FAIL() << "accepted";
  } catch (const AssumptionError& e) {
    EXPECT_EQ(e.source, twice);
    EXPECT_EQ(e.key, "severity");
    EXPECT_EQ(std::string(e.what()),
              twice + " key severity: duplicate key; each key may appear only once");
  }
}

}  // namespace
