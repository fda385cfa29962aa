// Tests of the `poolbid price` reports: the text report's lines and rounding, the JSON keys in
// order with unrounded values, and the per-loan values CSV (header, cells, quoting, sums, errors).
#include <gtest/gtest.h>

#include <chrono>
#include <cstdlib>
#include <limits>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/report.h"
#include "tape/tape.h"
#include "tests/report/report_support.h"
#include "tests/support/csv_text.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using Ordered = nlohmann::ordered_json;
using testing_support::cells_in;
using testing_support::contains;
using testing_support::kCutoff;
using testing_support::line_starting;
using testing_support::lines_of;
using testing_support::make_loans;
using testing_support::two_loan_tape;

constexpr Date kSettle{std::chrono::year{2026}, std::chrono::month{12}, std::chrono::day{15}};

// The report reads only the curve's descriptive fields; no QuantLib curve is needed.
YieldCurve flat_curve() {
  YieldCurve c;
  c.source = "flat 4.5%";
  c.as_of = kCutoff;
  c.flat = true;
  c.flat_rate = 0.045;
  return c;
}

YieldCurve quoted_curve() {
  YieldCurve c;
  c.source = "curves/2026-12-01.json";
  c.description = "illustrative curve";
  c.as_of = kCutoff;
  c.quotes = {{CurveQuote::Kind::swap, "2Y", 24, 0.0392},
              {CurveQuote::Kind::deposit, "1M", 1, 0.0431},
              {CurveQuote::Kind::swap, "30Y", 360, 0.0415}};
  c.parallel_shift_bp = 25;
  c.key_rate_shifts = {{2, 10}, {10, -5}};
  return c;
}

BidRequest sample_request() {
  BidRequest r;
  r.target = BidTarget::yield;
  r.value = 0.0725;
  r.settlement = {kCutoff, kSettle, 17};
  r.assumptions.prepay = parse_prepay("psa:150");
  r.assumptions.default_rate = parse_default("sda:200");
  r.assumptions.severity = parse_severity("35");
  r.assumptions.lag_months = 6;
  r.assumptions.advancing = Advancing::interest;
  r.shock_bp = 25;
  return r;
}

// Numbers chosen so that each printed figure shows its rounding.
BidResult sample_result() {
  BidResult r;
  r.cutoff_balance = 1'000'000;
  r.net_coupon = 0.0625;
  r.accrued = 1'000'000 * 0.0625 * 14 / 360;  // 2,430.5555...
  r.clean_price = 98.12345;
  r.dirty_price = 98.12345 + 0.243055556;
  r.clean_value = 981'234.5;
  r.dirty_value = 983'665.055556;
  r.loss_adjusted = {.cfy = 0.07123456,
                     .bey = 0.07229876,
                     .z_spread = 0.0250549,
                     .wal_years = 5.4321,
                     .par_yield_at_wal = 0.0421987,
                     .spread_at_wal = 0.0300999,
                     .modified_duration = 4.0987};
  r.no_loss = {.cfy = 0.0761,
               .bey = 0.07731,
               .z_spread = 0.02954,
               .wal_years = 5.8765,
               .par_yield_at_wal = 0.04231,
               .spread_at_wal = 0.035,
               .modified_duration = 4.3456};
  r.credit_cost_bp = 44.91;
  r.expected_loss = 23'456.789;
  r.expected_loss_pct = 2.3456789;
  r.effective_duration = 3.8765;
  r.effective_convexity = -1.2345;
  r.dv01 = 381.2345;
  r.arm_loans = 1;
  return r;
}

// ---- Text ---------------------------------------------------------------------------------------

TEST(PriceText, HeadingCurveAssumptionsAndTarget) {
  const std::string text =
      price_text(two_loan_tape(), flat_curve(), sample_request(), sample_result());
  EXPECT_TRUE(contains(text, "poolbid price: pool.csv\n")) << text;
  EXPECT_TRUE(contains(text, "loans priced: 2 (UPB $1,000,000.00), net coupon 6.250%")) << text;
  EXPECT_TRUE(contains(text, "cut-off date: 2026-12-01\n")) << text;
  EXPECT_TRUE(contains(text, "settlement date: 2026-12-15\n")) << text;
  // DESIGN.md section 5: month 1 is paid on the first of the next month plus the delay.
  EXPECT_TRUE(contains(text, "payment delay: 17 days (month 1 paid 2027-01-18)")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  source"), "flat 4.5%")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  as of"), "2026-12-01")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  rates"), "flat 4.500% (continuous zero rate"))
      << text;
  EXPECT_EQ(line_starting(text, "  shift"), "") << text;       // no shift, no line
  EXPECT_EQ(line_starting(text, "  description"), "") << text;  // none given
  EXPECT_TRUE(contains(line_starting(text, "  prepayment (CPR)"), "psa:150")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  default (CDR)"), "sda:200")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  loss severity"), "35")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  liquidation lag"), "6 months after default"))
      << text;
  EXPECT_TRUE(contains(line_starting(text, "  advancing"), "interest")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  delinquent loans default"), "no")) << text;
  EXPECT_TRUE(contains(text, "\ntarget: loss-adjusted yield 7.250% BEY\n")) << text;
}

TEST(PriceText, TargetsInTheirOwnUnits) {
  BidRequest request = sample_request();
  request.target = BidTarget::spread;
  request.value = 0.025;
  EXPECT_TRUE(contains(price_text(two_loan_tape(), flat_curve(), request, sample_result()),
                       "\ntarget: loss-adjusted Z-spread 250 bp\n"));
  request.value = 0.01255;
  EXPECT_TRUE(contains(price_text(two_loan_tape(), flat_curve(), request, sample_result()),
                       "\ntarget: loss-adjusted Z-spread 125.5 bp\n"));
  request.target = BidTarget::price;
  request.value = 98.5;
  EXPECT_TRUE(contains(price_text(two_loan_tape(), flat_curve(), request, sample_result()),
                       "\ntarget: clean price 98.500\n"));
}

TEST(PriceText, QuotedCurveWithShifts) {
  const std::string text =
      price_text(two_loan_tape(), quoted_curve(), sample_request(), sample_result());
  EXPECT_TRUE(contains(line_starting(text, "  source"), "curves/2026-12-01.json")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  description"), "illustrative curve")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  rates"), "3 quotes, 1M to 30Y")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  shift"),
                       "+25 bp parallel; key rates 2y +10 bp, 10y -5 bp"))
      << text;
}

TEST(PriceText, BidViewsCreditAndRiskRounded) {
  const std::string text =
      price_text(two_loan_tape(), flat_curve(), sample_request(), sample_result());
  const std::string clean = line_starting(text, "  clean price");
  EXPECT_TRUE(contains(clean, " 98.123 ") && contains(clean, "$981,234.50")) << text;
  const std::string accrued = line_starting(text, "  accrued interest");
  EXPECT_TRUE(contains(accrued, " 0.243 ") && contains(accrued, "$2,430.56")) << text;
  const std::string dirty = line_starting(text, "  dirty price");
  EXPECT_TRUE(contains(dirty, " 98.367 ") && contains(dirty, "$983,665.06")) << text;

  // Two columns, loss-adjusted then no-loss.
  const std::string heads = line_starting(text, "   ");
  EXPECT_LT(heads.find("loss-adjusted"), heads.find("no-loss")) << text;
  auto row_ends = [&](const std::string& start, const std::string& end) {
    const std::string line = line_starting(text, start);
    return line.size() >= end.size() && line.compare(line.size() - end.size(), end.size(), end) == 0;
  };
  EXPECT_TRUE(row_ends("  cash-flow yield", "7.123    7.610")) << text;
  EXPECT_TRUE(row_ends("  bond-equivalent yield", "7.230    7.731")) << text;
  EXPECT_TRUE(row_ends("  Z-spread (bp)", "250.5    295.4")) << text;
  EXPECT_TRUE(row_ends("  par yield at WAL", "4.220    4.231")) << text;
  EXPECT_TRUE(row_ends("  spread at WAL (bp)", "301.0    350.0")) << text;
  EXPECT_TRUE(row_ends("  WAL (years)", "5.43     5.88")) << text;
  EXPECT_TRUE(row_ends("  modified duration", "4.10     4.35")) << text;

  EXPECT_TRUE(contains(line_starting(text, "  credit cost"), "44.9 bp")) << text;
  const std::string loss = line_starting(text, "  expected lifetime loss");
  EXPECT_TRUE(contains(loss, "$23,456.79") && contains(loss, "2.3457% of cut-off UPB")) << text;

  EXPECT_TRUE(contains(text, "risk (curve moved up and down 25 bp")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  effective duration"), "3.88")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  effective convexity"), "-1.23")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  DV01"), "$381.23  per 1 bp fall")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  ARM loans on coupon paths"), " 1 ")) << text;
}

TEST(PriceText, RejectedRowsThenCaution) {
  const std::string text =
      price_text(two_loan_tape(), flat_curve(), sample_request(), sample_result());
  EXPECT_TRUE(contains(text, "rejected rows: 2 rows rejected (UPB $250,000.00) not priced:"))
      << text;
  EXPECT_TRUE(contains(text, "note rate 31% outside 0-25%")) << text;
  EXPECT_TRUE(contains(text, "not a US state code")) << text;
  EXPECT_TRUE(contains(text, "(whole row)")) << text;
  EXPECT_FALSE(contains(text, "DTI not given")) << text;  // a warning, not a reject
  EXPECT_TRUE(contains(text, "1 accepted row with warnings is priced as read")) << text;
  const std::string caution = std::string(caution_text());
  EXPECT_EQ(text.substr(text.size() - caution.size() - 1), caution + "\n");

  TapeRead clean = two_loan_tape();
  clean.problems.clear();
  clean.rows_rejected = 0;
  clean.rows_with_warnings = 0;
  EXPECT_TRUE(contains(price_text(clean, flat_curve(), sample_request(), sample_result()),
                       "rejected rows: none; all 4 rows read are priced."));
}

TEST(PriceText, CutoffMustMatchTheSettlement) {
  TapeRead tape = two_loan_tape();
  tape.cutoff = Date{std::chrono::year{2026}, std::chrono::month{11}, std::chrono::day{1}};
  EXPECT_THROW(price_text(tape, flat_curve(), sample_request(), sample_result()),
               std::invalid_argument);
  EXPECT_THROW(price_json(tape, flat_curve(), sample_request(), sample_result()),
               std::invalid_argument);
  tape.cutoff.reset();  // the settlement's cut-off is used
  EXPECT_NO_THROW(price_text(tape, flat_curve(), sample_request(), sample_result()));
  BidRequest no_cutoff = sample_request();
  no_cutoff.settlement.cutoff = Date{};
  EXPECT_THROW(price_json(tape, flat_curve(), no_cutoff, sample_result()), std::invalid_argument);
}

// ---- JSON ---------------------------------------------------------------------------------------

std::string keys_of(const Ordered& object) {
  std::string keys;
  for (const auto& [key, value] : object.items()) keys += (keys.empty() ? "" : ",") + key;
  return keys;
}

TEST(PriceJson, KeysInTheDocumentedOrder) {
  const Ordered doc = Ordered::parse(
      price_json(two_loan_tape(), quoted_curve(), sample_request(), sample_result()));
  // Public interface (report.h, README).
  EXPECT_EQ(keys_of(doc),
            "file,cutoff_date,settlement_date,payment_delay_days,curve,assumptions,target,bid,"
            "loss_adjusted,no_loss,credit,risk,loans_priced,rejected,caution");
  EXPECT_EQ(keys_of(doc["curve"]),
            "source,as_of,description,flat,flat_rate,quotes,parallel_shift_bp,key_rate_shifts");
  EXPECT_EQ(keys_of(doc["assumptions"]),
            "prepay,default,severity,lag_months,advancing,delinquent_default");
  EXPECT_EQ(keys_of(doc["target"]), "kind,value");
  EXPECT_EQ(keys_of(doc["bid"]),
            "clean_price,dirty_price,accrued_pct,accrued,clean_value,dirty_value");
  const std::string view =
      "cash_flow_yield,bey,z_spread,par_yield_at_wal,spread_at_wal,wal_years,modified_duration";
  EXPECT_EQ(keys_of(doc["loss_adjusted"]), view);
  EXPECT_EQ(keys_of(doc["no_loss"]), view);
  EXPECT_EQ(keys_of(doc["credit"]), "credit_cost_bp,expected_loss,expected_loss_pct");
  EXPECT_EQ(keys_of(doc["risk"]),
            "effective_duration,effective_convexity,dv01,shock_bp,key_rate_durations,arm_loans");
  EXPECT_EQ(keys_of(doc["loans_priced"]),
            "loans,cutoff_balance,net_coupon,rows_read,rows_rejected,upb_rejected");
  ASSERT_EQ(doc["rejected"].size(), 3u);  // every rejecting problem; the warning left out
  EXPECT_EQ(keys_of(doc["rejected"][0]), "row,loan_id,field,column,value,reason");
}

TEST(PriceJson, ValuesUnroundedInTheirUnits) {
  const BidResult r = sample_result();
  const Ordered doc =
      Ordered::parse(price_json(two_loan_tape(), quoted_curve(), sample_request(), r));
  EXPECT_EQ(doc["file"], "pool.csv");
  EXPECT_EQ(doc["cutoff_date"], "2026-12-01");
  EXPECT_EQ(doc["settlement_date"], "2026-12-15");
  EXPECT_EQ(doc["payment_delay_days"], 17);

  const Ordered& curve = doc["curve"];
  EXPECT_EQ(curve["source"], "curves/2026-12-01.json");
  EXPECT_EQ(curve["as_of"], "2026-12-01");
  EXPECT_EQ(curve["flat"], false);
  EXPECT_TRUE(curve["flat_rate"].is_null());
  ASSERT_EQ(curve["quotes"].size(), 3u);
  EXPECT_EQ(curve["quotes"][1]["kind"], "deposit");
  EXPECT_EQ(curve["quotes"][1]["tenor"], "1M");
  EXPECT_DOUBLE_EQ(curve["quotes"][1]["rate"].get<double>(), 0.0431);
  EXPECT_DOUBLE_EQ(curve["parallel_shift_bp"].get<double>(), 25);
  EXPECT_DOUBLE_EQ(curve["key_rate_shifts"][1]["years"].get<double>(), 10);
  EXPECT_DOUBLE_EQ(curve["key_rate_shifts"][1]["bp"].get<double>(), -5);

  EXPECT_EQ(doc["target"]["kind"], "yield");
  EXPECT_DOUBLE_EQ(doc["target"]["value"].get<double>(), 0.0725);

  // Unrounded: the double goes through the document unchanged.
  EXPECT_EQ(doc["bid"]["clean_price"].get<double>(), r.clean_price);
  EXPECT_EQ(doc["bid"]["dirty_price"].get<double>(), r.dirty_price);
  EXPECT_EQ(doc["bid"]["accrued"].get<double>(), r.accrued);
  // identity: accrued_pct = accrued / cut-off balance x 100.
  EXPECT_DOUBLE_EQ(doc["bid"]["accrued_pct"].get<double>(), 100 * r.accrued / r.cutoff_balance);
  EXPECT_EQ(doc["bid"]["dirty_value"].get<double>(), r.dirty_value);
  EXPECT_EQ(doc["loss_adjusted"]["cash_flow_yield"].get<double>(), 0.07123456);
  EXPECT_EQ(doc["loss_adjusted"]["z_spread"].get<double>(), 0.0250549);
  EXPECT_EQ(doc["no_loss"]["spread_at_wal"].get<double>(), 0.035);
  EXPECT_EQ(doc["no_loss"]["wal_years"].get<double>(), 5.8765);
  EXPECT_EQ(doc["credit"]["credit_cost_bp"].get<double>(), 44.91);
  EXPECT_EQ(doc["credit"]["expected_loss"].get<double>(), 23'456.789);
  EXPECT_EQ(doc["credit"]["expected_loss_pct"].get<double>(), 2.3456789);
  EXPECT_EQ(doc["risk"]["effective_convexity"].get<double>(), -1.2345);
  EXPECT_EQ(doc["risk"]["dv01"].get<double>(), 381.2345);
  EXPECT_EQ(doc["risk"]["shock_bp"].get<double>(), 25);
  EXPECT_EQ(doc["risk"]["arm_loans"], 1);
  EXPECT_EQ(doc["loans_priced"]["loans"], 2);
  EXPECT_EQ(doc["loans_priced"]["net_coupon"].get<double>(), 0.0625);
  EXPECT_EQ(doc["loans_priced"]["upb_rejected"].get<double>(), 250'000);
  EXPECT_EQ(doc["rejected"][0]["row"], 3);
  EXPECT_EQ(doc["rejected"][0]["field"], "note_rate");
  EXPECT_TRUE(doc["rejected"][2]["field"].is_null());
  EXPECT_EQ(doc["caution"], std::string(caution_text()));
}

TEST(PriceJson, FlatCurveAndNonFiniteNumbers) {
  BidResult r = sample_result();
  r.no_loss.modified_duration = std::numeric_limits<double>::quiet_NaN();
  BidRequest request = sample_request();
  request.target = BidTarget::spread;
  request.value = 0.0125;
  const Ordered doc = Ordered::parse(price_json(two_loan_tape(), flat_curve(), request, r));
  EXPECT_EQ(doc["curve"]["flat"], true);
  EXPECT_EQ(doc["curve"]["flat_rate"].get<double>(), 0.045);
  EXPECT_TRUE(doc["curve"]["quotes"].empty());
  EXPECT_EQ(doc["target"]["kind"], "spread");
  EXPECT_EQ(doc["target"]["value"].get<double>(), 0.0125);
  EXPECT_TRUE(doc["no_loss"]["modified_duration"].is_null());
}

TEST(PriceJson, AssumptionsReadBackAsAnAssumptionsFile) {
  const BidRequest request = sample_request();
  const Ordered doc =
      Ordered::parse(price_json(two_loan_tape(), flat_curve(), request, sample_result()));
  const Assumptions back = parse_assumptions(doc["assumptions"].dump(), "report");
  const Assumptions& a = request.assumptions;
  EXPECT_EQ(back.prepay, a.prepay);
  EXPECT_EQ(back.default_rate, a.default_rate);
  EXPECT_EQ(back.severity, a.severity);
  EXPECT_EQ(back.lag_months, a.lag_months);
  EXPECT_EQ(back.advancing, a.advancing);
  EXPECT_EQ(back.delinquent_default, a.delinquent_default);
}

// ---- Loan values CSV ----------------------------------------------------------------------------

BidResult with_loan_values(std::vector<double> present_value, std::vector<double> loss,
                           std::vector<double> wal) {
  BidResult r = sample_result();
  LoanFlows& f = r.flows.loans;
  const std::size_t n = present_value.size();
  for (std::vector<double>* v :
       {&f.sched_principal, &f.prepayment, &f.defaults, &f.recovery, &f.gross_interest,
        &f.servicing, &f.net_interest, &f.advanced_interest, &f.cash_flow})
    v->assign(n, 0.0);
  f.last_month.assign(n, 0);
  f.present_value = std::move(present_value);
  f.loss = std::move(loss);
  f.wal_years = std::move(wal);
  double dirty = 0;
  for (double x : f.present_value) dirty += x;
  r.dirty_value = dirty;
  return r;
}

TEST(LoanValuesCsv, HeaderAndOneLinePerLoanInTapeOrder) {
  const LoanArrays loans = make_loans({{.id = "L1", .upb = 600'000, .rate = 0.065},
                                       {.id = "L2", .upb = 400'000.125, .rate = 0.05875}});
  const BidResult r =
      with_loan_values({590'123.456, 401'000}, {12'345.678, 0}, {5.12346, 0});
  const std::vector<std::string> lines = lines_of(loan_values_csv(loans, r));
  ASSERT_EQ(lines.size(), 3u);
  // Public interface (README).
  EXPECT_EQ(lines[0],
            "loan_id,row,seller,cutoff_balance,note_rate,value,dirty_price,wal_years,"
            "expected_loss,loss_pct");
  EXPECT_EQ(lines[0], std::string(kLoanValuesCsvHeader));
  // dirty_price = 590,123.456 / 600,000 x 100 = 98.3539093...; loss_pct = 2.057613.
  EXPECT_EQ(lines[1], "L1,2,test seller,600000.00,6.5000,590123.46,98.353909,5.1235,12345.68,"
                      "2.0576");
  // 401,000 / 400,000.125 x 100 = 100.2499687...
  EXPECT_EQ(lines[2], "L2,3,test seller,400000.13,5.8750,401000.00,100.249969,0.0000,0.00,"
                      "0.0000");
  for (const std::string& line : lines) EXPECT_EQ(cells_in(line), 10u) << line;
}

TEST(LoanValuesCsv, ValuesSumToTheDirtyValue) {
  std::vector<testing_support::TestLoan> some;
  std::vector<double> pv, loss, wal;
  for (int i = 0; i < 25; ++i) {
    some.push_back({.id = "L" + std::to_string(i), .upb = 100'000.0 + 1'000.37 * i, .rate = 0.06});
    pv.push_back(97'000.0 + 1'013.129 * i);
    loss.push_back(10.0 * i);
    wal.push_back(4.0 + 0.1 * i);
  }
  const LoanArrays loans = make_loans(some);
  const BidResult r = with_loan_values(pv, loss, wal);
  const std::vector<std::string> lines = lines_of(loan_values_csv(loans, r));
  ASSERT_EQ(lines.size(), loans.size() + 1);
  double values = 0;
  for (std::size_t i = 1; i < lines.size(); ++i) {
    std::vector<std::string> cells;
    std::stringstream in(lines[i]);
    for (std::string cell; std::getline(in, cell, ',');) cells.push_back(cell);
    ASSERT_EQ(cells.size(), 10u);
    values += std::strtod(cells[5].c_str(), nullptr);
  }
  // identity: loan values at the pool's yield sum to the pool's dirty value (to a cent a line).
  EXPECT_NEAR(values, r.dirty_value, 0.005 * static_cast<double>(loans.size()));
}

TEST(LoanValuesCsv, QuotesIdsAndSellersAsRfc4180Says) {
  LoanArrays loans = make_loans({{.id = "A,1", .upb = 100, .rate = 0.05},
                                 {.id = "B\"2\"", .upb = 100, .rate = 0.05},
                                 {.id = "C\nD", .upb = 100, .rate = 0.05}});
  loans.seller_names = {"Quill, Moor & Co"};
  const std::string csv =
      loan_values_csv(loans, with_loan_values({100, 100, 100}, {0, 0, 0}, {0, 0, 0}));
  const std::string tail = ",100.00,5.0000,100.00,100.000000,0.0000,0.00,0.0000\n";
  // source: RFC 4180 section 2, rules 6 and 7 (fields with commas, quotes or line breaks are
  // enclosed in double quotes; a quote inside is doubled).
  EXPECT_TRUE(contains(csv, "\"A,1\",2,\"Quill, Moor & Co\"" + tail)) << csv;
  EXPECT_TRUE(contains(csv, "\"B\"\"2\"\"\",3,\"Quill, Moor & Co\"" + tail)) << csv;
  EXPECT_TRUE(contains(csv, "\"C\nD\",4,\"Quill, Moor & Co\"" + tail)) << csv;
}

TEST(LoanValuesCsv, StreamingWriterMatchesTheString) {
  std::vector<testing_support::TestLoan> many;
  std::vector<double> pv, loss, wal;
  for (int i = 0; i < 10'000; ++i) {
    many.push_back({.id = "L" + std::to_string(i), .upb = 1000.0 + i, .rate = 0.05});
    pv.push_back(990.0 + 0.99 * i);
    loss.push_back(0.01 * i);
    wal.push_back(0.001 * i);
  }
  const LoanArrays loans = make_loans(many);
  const BidResult r = with_loan_values(pv, loss, wal);
  std::ostringstream streamed;
  write_loan_values_csv(streamed, loans, r);
  const std::string whole = loan_values_csv(loans, r);
  EXPECT_EQ(streamed.str(), whole);
  EXPECT_EQ(lines_of(whole).size(), loans.size() + 1);
}

TEST(LoanValuesCsv, NoPresentValuesIsAnError) {
  const LoanArrays loans = make_loans({{.id = "L1", .upb = 1, .rate = 0.05}});
  BidResult r = with_loan_values({1}, {0}, {0});
  r.flows.loans.present_value.clear();
  EXPECT_THROW(loan_values_csv(loans, r), std::invalid_argument);
  std::ostringstream out;
  EXPECT_THROW(write_loan_values_csv(out, loans, r), std::invalid_argument);
  EXPECT_EQ(out.str(), "");  // nothing written
  // Loan flows for another tape.
  EXPECT_THROW(loan_values_csv(loans, with_loan_values({1, 2}, {0, 0}, {0, 0})),
               std::invalid_argument);
}

}  // namespace
}  // namespace poolbid
