// Tests of the demo tape generator: same seed, same bytes; profiles share the deal terms and differ
// in underwriting; the committed demo-pools files are what the generator writes now; both demo
// tapes read clean (the seller-coded one through its map); the bad tape rejects what was planted.
#include <gtest/gtest.h>

#include <cctype>
#include <cmath>
#include <cstddef>
#include <fstream>
#include <map>
#include <optional>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "tape/tape.h"

namespace poolbid {
namespace {

const std::string kDemoPools = std::string(POOLBID_SOURCE_DIR) + "/demo-pools/";

// The committed demo files and the options that write them (demo-pools/README.md has the same
// commands).
DemoTapeOptions brindlecote_options() {
  return {.loans = 2000, .profile = DemoProfile::strict, .seed = 2026,
          .layout = DemoLayout::canonical};
}
DemoTapeOptions sallowmere_options() {
  return {.loans = 2000, .profile = DemoProfile::loose, .seed = 2026,
          .layout = DemoLayout::seller_coded};
}
DemoTapeOptions bad_tape_options() {
  return {.loans = 40, .profile = DemoProfile::strict, .seed = 7,
          .layout = DemoLayout::canonical, .bad_rows = 14};
}

std::string demo_text(const DemoTapeOptions& options) {
  std::ostringstream out;
  write_demo_tape(out, options);
  return out.str();
}

std::string file_text(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  EXPECT_TRUE(in) << "cannot open " << path;
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

// A clean demo tape (no quoted cells) as rows of cells, header first.
std::vector<std::vector<std::string>> split_csv(const std::string& text) {
  std::vector<std::vector<std::string>> rows;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) {
    std::vector<std::string> cells(1);
    for (char ch : line) {
      if (ch == ',') {
        cells.emplace_back();
      } else {
        cells.back() += ch;
      }
    }
    rows.push_back(std::move(cells));
  }
  return rows;
}

// Column `name` of a split tape, data rows only.
std::vector<std::string> column(const std::vector<std::vector<std::string>>& rows,
                                const std::string& name) {
  std::size_t c = 0;
  while (c < rows.at(0).size() && rows[0][c] != name) ++c;
  EXPECT_LT(c, rows[0].size()) << "no column " << name;
  std::vector<std::string> values;
  for (std::size_t r = 1; r < rows.size(); ++r) values.push_back(rows[r].at(c));
  return values;
}

double mean_of(const std::vector<std::string>& values) {
  double sum = 0;
  for (const std::string& v : values) sum += std::stod(v);
  return sum / static_cast<double>(values.size());
}

TEST(DemoTape, SameSeedWritesTheSameBytes) {
  DemoTapeOptions o;
  o.loans = 500;
  o.seed = 99;
  for (DemoProfile profile : {DemoProfile::strict, DemoProfile::loose})
    for (DemoLayout layout : {DemoLayout::canonical, DemoLayout::seller_coded}) {
      o.profile = profile;
      o.layout = layout;
      EXPECT_EQ(demo_text(o), demo_text(o));
    }
  DemoTapeOptions other = o;
  other.seed = 100;
  EXPECT_NE(demo_text(o), demo_text(other));
}

TEST(DemoTape, WritesTheAskedNumberOfLoans) {
  DemoTapeOptions o;
  o.loans = 123;
  const auto rows = split_csv(demo_text(o));
  ASSERT_EQ(rows.size(), 124u);  // header + loans
  for (const auto& row : rows) EXPECT_EQ(row.size(), rows[0].size());
  EXPECT_EQ(rows[1][0], "BHL-000001");
  EXPECT_EQ(rows[123][0], "BHL-000123");
  EXPECT_EQ(column(rows, "seller")[0], "Brindlecote Home Loans");
}

TEST(DemoTape, CanonicalHeaderIsEveryFieldButTheDateTerms) {
  DemoTapeOptions o;
  o.loans = 1;
  const auto header = split_csv(demo_text(o)).at(0);
  std::vector<std::string> expected;
  for (std::size_t i = 0; i < kFieldCount; ++i) {
    const auto f = static_cast<Field>(i);
    if (f != Field::maturity_date && f != Field::first_payment_date)
      expected.emplace_back(field_name(f));
  }
  EXPECT_EQ(header, expected);
}

TEST(DemoTape, SellerCodedHeadersAreNoCanonicalName) {
  DemoTapeOptions o;
  o.loans = 1;
  o.layout = DemoLayout::seller_coded;
  const auto rows = split_csv(demo_text(o));
  for (const std::string& header : rows.at(0)) {
    std::string lower;
    for (char ch : header) lower += static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
    EXPECT_FALSE(field_from_name(lower)) << header;
  }
}

TEST(DemoTape, ProfilesShareDealTermsAndDifferInUnderwriting) {
  DemoTapeOptions o;
  o.loans = 1000;
  o.seed = 2026;
  o.profile = DemoProfile::strict;
  const auto strict = split_csv(demo_text(o));
  o.profile = DemoProfile::loose;
  const auto loose = split_csv(demo_text(o));
  for (const char* name : {"current_balance", "original_balance", "note_rate", "servicing_fee",
                           "original_term", "remaining_term", "loan_age", "amortization_type",
                           "io_months", "balloon_month", "arm_first_reset", "arm_lifetime_cap",
                           "property_type", "state"})
    EXPECT_EQ(column(strict, name), column(loose, name)) << name;
  const auto strict_scores = column(strict, "credit_score");
  const auto loose_scores = column(loose, "credit_score");
  std::size_t same = 0;
  for (std::size_t i = 0; i < strict_scores.size(); ++i) same += strict_scores[i] == loose_scores[i];
  EXPECT_LT(same, strict_scores.size() / 10);
}

TEST(DemoTape, StrictPoolHasBetterCreditThanLoose) {
  DemoTapeOptions o;
  o.loans = 2000;
  o.seed = 2026;
  const auto strict = split_csv(demo_text(o));
  o.profile = DemoProfile::loose;
  const auto loose = split_csv(demo_text(o));
  const double strict_score = mean_of(column(strict, "credit_score"));
  const double loose_score = mean_of(column(loose, "credit_score"));
  EXPECT_GT(strict_score, loose_score + 40);
  EXPECT_NEAR(strict_score, 765, 5);  // N(765, 30) clipped 680-840
  EXPECT_NEAR(loose_score, 690, 6);   // N(690, 45) clipped 560-820
  const double strict_ltv = mean_of(column(strict, "original_ltv"));
  const double loose_ltv = mean_of(column(loose, "original_ltv"));
  EXPECT_LT(strict_ltv, loose_ltv - 10);
  EXPECT_LT(mean_of(column(strict, "dti")), mean_of(column(loose, "dti")));
  for (const std::string& v : column(strict, "credit_score")) {
    EXPECT_GE(std::stod(v), 680);
    EXPECT_LE(std::stod(v), 840);
  }
  for (const auto* tape : {&strict, &loose}) {
    const auto ltv = column(*tape, "original_ltv");
    const auto cltv = column(*tape, "combined_ltv");
    for (std::size_t i = 0; i < ltv.size(); ++i) EXPECT_GE(std::stod(cltv[i]), std::stod(ltv[i]));
  }
}

TEST(DemoTape, MixesLookLikeAResidentialPool) {
  DemoTapeOptions o;
  o.loans = 20000;
  o.seed = 5;
  const auto rows = split_csv(demo_text(o));
  std::map<std::string, int> amortization, term;
  for (const std::string& v : column(rows, "amortization_type")) ++amortization[v];
  for (const std::string& v : column(rows, "original_term")) ++term[v];
  const double n = 20000;
  EXPECT_NEAR(amortization["arm"] / n, 0.08, 0.01);
  EXPECT_NEAR(amortization["interest_only"] / n, 0.04, 0.01);
  EXPECT_NEAR(amortization["balloon"] / n, 0.01, 0.005);
  EXPECT_GT(term["360"] / n, 0.75);
  EXPECT_GT(term["180"], 0);
  EXPECT_GT(term["240"], 0);
  const double balance = mean_of(column(rows, "original_balance"));
  EXPECT_NEAR(balance, 320000, 15000);
  for (const std::string& v : column(rows, "note_rate")) {
    const double eighths = std::stod(v) * 8;
    EXPECT_EQ(eighths, std::round(eighths)) << v;  // 1/8 steps
  }
}

// The committed files are byte for byte what the generator writes now.
TEST(DemoTape, CommittedDemoFilesAreCurrent) {
  EXPECT_EQ(file_text(kDemoPools + "brindlecote-strict.csv"), demo_text(brindlecote_options()))
      << "regenerate demo-pools/ with the commands in demo-pools/README.md";
  EXPECT_EQ(file_text(kDemoPools + "sallowmere-loose.csv"), demo_text(sallowmere_options()))
      << "regenerate demo-pools/ with the commands in demo-pools/README.md";
  EXPECT_EQ(file_text(kDemoPools + "bad-tape.csv"), demo_text(bad_tape_options()))
      << "regenerate demo-pools/ with the commands in demo-pools/README.md";
}

TEST(DemoTape, BadRowsQuoteTheCommaAndDropOneCellOfTheRaggedRow) {
  const std::string text = demo_text(bad_tape_options());
  EXPECT_NE(text.find(",\"12O,000\","), std::string::npos);
  std::istringstream in(text);
  std::string line;
  std::map<std::size_t, int> widths;  // commas per line -> lines
  while (std::getline(in, line)) {
    std::size_t commas = 0;
    bool quoted = false;
    for (char ch : line) {
      if (ch == '"') quoted = !quoted;
      commas += ch == ',' && !quoted;
    }
    ++widths[commas];
  }
  ASSERT_EQ(widths.size(), 2u);
  EXPECT_EQ(widths.begin()->second, 1);  // one ragged row, one cell short
  EXPECT_EQ(widths.rbegin()->first, widths.begin()->first + 1);
}

// ---- Read back through the tape reader ----------------------------------------------------------

TapeRead read_demo(const DemoTapeOptions& options, const ReadOptions& read = {}) {
  return read_tape_text(demo_text(options), "demo.csv", read);
}

ReadOptions sallowmere_read_options() {
  ReadOptions read;
  read.map = load_column_map(kDemoPools + "sallowmere.map.json");
  return read;
}

TEST(DemoTapeRead, CommittedDemoTapesReadWithNoRejects) {
  const TapeRead strict = read_tape(kDemoPools + "brindlecote-strict.csv");
  EXPECT_EQ(strict.rows_read, 2000u);
  EXPECT_EQ(strict.rows_rejected, 0u);
  EXPECT_EQ(strict.rows_accepted(), 2000u);
  EXPECT_EQ(strict.rows_with_warnings, 0u);
  const TapeRead loose =
      read_tape(kDemoPools + "sallowmere-loose.csv", sallowmere_read_options());
  EXPECT_EQ(loose.rows_read, 2000u);
  EXPECT_EQ(loose.rows_rejected, 0u);
  EXPECT_EQ(loose.rows_accepted(), 2000u);
  EXPECT_EQ(loose.rows_with_warnings, 0u);
  ASSERT_EQ(loose.loans.seller_names.size(), 1u);
  EXPECT_EQ(loose.loans.seller_names[0], "Sallowmere Funding");
}

TEST(DemoTapeRead, MapNamesEverySellerHeader) {
  const ColumnMap map = load_column_map(kDemoPools + "sallowmere.map.json");
  std::set<std::string> mapped;
  for (const auto& [field, headers] : map.columns) mapped.insert(headers.begin(), headers.end());
  DemoTapeOptions o = sallowmere_options();
  o.loans = 1;
  const auto rows = split_csv(demo_text(o));
  for (const std::string& header : rows.at(0)) EXPECT_TRUE(mapped.count(header)) << header;
  ASSERT_TRUE(map.cutoff);
  EXPECT_EQ(*map.cutoff, o.cutoff);
}

// The seller's layout (dates, decimals, letter codes) reads to the same loans as our layout.
TEST(DemoTapeRead, SellerCodedLayoutReadsToTheSameLoansAsCanonical) {
  DemoTapeOptions o = sallowmere_options();
  o.loans = 3000;
  o.seed = 11;
  const TapeRead coded = read_demo(o, sallowmere_read_options());
  o.layout = DemoLayout::canonical;
  const TapeRead canonical = read_demo(o);
  ASSERT_EQ(coded.rows_rejected, 0u);
  ASSERT_EQ(canonical.rows_rejected, 0u);
  const LoanArrays& a = coded.loans;
  const LoanArrays& b = canonical.loans;
  ASSERT_EQ(a.size(), b.size());
  auto same = [](double x, double y) { return (std::isnan(x) && std::isnan(y)) || x == y; };
  auto close = [](double x, double y) {
    return (std::isnan(x) && std::isnan(y)) || std::fabs(x - y) < 1e-12;
  };
  for (std::size_t i = 0; i < a.size(); ++i) {
    SCOPED_TRACE(b.loan_id[i]);
    EXPECT_EQ(a.loan_id[i], b.loan_id[i]);
    EXPECT_TRUE(same(a.current_balance[i], b.current_balance[i]));
    EXPECT_TRUE(same(a.original_balance[i], b.original_balance[i]));
    EXPECT_TRUE(close(a.note_rate[i], b.note_rate[i]));
    EXPECT_TRUE(close(a.servicing_fee[i], b.servicing_fee[i]));
    EXPECT_EQ(a.original_term[i], b.original_term[i]);
    EXPECT_EQ(a.remaining_term[i], b.remaining_term[i]);
    EXPECT_EQ(a.age[i], b.age[i]);
    EXPECT_EQ(a.amortization[i], b.amortization[i]);
    EXPECT_EQ(a.io_months[i], b.io_months[i]);
    EXPECT_EQ(a.balloon_month[i], b.balloon_month[i]);
    EXPECT_EQ(a.arm_index_names[a.arm_index[i]], b.arm_index_names[b.arm_index[i]]);
    EXPECT_TRUE(close(a.arm_margin[i], b.arm_margin[i]));
    EXPECT_TRUE(close(a.arm_periodic_cap[i], b.arm_periodic_cap[i]));
    EXPECT_TRUE(close(a.arm_lifetime_cap[i], b.arm_lifetime_cap[i]));
    EXPECT_TRUE(close(a.arm_floor[i], b.arm_floor[i]));
    EXPECT_EQ(a.arm_first_reset[i], b.arm_first_reset[i]);
    EXPECT_EQ(a.arm_reset_period[i], b.arm_reset_period[i]);
    EXPECT_TRUE(same(a.credit_score[i], b.credit_score[i]));
    EXPECT_TRUE(close(a.original_ltv[i], b.original_ltv[i]));
    EXPECT_TRUE(close(a.combined_ltv[i], b.combined_ltv[i]));
    EXPECT_TRUE(close(a.dti[i], b.dti[i]));
    EXPECT_TRUE(same(a.property_value[i], b.property_value[i]));
    EXPECT_EQ(a.property_value_date[i], b.property_value_date[i]);
    EXPECT_EQ(a.occupancy[i], b.occupancy[i]);
    EXPECT_EQ(a.property_type[i], b.property_type[i]);
    EXPECT_EQ(a.purpose[i], b.purpose[i]);
    EXPECT_EQ(a.documentation[i], b.documentation[i]);
    EXPECT_EQ(a.state[i], b.state[i]);
    EXPECT_EQ(a.delinquency[i], b.delinquency[i]);
    if (::testing::Test::HasFailure()) break;
  }
}

// Data rows the generator plants problems in: rows 2..n evenly, rejects first, then two warnings.
// Returned as tape row numbers (header = row 1).
std::vector<std::size_t> planted_rows(std::size_t loans, std::size_t planted) {
  std::vector<std::size_t> rows;
  for (std::size_t j = 0; j < planted; ++j) rows.push_back(1 + j * (loans - 1) / planted + 2);
  return rows;
}

// What each planted reject is, in the order the generator cycles through them.
struct Planted {
  std::optional<Field> field;  // nullopt: a whole-row problem (ragged row)
  const char* what;
};
const Planted kPlanted[12] = {
    {Field::current_balance, "negative balance"},
    {Field::note_rate, "note rate 31%"},
    {Field::credit_score, "credit score 910"},
    {Field::state, "state XX"},
    {Field::loan_id, "duplicate loan id"},
    {Field::current_balance, "balance 12O,000"},
    {Field::remaining_term, "remaining term above original term"},
    {Field::loan_id, "empty loan id"},
    {Field::original_ltv, "LTV 350%"},
    {Field::dti, "DTI 140%"},
    {Field::occupancy, "occupancy castle"},
    {std::nullopt, "ragged row"},
};

void expect_planted(const TapeRead& tape, std::size_t loans, std::size_t bad_rows,
                    bool seller_coded) {
  const std::vector<std::size_t> rows = planted_rows(loans, bad_rows + 2);
  EXPECT_EQ(tape.rows_read, loans);
  EXPECT_EQ(tape.rows_rejected, bad_rows);
  EXPECT_EQ(tape.rows_accepted() + tape.rows_rejected, tape.rows_read);
  std::map<std::size_t, std::vector<const RowProblem*>> rejects, warnings;
  for (const RowProblem& p : tape.problems) (p.reject ? rejects : warnings)[p.row].push_back(&p);
  std::set<std::size_t> expected_rejects(rows.begin(), rows.begin() + bad_rows);
  std::set<std::size_t> got_rejects;
  for (const auto& [row, problems] : rejects) got_rejects.insert(row);
  EXPECT_EQ(got_rejects, expected_rejects);
  for (std::size_t j = 0; j < bad_rows; ++j) {
    const Planted& planted = kPlanted[j % 12];
    SCOPED_TRACE(::testing::Message() << "row " << rows[j] << ": " << planted.what);
    const auto it = rejects.find(rows[j]);
    ASSERT_NE(it, rejects.end());
    bool found = false;
    for (const RowProblem* p : it->second) {
      // A date-term tape states the remaining term as a maturity date.
      const bool term_field = planted.field == Field::remaining_term &&
                              (p->field == Field::remaining_term ||
                               (seller_coded && p->field == Field::maturity_date));
      found |= p->field == planted.field || term_field;
    }
    EXPECT_TRUE(found);
  }
  // The two warning-only rows are accepted with a warning: terms off by 3 months, CLTV < LTV.
  for (std::size_t j = bad_rows; j < bad_rows + 2; ++j) {
    SCOPED_TRACE(::testing::Message() << "warning row " << rows[j]);
    EXPECT_FALSE(rejects.count(rows[j]));
    EXPECT_TRUE(warnings.count(rows[j]));
  }
}

TEST(DemoTapeRead, BadTapeRejectsExactlyThePlantedRows) {
  const TapeRead tape = read_tape(kDemoPools + "bad-tape.csv");
  expect_planted(tape, 40, 14, false);
}

TEST(DemoTapeRead, SellerCodedBadRowsRejectThroughTheMap) {
  DemoTapeOptions o = sallowmere_options();
  o.loans = 100;
  o.bad_rows = 12;
  expect_planted(read_demo(o, sallowmere_read_options()), 100, 12, true);
}

}  // namespace
}  // namespace poolbid
