// Tests of report/: the JSON documents parse back with every documented key, NaN is null, the
// text reports carry the counts and the caution, and odd bytes in a cell never throw.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "report/format.h"
#include "report/report.h"
#include "tape/tape.h"
#include "tests/report/report_support.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using nlohmann::json;

using testing_support::contains;
using testing_support::kNaN;
using testing_support::line_starting;
using testing_support::make_loans;

// Seven data rows and a blank line: four accepted (one with a warning), three rejected. Row 5's
// loan id holds bytes that are not UTF-8 and an escape character.
TapeRead sample_tape() {
  TapeRead t;
  t.file = "pool.csv";
  t.cutoff = Date{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{1}};
  t.loans = make_loans({
      {.id = "L001", .upb = 250'000, .rate = 0.065, .score = 740, .ltv = 0.80, .cltv = 0.80},
      {.id = "L002", .upb = 1'250'000.5, .rate = 0.07125, .score = 700, .ltv = 0.75,
       .cltv = 0.75, .state = "TX"},
      {.id = "L003", .upb = 90'000, .rate = 0.05875, .score = kNaN, .ltv = 0.95, .cltv = 0.95,
       .state = "FL"},
      {.id = "L004", .upb = 400'000, .rate = 0.06, .score = 790, .ltv = kNaN, .cltv = kNaN},
  });
  t.problems = {
      {3, "L002", Field::dti, "DTI", "", "DTI not given", false},
      {5, "L\xff\xfe\x1b[31m05", Field::note_rate, "NOTE_RT", "31", "note rate 31% outside 0-25%",
       true},
      {5, "L\xff\xfe\x1b[31m05", Field::state, "ST", "ZZ", "not a US state code", true},
      {7, "", std::nullopt, "", "a,b", "row has 2 cells, header has 33", true},
      {8, "L008", Field::current_balance, "CURR_UPB", "12O,000", "not a number", true},
  };
  t.notes = {"note_rate: unit not declared; values above 1 read as percent"};
  t.rows_read = 7;
  t.rows_rejected = 3;
  t.rows_with_warnings = 1;
  t.blank_lines = 1;
  t.upb_accepted = 1'990'000.5;
  t.upb_rejected = 310'000;
  return t;
}

void expect_keys(const json& object, const std::vector<std::string>& keys) {
  ASSERT_TRUE(object.is_object());
  for (const std::string& key : keys) EXPECT_TRUE(object.contains(key)) << "missing key " << key;
  EXPECT_EQ(object.size(), keys.size()) << object.dump();
}

const std::vector<std::string> kProblemKeys = {"row",    "loan_id", "field",   "column",
                                               "value",  "reason",  "severity"};

// The space-separated words of a line.
std::vector<std::string> words(const std::string& line) {
  std::vector<std::string> out;
  std::size_t at = line.find_first_not_of(' ');
  while (at != std::string::npos) {
    const std::size_t end = line.find(' ', at);
    out.push_back(line.substr(at, end - at));
    at = line.find_first_not_of(' ', end);
  }
  return out;
}

// A label and value alone on one line with only spaces between: "  rows read      7".
bool has_pair(const std::string& text, const std::string& label, const std::string& value) {
  std::vector<std::string> expected = words(label);
  expected.push_back(value);
  return words(line_starting(text, "  " + label + " ")) == expected;
}

TEST(CheckJson, HasEveryKeyAndParsesBack) {
  const TapeRead tape = sample_tape();
  std::string text;
  ASSERT_NO_THROW(text = check_json(tape));
  const json doc = json::parse(text);
  expect_keys(doc, {"file", "cutoff_date", "rows_read", "rows_accepted", "rows_rejected",
                    "rows_with_warnings", "blank_lines", "upb_accepted", "upb_rejected", "notes",
                    "problems", "caution"});
  EXPECT_EQ(doc["file"], "pool.csv");
  EXPECT_EQ(doc["cutoff_date"], "2026-12-01");
  EXPECT_EQ(doc["rows_read"], 7);
  EXPECT_EQ(doc["rows_accepted"], 4);
  EXPECT_EQ(doc["rows_rejected"], 3);
  EXPECT_EQ(doc["rows_with_warnings"], 1);
  EXPECT_EQ(doc["blank_lines"], 1);
  EXPECT_DOUBLE_EQ(doc["upb_accepted"].get<double>(), 1'990'000.5);
  EXPECT_DOUBLE_EQ(doc["upb_rejected"].get<double>(), 310'000);
  EXPECT_EQ(doc["notes"].size(), 1u);
  EXPECT_EQ(doc["caution"], std::string(caution_text()));

  ASSERT_EQ(doc["problems"].size(), 5u);
  for (const json& p : doc["problems"]) expect_keys(p, kProblemKeys);
  EXPECT_EQ(doc["problems"][0]["severity"], "warning");
  EXPECT_EQ(doc["problems"][0]["field"], "dti");
  EXPECT_EQ(doc["problems"][1]["severity"], "reject");
  EXPECT_EQ(doc["problems"][1]["row"], 5);
  EXPECT_EQ(doc["problems"][1]["column"], "NOTE_RT");
  EXPECT_EQ(doc["problems"][1]["value"], "31");
  EXPECT_TRUE(doc["problems"][3]["field"].is_null());  // a whole-row problem
  // The bytes that are not UTF-8 come back as U+FFFD; the escape character is kept, escaped.
  EXPECT_EQ(doc["problems"][1]["loan_id"], "L\xEF\xBF\xBD\xEF\xBF\xBD\x1b[31m05");
}

TEST(CheckJson, NaNIsNullAndNoCutoffIsNull) {
  TapeRead tape = sample_tape();
  tape.cutoff.reset();
  tape.upb_rejected = kNaN;
  const json doc = json::parse(check_json(tape));
  EXPECT_TRUE(doc["cutoff_date"].is_null());
  EXPECT_TRUE(doc["upb_rejected"].is_null());
}

TEST(CheckText, CountsProblemsAndCaution) {
  const std::string text = check_text(sample_tape());
  EXPECT_TRUE(contains(text, "poolbid check: pool.csv")) << text;
  EXPECT_TRUE(contains(text, "cut-off date: 2026-12-01")) << text;
  EXPECT_TRUE(has_pair(text, "rows read", "7")) << text;
  EXPECT_TRUE(has_pair(text, "rows accepted", "4")) << text;
  EXPECT_TRUE(has_pair(text, "rows rejected", "3")) << text;
  EXPECT_TRUE(has_pair(text, "rows with warnings", "1")) << text;
  EXPECT_TRUE(has_pair(text, "blank lines skipped", "1")) << text;
  EXPECT_TRUE(has_pair(text, "UPB accepted", "$1,990,000.50")) << text;
  EXPECT_TRUE(has_pair(text, "UPB rejected", "$310,000.00")) << text;
  EXPECT_TRUE(contains(text, "problems: 4 rejects, 1 warning")) << text;
  EXPECT_TRUE(contains(text, "REJECT")) << text;
  EXPECT_TRUE(contains(text, "not a US state code")) << text;
  EXPECT_TRUE(contains(text, "(whole row)")) << text;
  EXPECT_TRUE(contains(text, std::string(caution_text()))) << text;
  // Terminal-safe: no raw escape character, no stray bytes; both shown visibly instead.
  EXPECT_FALSE(contains(text, "\x1b")) << text;
  EXPECT_FALSE(contains(text, "\xff")) << text;
  EXPECT_TRUE(contains(text, "L\xEF\xBF\xBD\xEF\xBF\xBD\\x1B[31m05")) << text;
}

TEST(CheckText, ProblemsInRowOrderWithRejectsMarked) {
  const std::string text = check_text(sample_tape());
  const std::size_t warning = text.find("DTI not given");
  const std::size_t reject = text.find("note rate 31%");
  const std::size_t last = text.find("not a number");
  ASSERT_NE(warning, std::string::npos);
  EXPECT_LT(warning, reject);
  EXPECT_LT(reject, last);
  const std::size_t line_start = text.rfind('\n', reject) + 1;
  EXPECT_TRUE(contains(text.substr(line_start, reject - line_start), "REJECT"));
  const std::size_t warn_start = text.rfind('\n', warning) + 1;
  EXPECT_TRUE(contains(text.substr(warn_start, warning - warn_start), "warn"));
}

TEST(StratsJson, HasEveryKeyAndNaNIsNull) {
  const TapeRead tape = sample_tape();
  const Strats strats = stratify(tape.loans);
  const json doc = json::parse(strats_json(tape, strats));
  expect_keys(doc, {"file", "cutoff_date", "loans", "upb", "average_upb", "wac", "wam", "wala",
                    "credit_score", "original_ltv", "combined_ltv", "dti", "tables",
                    "rows_read", "rows_accepted", "rows_rejected", "upb_rejected", "rejects",
                    "caution"});
  for (const char* key :
       {"wac", "wam", "wala", "credit_score", "original_ltv", "combined_ltv", "dti"})
    expect_keys(doc[key], {"value", "missing"});
  EXPECT_EQ(doc["loans"], 4);
  EXPECT_DOUBLE_EQ(doc["upb"].get<double>(), 1'990'000.5);
  EXPECT_EQ(doc["credit_score"]["missing"], 1);
  EXPECT_EQ(doc["original_ltv"]["missing"], 1);
  // Rates are decimals: hand-computed WAC = (250,000x0.065 + 1,250,000.5x0.07125 + 90,000x0.05875
  // + 400,000x0.06) / 1,990,000.5 = (16,250 + 89,062.535625 + 5,287.5 + 24,000) / 1,990,000.5
  // = 134,600.035625 / 1,990,000.5 = 0.0676382...
  EXPECT_NEAR(doc["wac"]["value"].get<double>(), 134'600.035625 / 1'990'000.5, 1e-12);

  ASSERT_EQ(doc["tables"].size(), strats.tables.size());
  for (const json& t : doc["tables"]) {
    expect_keys(t, {"title", "rows"});
    for (const json& r : t["rows"])
      expect_keys(r, {"label", "count", "upb", "upb_share", "wac", "wa_score", "wa_ltv"});
  }
  // Credit score table: L003 has no score, so the "missing" row's WA score is null.
  const json& score = doc["tables"][0];
  EXPECT_EQ(score["title"], "credit score");
  const json& missing = score["rows"].back();
  EXPECT_EQ(missing["label"], "missing");
  EXPECT_TRUE(missing["wa_score"].is_null());
  EXPECT_DOUBLE_EQ(missing["wa_ltv"].get<double>(), 0.95);

  EXPECT_EQ(doc["rows_rejected"], 3);
  ASSERT_EQ(doc["rejects"].size(), 4u);  // every rejecting problem, warnings left out
  for (const json& p : doc["rejects"]) {
    expect_keys(p, kProblemKeys);
    EXPECT_EQ(p["severity"], "reject");
  }
  EXPECT_EQ(doc["caution"], std::string(caution_text()));
}

TEST(StratsJson, EmptyPoolIsAllNull) {
  TapeRead tape;
  tape.file = "empty.csv";
  const Strats strats = stratify(tape.loans);
  const json doc = json::parse(strats_json(tape, strats));
  EXPECT_EQ(doc["loans"], 0);
  EXPECT_TRUE(doc["average_upb"].is_null());
  EXPECT_TRUE(doc["wac"]["value"].is_null());
  EXPECT_EQ(doc["wac"]["missing"], 0);
  EXPECT_TRUE(doc["cutoff_date"].is_null());
  for (const json& t : doc["tables"]) EXPECT_TRUE(t["rows"].empty());
}

TEST(StratsText, SummaryTablesRejectsAndCaution) {
  const TapeRead tape = sample_tape();
  const std::string text = strats_text(tape, stratify(tape.loans));
  EXPECT_TRUE(contains(text, "poolbid strats: pool.csv")) << text;
  EXPECT_TRUE(contains(text, "$1,990,000.50")) << text;
  EXPECT_TRUE(contains(text, "6.764%")) << text;  // WAC, 3 places in percent
  EXPECT_TRUE(contains(text, "(1 missing)")) << text;
  EXPECT_TRUE(contains(text, "state (top 10 by UPB)")) << text;
  EXPECT_TRUE(contains(text, "3 rows rejected (UPB $310,000.00) are not in these strats; "
                             "`poolbid check` lists them")) << text;
  EXPECT_TRUE(contains(text, "row has 2 cells")) << text;
  // Both of row 5's reasons on one line.
  EXPECT_TRUE(contains(text, "note rate 31% outside 0-25%; not a US state code")) << text;
  EXPECT_TRUE(contains(text, std::string(caution_text()))) << text;
  EXPECT_FALSE(contains(text, "\x1b")) << text;
}

TEST(StratsText, NaNShowsAsDash) {
  const TapeRead tape = sample_tape();
  const std::string text = strats_text(tape, stratify(tape.loans));
  // The credit score table's "missing" row: 1 loan, $90,000, 4.52% of UPB, 5.875%, no score,
  // LTV 95.0%. hand-computed share: 90,000 / 1,990,000.5 = 4.5226%.
  EXPECT_EQ(words(line_starting(text, "  missing ")),
            (std::vector<std::string>{"missing", "1", "90,000", "4.52", "5.875", "-", "95.0"}))
      << text;
}

TEST(StratsText, ListsTwentyRejectsThenCountsTheRest) {
  TapeRead tape = sample_tape();
  tape.problems.clear();
  for (std::size_t row = 2; row < 27; ++row)
    tape.problems.push_back({row, "X" + std::to_string(row), Field::note_rate, "NOTE_RT", "abc",
                             "not a number", true});
  tape.rows_rejected = 25;
  const std::string text = strats_text(tape, stratify(tape.loans));
  EXPECT_TRUE(contains(text, "X21")) << text;    // the 20th
  EXPECT_FALSE(contains(text, "X22")) << text;   // the 21st
  EXPECT_TRUE(contains(text, "... and 5 more")) << text;
}

TEST(StratsText, EmptyPoolDoesNotThrow) {
  TapeRead tape;
  tape.file = "empty.csv";
  std::string text;
  ASSERT_NO_THROW(text = strats_text(tape, stratify(tape.loans)));
  EXPECT_TRUE(contains(text, "(no loans)")) << text;
  EXPECT_TRUE(contains(text, "No rows rejected")) << text;
  EXPECT_TRUE(contains(text, std::string(caution_text()))) << text;
}

TEST(Format, ThousandsAndDollars) {
  EXPECT_EQ(detail::with_thousands(1'234'567.891, 2), "1,234,567.89");
  EXPECT_EQ(detail::with_thousands(999, 0), "999");
  EXPECT_EQ(detail::with_thousands(1000, 0), "1,000");
  EXPECT_EQ(detail::with_thousands(-1'234'567.2, 0), "-1,234,567");
  EXPECT_EQ(detail::with_thousands(-0.001, 2), "0.00");
  EXPECT_EQ(detail::with_thousands(kNaN, 2), "-");
  EXPECT_EQ(detail::dollars(310'000), "$310,000.00");
  EXPECT_EQ(detail::dollars(-5.5), "-$5.50");
  EXPECT_EQ(detail::dollars(kNaN), "-");
}

TEST(Format, DisplayTextIsTerminalSafe) {
  EXPECT_EQ(detail::display_text("abc", 10), "abc");
  EXPECT_EQ(detail::display_text("", 10, "(blank)"), "(blank)");
  EXPECT_EQ(detail::display_text("a\nb\tc", 10), "a\\nb\\tc");
  EXPECT_EQ(detail::display_text("\xC3\xA9t\xC3\xA9", 10), "\xC3\xA9t\xC3\xA9");  // été kept
  EXPECT_EQ(detail::display_text("\xC0\xAF", 10), "\xEF\xBF\xBD\xEF\xBF\xBD");     // overlong
  EXPECT_EQ(detail::display_text("\xE2\x82", 10), "\xEF\xBF\xBD\xEF\xBF\xBD");     // cut short
  EXPECT_EQ(detail::display_text("\xC2\x9B", 10), "\\u009B");                       // C1 control
  EXPECT_EQ(detail::display_text("abcdefghijkl", 8), "abcde...");
  EXPECT_EQ(detail::display_width("\xC3\xA9t\xC3\xA9"), 3u);
}

}  // namespace
}  // namespace poolbid
