// Tests of the `poolbid cashflows` reports: the CSV header and cells exactly, payment dates,
// RFC 4180 quoting in the loans CSV, the JSON keys, the text report's months, and rejected rows.
#include <gtest/gtest.h>

#include <algorithm>
#include <chrono>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "report/format.h"
#include "report/report.h"
#include "tape/tape.h"
#include "tests/report/report_support.h"
#include "tests/support/csv_text.h"
#include "tests/support/loans.h"

namespace poolbid {
namespace {

using nlohmann::json;
using testing_support::contains;
using testing_support::kCutoff;
using testing_support::kNaN;
using testing_support::make_loans;
using testing_support::two_loan_tape;

// A pool of `months` months, every column filled with `fill`.
PoolFlows flat_pool(int months, double fill = 0) {
  PoolFlows p;
  p.months = months;
  const auto n = static_cast<std::size_t>(months);
  for (std::vector<double>* v :
       {&p.begin_balance, &p.sched_principal, &p.prepayment, &p.defaults, &p.loss, &p.recovery,
        &p.gross_interest, &p.servicing, &p.net_interest, &p.advanced_interest,
        &p.total_principal, &p.cash_flow, &p.end_balance, &p.smm, &p.mdr, &p.cpr, &p.cdr,
        &p.cum_loss_pct})
    v->assign(n, fill);
  return p;
}

// Two months of a $1,000,000 pool, numbers chosen to show each cell's rounding.
PoolFlows two_month_pool() {
  PoolFlows p = flat_pool(2);
  p.cutoff_balance = 1'000'000;
  p.begin_balance = {1'000'000, 990'000.004};
  p.sched_principal = {1'234.5678, 1'240.125};
  p.prepayment = {8'000.996, 0};
  p.defaults = {500, 0};
  p.loss = {0, 200.5};
  p.recovery = {0, 299.5};
  p.gross_interest = {5'416.666667, 5'362.5};
  p.servicing = {208.333333, -0.001};  // a rounding residue prints as 0.00, not -0.00
  p.net_interest = {5'208.333334, 5'362.501};
  p.total_principal = {9'235.5638, 1'539.625};
  p.cash_flow = {14'443.897134, 6'902.126};
  p.end_balance = {990'000.004, 988'759.879};
  p.smm = {0.00066869, 0};
  p.mdr = {0.000500125, kNaN};  // NaN prints as an empty cell
  p.cpr = {0.799999, 0};
  p.cdr = {6.0, 0};
  p.cum_loss_pct = {0, 0.02005};
  return p;
}

using testing_support::cells_in;
using testing_support::lines_of;

// ---- Pool CSV -----------------------------------------------------------------------------------

TEST(CashflowCsv, HeaderIsThePublicColumnList) {
  const std::string csv = cashflow_csv(flat_pool(0), kCutoff, 17);
  // The column names are a public interface (README): changing them breaks users' scripts.
  EXPECT_EQ(csv,
            "month,date,begin_balance,sched_principal,prepayment,default,loss,recovery,"
            "gross_interest,servicing,net_interest,total_principal,cash_flow,end_balance,smm,mdr,"
            "cpr,cdr,cum_loss_pct\n");
  EXPECT_EQ(cells_in(std::string(kCashflowCsvHeader)), 19u);
}

TEST(CashflowCsv, HandMadePoolFormatsExactly) {
  const std::string csv = cashflow_csv(two_month_pool(), kCutoff, 17);
  const std::vector<std::string> lines = lines_of(csv);
  ASSERT_EQ(lines.size(), 3u) << csv;
  EXPECT_EQ(lines[1],
            "1,2027-01-18,1000000.00,1234.57,8001.00,500.00,0.00,0.00,5416.67,208.33,5208.33,"
            "9235.56,14443.90,990000.00,0.0006686900,0.0005001250,0.799999,6.000000,0.000000");
  EXPECT_EQ(lines[2],
            "2,2027-02-18,990000.00,1240.13,0.00,0.00,200.50,299.50,5362.50,0.00,5362.50,"
            "1539.63,6902.13,988759.88,0.0000000000,,0.000000,0.000000,0.020050");
  for (const std::string& line : lines) EXPECT_EQ(cells_in(line), 19u) << line;
  EXPECT_EQ(csv.back(), '\n');
  EXPECT_FALSE(contains(csv, "\r"));
  EXPECT_FALSE(contains(csv, "\""));
}

TEST(CashflowCsv, DateColumnIsThePaymentDate) {
  // The rule itself is tested in tests/curves/payment_dates_test.cpp.
  const std::vector<std::string> lines = lines_of(cashflow_csv(flat_pool(14), kCutoff, 0));
  EXPECT_EQ(lines[14].substr(0, 14), "14,2028-02-01,");
  EXPECT_EQ(lines[14].substr(3, 10), detail::iso_date(payment_date(kCutoff, 14, 0)));
  const std::vector<std::string> delayed = lines_of(cashflow_csv(flat_pool(14), kCutoff, 17));
  EXPECT_EQ(delayed[1].substr(0, 13), "1,2027-01-18,");
}

// ---- Loans CSV ----------------------------------------------------------------------------------

LoanFlows flows_for(std::size_t n) {
  LoanFlows f;
  for (std::vector<double>* v :
       {&f.sched_principal, &f.prepayment, &f.defaults, &f.loss, &f.recovery, &f.gross_interest,
        &f.servicing, &f.net_interest, &f.advanced_interest, &f.cash_flow, &f.wal_years})
    v->assign(n, 0.0);
  f.last_month.assign(n, 0);
  return f;
}

TEST(LoanFlowsCsv, HeaderAndOneLinePerLoanInTapeOrder) {
  const LoanArrays loans = make_loans({{.id = "L1", .upb = 100'000.125, .rate = 0.06},
                                       {.id = "L2", .upb = 50'000, .rate = 0.07}});
  LoanFlows f = flows_for(2);
  f.sched_principal = {60'000, 50'000};
  f.prepayment = {40'000.125, 0};
  f.cash_flow = {150'000.5, 70'000.25};
  f.wal_years = {4.56789, 0};
  f.last_month = {180, 360};
  const std::vector<std::string> lines = lines_of(loan_flows_csv(loans, f));
  ASSERT_EQ(lines.size(), 3u);
  // Public interface (README).
  EXPECT_EQ(lines[0],
            "loan_id,row,seller,cutoff_balance,sched_principal,prepayment,default,loss,recovery,"
            "gross_interest,servicing,net_interest,advanced_interest,cash_flow,wal_years,"
            "last_month");
  EXPECT_EQ(lines[1],
            "L1,2,test seller,100000.13,60000.00,40000.13,0.00,0.00,0.00,0.00,0.00,0.00,0.00,"
            "150000.50,4.5679,180");
  EXPECT_EQ(lines[2],
            "L2,3,test seller,50000.00,50000.00,0.00,0.00,0.00,0.00,0.00,0.00,0.00,0.00,"
            "70000.25,0.0000,360");
}

TEST(LoanFlowsCsv, QuotesIdsAndSellersAsRfc4180Says) {
  LoanArrays loans = make_loans({{.id = "A,1", .upb = 1, .rate = 0.05},
                                 {.id = "B\"2\"", .upb = 1, .rate = 0.05},
                                 {.id = "C\nD", .upb = 1, .rate = 0.05},
                                 {.id = " plain ", .upb = 1, .rate = 0.05}});
  loans.seller_names = {"Quill, Moor & Co"};
  const std::string csv = loan_flows_csv(loans, flows_for(4));
  const std::string tail = ",1.00,0.00,0.00,0.00,0.00,0.00,0.00,0.00,0.00,0.00,0.00,0.0000,0\n";
  // source: RFC 4180 section 2, rules 6 and 7 (fields with commas, quotes or line breaks are
  // enclosed in double quotes; a quote inside is doubled).
  EXPECT_TRUE(contains(csv, "\"A,1\",2,\"Quill, Moor & Co\"" + tail)) << csv;
  EXPECT_TRUE(contains(csv, "\"B\"\"2\"\"\",3,\"Quill, Moor & Co\"" + tail)) << csv;
  EXPECT_TRUE(contains(csv, "\"C\nD\",4,\"Quill, Moor & Co\"" + tail)) << csv;
  EXPECT_TRUE(contains(csv, "\n plain ,5,\"Quill, Moor & Co\"" + tail)) << csv;
}

TEST(LoanFlowsCsv, StreamingWriterMatchesTheString) {
  std::vector<testing_support::TestLoan> many;
  for (int i = 0; i < 10'000; ++i)
    many.push_back({.id = "L" + std::to_string(i), .upb = 1000.0 + i, .rate = 0.05});
  const LoanArrays loans = make_loans(many);
  LoanFlows f = flows_for(loans.size());
  for (std::size_t i = 0; i < loans.size(); ++i) f.cash_flow[i] = 0.01 * static_cast<double>(i);
  std::ostringstream streamed;
  write_loan_flows_csv(streamed, loans, f);
  const std::string whole = loan_flows_csv(loans, f);
  EXPECT_EQ(streamed.str(), whole);
  EXPECT_EQ(lines_of(whole).size(), loans.size() + 1);
}

TEST(LoanFlowsCsv, FlowsWithoutLoanTotalsAreAnError) {
  const LoanArrays loans = make_loans({{.id = "L1", .upb = 1, .rate = 0.05}});
  EXPECT_THROW(loan_flows_csv(loans, LoanFlows{}), std::invalid_argument);
}

// ---- Text and JSON ------------------------------------------------------------------------------

Assumptions sample_assumptions() {
  Assumptions a;
  a.prepay = parse_prepay("psa:150");
  a.default_rate = parse_default("cdr:1");
  a.severity = parse_severity("35");
  a.lag_months = 6;
  a.advancing = Advancing::interest;
  return a;
}

TEST(CashflowJson, HasEveryDocumentedKey) {
  const json doc = json::parse(cashflow_json(two_loan_tape(), sample_assumptions(),
                                             two_month_pool(), 17));
  const std::vector<std::string> top = {"file",    "cutoff_date", "payment_delay_days",
                                        "assumptions", "arm_curve", "summary", "months",
                                        "rejected", "caution"};
  std::vector<std::string> keys;
  for (const auto& [key, value] : doc.items()) keys.push_back(key);
  std::sort(keys.begin(), keys.end());
  std::vector<std::string> expected = top;
  std::sort(expected.begin(), expected.end());
  EXPECT_EQ(keys, expected);
  EXPECT_EQ(doc["cutoff_date"], "2026-12-01");
  EXPECT_EQ(doc["payment_delay_days"], 17);
  EXPECT_EQ(doc["caution"], std::string(caution_text()));

  for (const char* key : {"prepay", "default", "severity", "lag_months", "advancing",
                          "delinquent_default"})
    EXPECT_TRUE(doc["assumptions"].contains(key)) << key;
  EXPECT_EQ(doc["assumptions"]["prepay"], "psa:150");
  EXPECT_EQ(doc["assumptions"]["lag_months"], 6);
  EXPECT_EQ(doc["assumptions"]["advancing"], "interest");

  const json& s = doc["summary"];
  for (const char* key :
       {"rows_read", "rows_accepted", "rows_rejected", "upb_rejected", "loans", "cutoff_balance",
        "months", "last_payment_date", "sched_principal", "prepayment", "default", "loss",
        "recovery", "gross_interest", "servicing", "net_interest", "advanced_interest",
        "total_principal", "cash_flow", "cum_loss_pct"})
    EXPECT_TRUE(s.contains(key)) << key;
  EXPECT_EQ(s["months"], 2);
  EXPECT_EQ(s["loans"], 2);
  EXPECT_EQ(s["last_payment_date"], "2027-02-18");
  // identity: totals are the sums of the months.
  EXPECT_DOUBLE_EQ(s["prepayment"].get<double>(), 8'000.996);
  EXPECT_DOUBLE_EQ(s["cum_loss_pct"].get<double>(), 0.02005);

  // Each month has the CSV's columns, in the CSV's order.
  ASSERT_EQ(doc["months"].size(), 2u);
  const nlohmann::ordered_json in_order = nlohmann::ordered_json::parse(
      cashflow_json(two_loan_tape(), sample_assumptions(), two_month_pool(), 17));
  std::string month_keys;
  for (const auto& [key, value] : in_order["months"][0].items())
    month_keys += (month_keys.empty() ? "" : ",") + key;
  // The CSV's columns in order, then the one key the CSV does not carry.
  EXPECT_EQ(month_keys, std::string(kCashflowCsvHeader) + ",advanced_interest");
  EXPECT_EQ(doc["months"][1]["date"], "2027-02-18");
  EXPECT_TRUE(doc["months"][1]["mdr"].is_null());  // NaN

  ASSERT_EQ(doc["rejected"].size(), 3u);  // every rejecting problem; the warning left out
  for (const json& r : doc["rejected"])
    for (const char* key : {"row", "loan_id", "field", "column", "value", "reason"})
      EXPECT_TRUE(r.contains(key)) << key;
  EXPECT_EQ(doc["rejected"][0]["row"], 3);
  EXPECT_EQ(doc["rejected"][0]["column"], "NOTE_RT");
  EXPECT_TRUE(doc["rejected"][2]["field"].is_null());
}

TEST(CashflowJson, AssumptionsObjectReadsBackAsAnAssumptionsFile) {
  const Assumptions a = sample_assumptions();
  const json doc = json::parse(cashflow_json(two_loan_tape(), a, two_month_pool(), 17));
  const Assumptions back = parse_assumptions(doc["assumptions"].dump(), "report");
  EXPECT_EQ(prepay_text(back.prepay), prepay_text(a.prepay));
  EXPECT_EQ(default_text(back.default_rate), default_text(a.default_rate));
  EXPECT_EQ(severity_text(back.severity), severity_text(a.severity));
  EXPECT_EQ(back.lag_months, a.lag_months);
  EXPECT_EQ(back.advancing, a.advancing);
  EXPECT_EQ(back.delinquent_default, a.delinquent_default);
}

TEST(CashflowJson, NoCutoffIsAnError) {
  TapeRead tape = two_loan_tape();
  tape.cutoff.reset();
  EXPECT_THROW(cashflow_json(tape, {}, two_month_pool(), 17), std::invalid_argument);
  EXPECT_THROW(cashflow_text(tape, {}, two_month_pool(), 17), std::invalid_argument);
}

// The month numbers of the text report's table: lines after the "month" header up to a blank.
std::vector<int> table_months(const std::string& text) {
  std::vector<int> months;
  bool inside = false;
  for (const std::string& line : lines_of(text)) {
    if (!inside) {
      inside = line.rfind("  month ", 0) == 0;
      continue;
    }
    if (line.empty()) break;
    months.push_back(std::stoi(line));
  }
  return months;
}

TEST(CashflowText, AssumptionsTotalsRejectsAndCaution) {
  const std::string text = cashflow_text(two_loan_tape(), sample_assumptions(), two_month_pool(), 17);
  EXPECT_TRUE(contains(text, "poolbid cashflows: pool.csv")) << text;
  EXPECT_TRUE(contains(text, "cut-off date: 2026-12-01")) << text;
  EXPECT_TRUE(contains(text, "psa:150")) << text;
  EXPECT_TRUE(contains(text, "cdr:1")) << text;
  EXPECT_TRUE(contains(text, "6 months after default")) << text;
  EXPECT_TRUE(contains(text, "interest")) << text;
  EXPECT_TRUE(contains(text, "month 1 paid 2027-01-18")) << text;
  EXPECT_TRUE(contains(text, "$1,000,000.00")) << text;  // cut-off UPB
  EXPECT_TRUE(contains(text, "$8,001.00")) << text;      // prepayment total
  EXPECT_TRUE(contains(text, "2 rows rejected (UPB $250,000.00) not projected")) << text;
  EXPECT_TRUE(contains(text, "note rate 31% outside 0-25%")) << text;
  EXPECT_TRUE(contains(text, "not a US state code")) << text;
  EXPECT_TRUE(contains(text, "(whole row)")) << text;
  EXPECT_TRUE(contains(text, "1 accepted row with warnings is projected as read")) << text;
  EXPECT_TRUE(contains(text, std::string(caution_text()))) << text;
  EXPECT_EQ(table_months(text), (std::vector<int>{1, 2}));
}

TEST(CashflowText, ShowsTwelveMonthsThenEveryTwelfthAndTheLast) {
  TapeRead tape = two_loan_tape();
  const std::string text = cashflow_text(tape, {}, flat_pool(50), 17);
  EXPECT_EQ(table_months(text),
            (std::vector<int>{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 24, 36, 48, 50}));
  EXPECT_TRUE(contains(text, "then every 12th month and the last")) << text;
  EXPECT_EQ(table_months(cashflow_text(tape, {}, flat_pool(48), 17)).back(), 48);
}

TEST(CashflowText, EmptyPoolSaysSo) {
  TapeRead tape = two_loan_tape();
  tape.loans = LoanArrays{};
  std::string text;
  ASSERT_NO_THROW(text = cashflow_text(tape, {}, flat_pool(0), 17));
  EXPECT_TRUE(contains(text, "No cash flows")) << text;
  EXPECT_TRUE(contains(text, std::string(caution_text()))) << text;
}

TEST(RejectedRowsText, EveryRejectingProblemOneLineEach) {
  const TapeRead tape = two_loan_tape();
  const std::string text = rejected_rows_text(tape);
  const std::vector<std::string> lines = lines_of(text);
  ASSERT_EQ(lines.size(), 5u) << text;  // summary, column heads, three problems
  EXPECT_EQ(lines[0].rfind("poolbid: 2 rows rejected", 0), 0u) << text;
  EXPECT_TRUE(contains(lines[2], "L002") && contains(lines[2], "NOTE_RT") &&
              contains(lines[2], "31"))
      << text;
  EXPECT_FALSE(contains(text, "DTI not given")) << text;  // a warning, not a reject

  TapeRead clean = two_loan_tape();
  clean.problems.clear();
  clean.rows_rejected = 0;
  EXPECT_EQ(rejected_rows_text(clean), "");
}

}  // namespace
}  // namespace poolbid
