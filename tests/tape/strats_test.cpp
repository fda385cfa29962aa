// Tests of stratify(): weighted averages that skip missing values, band edges, category order,
// top-10 states, an empty pool. Expected values are worked by hand in the comments.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "tape/tape.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using namespace testing_support;

// Six loans, $1,200,000 in all. Loan C has no credit score, loan D no LTV or CLTV, loan E no DTI.
// Several sit exactly on a band edge: score 620 and 780, LTV 60.00%, 80.00% and 95.00%,
// DTI 20.00%, 30.00%, 36.00%, 43.00% and 50.00%, balance $100,000.
//
//   id  UPB      rate   rem  age  score  LTV     CLTV   DTI   state  occupancy
//   A   100,000  6.00%  300   60  620    80.00%  80%    30%   CA     owner
//   B   200,000  6.50%  340   20  700    75.00%  90%    36%   CA     owner
//   C   300,000  7.00%  350   10  -      60.00%  60%    43%   TX     investor
//   D   400,000  5.50%  360    0  780    -       -      20%   NY     second_home
//   E    50,000  7.25%  200  160  619    95.00%  95%    -     FL     unknown
//   F   150,000  6.75%  180  180  659    80.01%  85%    50%   CA     owner
std::vector<TestLoan> six_loans() {
  return {
      {"A", 100'000, 0.0600, 300, 60, 620, 0.80, 0.80, 0.30, "CA", Occupancy::owner},
      {"B", 200'000, 0.0650, 340, 20, 700, 0.75, 0.90, 0.36, "CA", Occupancy::owner},
      {"C", 300'000, 0.0700, 350, 10, kNaN, 0.60, 0.60, 0.43, "TX", Occupancy::investor},
      {"D", 400'000, 0.0550, 360, 0, 780, kNaN, kNaN, 0.20, "NY", Occupancy::second_home},
      {"E", 50'000, 0.0725, 200, 160, 619, 0.95, 0.95, kNaN, "FL", Occupancy::unknown,
       Delinquency::dq30},
      {"F", 150'000, 0.0675, 180, 180, 659, 0.8001, 0.85, 0.50, "CA", Occupancy::owner},
  };
}

const StratTable& table_titled(const Strats& s, const std::string& title) {
  for (const StratTable& t : s.tables)
    if (t.title == title) return t;
  ADD_FAILURE() << "no table " << title;
  static const StratTable none;
  return none;
}

std::vector<std::string> labels(const StratTable& t) {
  std::vector<std::string> out;
  for (const StratRow& r : t.rows) out.push_back(r.label);
  return out;
}

const StratRow& row_labelled(const StratTable& t, const std::string& label) {
  for (const StratRow& r : t.rows)
    if (r.label == label) return r;
  ADD_FAILURE() << "no row " << label << " in " << t.title;
  static const StratRow none{};
  return none;
}

TEST(Stratify, PoolWeightedAverages) {
  const Strats s = stratify(make_loans(six_loans()));
  EXPECT_EQ(s.loans, 6u);
  // hand-computed: 100 + 200 + 300 + 400 + 50 + 150 = 1,200 thousand; average 1,200,000 / 6.
  EXPECT_DOUBLE_EQ(s.upb, 1'200'000);
  EXPECT_DOUBLE_EQ(s.average_upb, 200'000);

  // hand-computed (UPB in thousands):
  // WAC  = (100x6.00 + 200x6.50 + 300x7.00 + 400x5.50 + 50x7.25 + 150x6.75) / 1,200
  //      = (600 + 1,300 + 2,100 + 2,200 + 362.5 + 1,012.5) / 1,200 = 7,575 / 1,200 = 6.3125%
  EXPECT_NEAR(s.wac.value, 0.063125, 1e-12);
  EXPECT_EQ(s.wac.missing, 0u);
  // WAM  = (100x300 + 200x340 + 300x350 + 400x360 + 50x200 + 150x180) / 1,200
  //      = (30,000 + 68,000 + 105,000 + 144,000 + 10,000 + 27,000) / 1,200 = 384,000 / 1,200 = 320
  EXPECT_NEAR(s.wam.value, 320, 1e-9);
  EXPECT_EQ(s.wam.missing, 0u);
  // WALA = (100x60 + 200x20 + 300x10 + 400x0 + 50x160 + 150x180) / 1,200
  //      = (6,000 + 4,000 + 3,000 + 0 + 8,000 + 27,000) / 1,200 = 48,000 / 1,200 = 40
  EXPECT_NEAR(s.wala.value, 40, 1e-9);
  EXPECT_EQ(s.wala.missing, 0u);
  // Score: C has none, so its 300 is out of the weights (900), not averaged in as zero:
  //      = (100x620 + 200x700 + 400x780 + 50x619 + 150x659) / 900
  //      = (62,000 + 140,000 + 312,000 + 30,950 + 98,850) / 900 = 643,800 / 900 = 715.333...
  EXPECT_NEAR(s.credit_score.value, 643'800.0 / 900.0, 1e-9);
  EXPECT_EQ(s.credit_score.missing, 1u);
  // LTV: D has none; weights 800:
  //      = (100x0.80 + 200x0.75 + 300x0.60 + 50x0.95 + 150x0.8001) / 800
  //      = (80 + 150 + 180 + 47.5 + 120.015) / 800 = 577.515 / 800 = 0.72189375
  EXPECT_NEAR(s.original_ltv.value, 0.72189375, 1e-12);
  EXPECT_EQ(s.original_ltv.missing, 1u);
  // CLTV: D has none; = (80 + 180 + 180 + 47.5 + 127.5) / 800 = 615 / 800 = 0.76875
  EXPECT_NEAR(s.combined_ltv.value, 0.76875, 1e-12);
  EXPECT_EQ(s.combined_ltv.missing, 1u);
  // DTI: E has none; weights 1,150:
  //      = (100x0.30 + 200x0.36 + 300x0.43 + 400x0.20 + 150x0.50) / 1,150
  //      = (30 + 72 + 129 + 80 + 75) / 1,150 = 386 / 1,150 = 0.33565217...
  EXPECT_NEAR(s.dti.value, 386.0 / 1150.0, 1e-12);
  EXPECT_EQ(s.dti.missing, 1u);
}

TEST(Stratify, TablesInOrder) {
  const Strats s = stratify(make_loans(six_loans()));
  std::vector<std::string> titles;
  for (const StratTable& t : s.tables) titles.push_back(t.title);
  EXPECT_EQ(titles, (std::vector<std::string>{
                        "credit score", "original LTV (%)", "combined LTV (%)", "DTI (%)",
                        "note rate (%)", "current balance ($)", "occupancy", "loan purpose",
                        "documentation", "property type", "amortization type", "delinquency",
                        "state (top 10 by UPB)"}));
  // Every table accounts for every loan and all the UPB.
  for (const StratTable& t : s.tables) {
    std::size_t count = 0;
    double upb = 0, share = 0;
    for (const StratRow& r : t.rows) {
      count += r.count;
      upb += r.upb;
      share += r.upb_share;
    }
    EXPECT_EQ(count, 6u) << t.title;
    EXPECT_DOUBLE_EQ(upb, 1'200'000) << t.title;
    EXPECT_NEAR(share, 1.0, 1e-12) << t.title;
  }
}

TEST(Stratify, CreditScoreBandsIncludeTheirLowerEdge) {
  const Strats s = stratify(make_loans(six_loans()));
  const StratTable& t = table_titled(s, "credit score");
  // Score bands 620-659, 660-699, ... with the lower edge inside: a 620 borrower is a "620
  // borrower", not a sub-620 one. // common practice
  // 619 -> <620; 620 and 659 -> 620-659; 700 -> 700-739; 780 -> 780+; C has no score.
  // Empty bands (660-699, 740-779) are left out; "missing" comes last.
  EXPECT_EQ(labels(t),
            (std::vector<std::string>{"<620", "620-659", "700-739", "780+", "missing"}));

  // hand-computed, row 620-659 = loans A (620) and F (659), UPB 100 + 150 = 250 thousand:
  //   share = 250 / 1,200 = 0.208333...
  //   WAC   = (100x6.00 + 150x6.75) / 250 = (600 + 1,012.5) / 250 = 6.45%
  //   score = (100x620 + 150x659) / 250 = (62,000 + 98,850) / 250 = 643.4
  //   LTV   = (100x0.80 + 150x0.8001) / 250 = (80 + 120.015) / 250 = 0.80006
  const StratRow& r = row_labelled(t, "620-659");
  EXPECT_EQ(r.count, 2u);
  EXPECT_DOUBLE_EQ(r.upb, 250'000);
  EXPECT_NEAR(r.upb_share, 250.0 / 1200.0, 1e-12);
  EXPECT_NEAR(r.wac, 0.0645, 1e-12);
  EXPECT_NEAR(r.wa_score, 643.4, 1e-9);
  EXPECT_NEAR(r.wa_ltv, 0.80006, 1e-12);

  // Row 780+ is loan D alone, which has no LTV: its WA LTV is NaN, not zero.
  const StratRow& d = row_labelled(t, "780+");
  EXPECT_EQ(d.count, 1u);
  EXPECT_NEAR(d.wa_score, 780, 1e-9);
  EXPECT_TRUE(std::isnan(d.wa_ltv));

  // Row "missing" is loan C: no score, so NaN; its LTV is still there.
  const StratRow& m = row_labelled(t, "missing");
  EXPECT_EQ(m.count, 1u);
  EXPECT_TRUE(std::isnan(m.wa_score));
  EXPECT_NEAR(m.wa_ltv, 0.60, 1e-12);
}

TEST(Stratify, LtvBandsIncludeTheirUpperEdge) {
  const Strats s = stratify(make_loans(six_loans()));
  const StratTable& t = table_titled(s, "original LTV (%)");
  // LTV bands are written "70.01-80": an 80.00% loan is an "80 LTV" loan and sits in the band
  // that ends at 80, not the one above it. // common practice
  // 60.00 -> <=60; 75.00 and 80.00 -> 70.01-80; 80.01 -> 80.01-85; 95.00 -> 90.01-95; D missing.
  EXPECT_EQ(labels(t), (std::vector<std::string>{"<=60", "70.01-80", "80.01-85", "90.01-95",
                                                 "missing"}));
  // hand-computed, row 70.01-80 = loans A (80.00%) and B (75.00%), UPB 300 thousand:
  //   WAC   = (100x6.00 + 200x6.50) / 300 = 1,900 / 300 = 6.3333%
  //   score = (62,000 + 140,000) / 300 = 673.333...
  //   LTV   = (80 + 150) / 300 = 0.766666...
  const StratRow& r = row_labelled(t, "70.01-80");
  EXPECT_EQ(r.count, 2u);
  EXPECT_DOUBLE_EQ(r.upb, 300'000);
  EXPECT_NEAR(r.wac, 0.19 / 3.0, 1e-12);
  EXPECT_NEAR(r.wa_score, 202'000.0 / 300.0, 1e-9);
  EXPECT_NEAR(r.wa_ltv, 0.23 / 0.30, 1e-12);
}

TEST(Stratify, RatioEdgesSurviveTheLastBit) {
  // 80.00% written one bit above or below 0.80 (as percent -> decimal arithmetic can leave it)
  // is still 80.00% and in 70.01-80; 80.006% rounds to 80.01% and is in 80.01-85.
  std::vector<TestLoan> loans = {
      {"up", 100'000, 0.06, 360, 0, 700, std::nextafter(0.80, 1.0), 0.80, 0.30, "CA"},
      {"down", 100'000, 0.06, 360, 0, 700, std::nextafter(0.80, 0.0), 0.80, 0.30, "CA"},
      {"over", 100'000, 0.06, 360, 0, 700, 0.80006, 0.80, 0.30, "CA"},
      {"over100", 100'000, 0.06, 360, 0, 700, 1.0001, 0.80, 0.30, "CA"},
      {"dti", 100'000, 0.06, 360, 0, 700, 1.00, 0.80, std::nextafter(0.50, 1.0), "CA"},
  };
  const Strats s = stratify(make_loans(loans));
  const StratTable& ltv = table_titled(s, "original LTV (%)");
  EXPECT_EQ(labels(ltv), (std::vector<std::string>{"70.01-80", "80.01-85", "95.01-100", ">100"}));
  EXPECT_EQ(row_labelled(ltv, "70.01-80").count, 2u);
  EXPECT_EQ(row_labelled(ltv, "95.01-100").count, 1u);  // exactly 100.00%
  const StratTable& dti = table_titled(s, "DTI (%)");
  EXPECT_EQ(labels(dti), (std::vector<std::string>{"20.01-30", "43.01-50"}));
}

TEST(Stratify, DtiBandsIncludeTheirUpperEdge) {
  const Strats s = stratify(make_loans(six_loans()));
  const StratTable& t = table_titled(s, "DTI (%)");
  // DTI edges at 36% and 43% are the usual underwriting limits; a 43.00% DTI is within a 43%
  // limit, so it sits in 36.01-43. // common practice
  // 20 -> <=20; 30 -> 20.01-30; 36 -> 30.01-36; 43 -> 36.01-43; 50 -> 43.01-50; E missing.
  EXPECT_EQ(labels(t), (std::vector<std::string>{"<=20", "20.01-30", "30.01-36", "36.01-43",
                                                 "43.01-50", "missing"}));
  for (const StratRow& r : t.rows) EXPECT_EQ(r.count, 1u) << r.label;
}

TEST(Stratify, NoteRateHalfPointBandsFromTheData) {
  const Strats s = stratify(make_loans(six_loans()));
  const StratTable& t = table_titled(s, "note rate (%)");
  // Half-point coupon bands, lower edge inside. // common practice
  // 5.50 -> 5.50-5.99; 6.00 -> 6.00-6.49; 6.50 and 6.75 -> 6.50-6.99; 7.00 and 7.25 -> 7.00-7.49.
  EXPECT_EQ(labels(t), (std::vector<std::string>{"5.50-5.99", "6.00-6.49", "6.50-6.99",
                                                 "7.00-7.49"}));
  // hand-computed, row 7.00-7.49 = C (300 at 7.00%) and E (50 at 7.25%):
  //   WAC = (2,100 + 362.5) / 350 = 7.0357142...%; score = E's alone (C has none) = 619;
  //   LTV = (300x0.60 + 50x0.95) / 350 = (180 + 47.5) / 350 = 0.65
  const StratRow& r = row_labelled(t, "7.00-7.49");
  EXPECT_EQ(r.count, 2u);
  EXPECT_NEAR(r.wac, 0.024625 / 0.35, 1e-12);
  EXPECT_NEAR(r.wa_score, 619, 1e-9);
  EXPECT_NEAR(r.wa_ltv, 0.65, 1e-12);
}

TEST(Stratify, BalanceBandsIncludeTheirLowerEdge) {
  const Strats s = stratify(make_loans(six_loans()));
  const StratTable& t = table_titled(s, "current balance ($)");
  // 50,000 -> <100,000; 100,000 and 150,000 -> 100,000-199,999; 200,000 -> 200,000-299,999, ...
  EXPECT_EQ(labels(t), (std::vector<std::string>{"<100,000", "100,000-199,999",
                                                 "200,000-299,999", "300,000-399,999",
                                                 "400,000-599,999"}));
  EXPECT_EQ(row_labelled(t, "100,000-199,999").count, 2u);
  const Strats big = stratify(make_loans({
      {"x", 999'999.99, 0.06, 360, 0, 700, 0.8, 0.8, 0.3, "CA"},
      {"y", 1'000'000, 0.06, 360, 0, 700, 0.8, 0.8, 0.3, "CA"},
  }));
  EXPECT_EQ(labels(table_titled(big, "current balance ($)")),
            (std::vector<std::string>{"600,000-999,999", ">=1,000,000"}));
}

TEST(Stratify, CategoriesInEnumOrderUnknownLast) {
  const Strats s = stratify(make_loans(six_loans()));
  EXPECT_EQ(labels(table_titled(s, "occupancy")),
            (std::vector<std::string>{"owner", "second_home", "investor", "unknown"}));
  EXPECT_EQ(labels(table_titled(s, "delinquency")), (std::vector<std::string>{"current", "30"}));
  EXPECT_EQ(labels(table_titled(s, "amortization type")), (std::vector<std::string>{"fixed"}));
  // hand-computed: owner = A, B, F = 100 + 200 + 150 = 450 thousand, share 450 / 1,200 = 0.375
  const StratRow& owner = row_labelled(table_titled(s, "occupancy"), "owner");
  EXPECT_EQ(owner.count, 3u);
  EXPECT_DOUBLE_EQ(owner.upb, 450'000);
  EXPECT_NEAR(owner.upb_share, 0.375, 1e-12);
}

TEST(Stratify, TopTenStatesThenOtherThenMissing) {
  // Thirteen states by UPB (thousands): CA 1,100 (two loans, 600 + 500), TX 1,000, FL 900,
  // NY 800, IL 700, PA 600, OH 500, GA 400, NC 300, then AZ, MI, WA tie at 200 and ND has 100.
  // The tie is broken by code, so AZ is tenth; MI, WA and ND make "other" (500 thousand,
  // 3 loans); one loan has no state.
  std::vector<TestLoan> loans;
  auto add = [&](const std::string& state, double thousands) {
    loans.push_back({state, thousands * 1000, 0.06, 360, 0, 700, 0.8, 0.8, 0.3, state});
  };
  add("WA", 200);
  add("CA", 600);
  add("TX", 1000);
  add("FL", 900);
  add("NY", 800);
  add("IL", 700);
  add("MI", 200);
  add("PA", 600);
  add("OH", 500);
  add("GA", 400);
  add("NC", 300);
  add("AZ", 200);
  add("ND", 100);
  add("CA", 500);
  add("", 50);
  const Strats s = stratify(make_loans(loans));
  const StratTable& t = table_titled(s, "state (top 10 by UPB)");
  EXPECT_EQ(labels(t), (std::vector<std::string>{"CA", "TX", "FL", "NY", "IL", "PA", "OH", "GA",
                                                 "NC", "AZ", "other", "missing"}));
  EXPECT_EQ(row_labelled(t, "CA").count, 2u);
  EXPECT_DOUBLE_EQ(row_labelled(t, "CA").upb, 1'100'000);
  EXPECT_EQ(row_labelled(t, "other").count, 3u);
  EXPECT_DOUBLE_EQ(row_labelled(t, "other").upb, 500'000);
  EXPECT_EQ(row_labelled(t, "missing").count, 1u);
}

TEST(Stratify, FewStatesHaveNoOtherRow) {
  const Strats s = stratify(make_loans(six_loans()));
  const StratTable& t = table_titled(s, "state (top 10 by UPB)");
  // CA 100 + 200 + 150 = 450, NY 400, TX 300, FL 50 (thousands).
  EXPECT_EQ(labels(t), (std::vector<std::string>{"CA", "NY", "TX", "FL"}));
}

TEST(Stratify, EmptyPool) {
  const Strats s = stratify(LoanArrays{});
  EXPECT_EQ(s.loans, 0u);
  EXPECT_EQ(s.upb, 0);
  EXPECT_TRUE(std::isnan(s.average_upb));
  for (const WeightedAverage* wa : {&s.wac, &s.wam, &s.wala, &s.credit_score, &s.original_ltv,
                                    &s.combined_ltv, &s.dti}) {
    EXPECT_TRUE(std::isnan(wa->value));
    EXPECT_EQ(wa->missing, 0u);
  }
  EXPECT_EQ(s.tables.size(), 13u);
  for (const StratTable& t : s.tables) EXPECT_TRUE(t.rows.empty()) << t.title;
}

TEST(Stratify, AllMissingGivesNaNAndCountsThem) {
  const Strats s = stratify(make_loans({
      {"a", 100'000, 0.06, 360, 0, kNaN, kNaN, kNaN, kNaN, ""},
      {"b", 100'000, 0.06, 360, 0, kNaN, kNaN, kNaN, kNaN, ""},
  }));
  EXPECT_TRUE(std::isnan(s.credit_score.value));
  EXPECT_EQ(s.credit_score.missing, 2u);
  EXPECT_TRUE(std::isnan(s.dti.value));
  EXPECT_EQ(s.dti.missing, 2u);
  EXPECT_EQ(labels(table_titled(s, "credit score")), (std::vector<std::string>{"missing"}));
  EXPECT_EQ(labels(table_titled(s, "state (top 10 by UPB)")),
            (std::vector<std::string>{"missing"}));
}

TEST(Stratify, SameInputSameBits) {
  const LoanArrays loans = make_loans(six_loans());
  const Strats a = stratify(loans), b = stratify(loans);
  EXPECT_EQ(a.wac.value, b.wac.value);
  EXPECT_EQ(a.tables[0].rows[1].wa_ltv, b.tables[0].rows[1].wa_ltv);
}

TEST(Stratify, VectorsOfDifferentLengthAreRefused) {
  LoanArrays loans = make_loans(six_loans());
  loans.credit_score.pop_back();
  EXPECT_THROW(stratify(loans), std::invalid_argument);
}

}  // namespace
}  // namespace poolbid
