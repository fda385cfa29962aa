// Tests of the model in reports: the model line, one loan's explanation as text and JSON, and the
// cash-flow and price reports with a model (the "model" key after "assumptions", which then holds
// only advancing; the text's model section; the caution still last).
#include <gtest/gtest.h>

#include <chrono>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/report.h"
#include "tape/tape.h"
#include "tests/report/report_support.h"

namespace poolbid {
namespace {

using Ordered = nlohmann::ordered_json;
using Keys = std::vector<std::string>;
using testing_support::contains;
using testing_support::kCutoff;
using testing_support::line_starting;
using testing_support::two_loan_tape;

Keys keys_of(const Ordered& object) {
  Keys keys;
  for (auto it = object.begin(); it != object.end(); ++it) keys.push_back(it.key());
  return keys;
}

bool ends_with_caution(const std::string& text) {
  const std::string caution(caution_text());
  return text.size() >= caution.size() &&
         text.compare(text.size() - caution.size() - 1, caution.size(), caution) == 0 &&
         text.back() == '\n';
}

Scenario downturn() {
  Scenario s;
  s.name = "downturn";
  s.description = "prices fall, then recover";
  s.house_price_annual = {-0.05, 0.02};
  s.rate_shock.parallel_bp = 50;
  s.prepay_multiplier = 0.8;
  s.default_multiplier = 1.5;
  return s;
}

LoanExplanation sample_explanation() {
  LoanExplanation e;
  e.loan_id = "L001";
  e.row = 2;
  e.factors = {{"score", "712", "700-739", 1.2, 0.9}, {"ltv", "83.5% updated at cut-off", "80-90",
                                                       1.4, 0.85}};
  e.property_value = 720'000;
  e.junior_liens = 12'345.5;
  e.updated_ltv = 0.835;
  e.timeline_months = 30;
  e.default_multiplier = 1.68;
  e.base_cdr_month1 = 0.0012;
  e.cdr_month1 = 0.002016;
  e.incentive_month1 = -0.00625;
  e.turnover_cpr_month1 = 0.05;
  e.refi_cpr_month1 = 0.01;
  e.cpr_month1 = 0.0595;
  e.severity_month1 = 0.3125;
  e.delinquency = "60";
  e.roll_share = 0.35;
  e.roll_months = 6;
  return e;
}

// ---- The model line and the explanation ---------------------------------------------------------

TEST(ModelLine, NamesTablesScenarioAndItsEconomy) {
  const Scenario s = downturn();
  ModelNote note;
  note.scenario = &s;
  const std::string line = model_line(note);
  EXPECT_EQ(line.rfind("Model: loan-level (built-in tables), scenario downturn: ", 0), 0u) << line;
  EXPECT_TRUE(contains(line, "house prices -5%, then +2% a year")) << line;
  EXPECT_TRUE(contains(line, "+50 bp parallel")) << line;
  EXPECT_TRUE(contains(line, "prepayment x0.8, default x1.5")) << line;
  note.tables = "my-model.json";
  EXPECT_EQ(model_line(note).rfind("Model: loan-level (my-model.json tables)", 0), 0u);
}

TEST(ExplainText, EveryFactorAndTheMonthOneFigures) {
  const std::string text = explain_text(sample_explanation());
  EXPECT_TRUE(contains(text, "explanation of loan L001 (row 2)")) << text;
  const std::string score = line_starting(text, "  score");
  EXPECT_TRUE(contains(score, "712") && contains(score, "700-739") && contains(score, "1.200") &&
              contains(score, "0.900"))
      << text;
  EXPECT_TRUE(contains(line_starting(text, "  ltv"), "80-90")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  property value at cut-off"), "$720,000.00")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  junior liens"), "$12,345.50")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  updated LTV at cut-off"), "83.5%")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  CDR, month 1"), "0.2016%")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  delinquency"),
                       "60: 35.0% of the balance rolls to default over 6 months"))
      << text;
  EXPECT_TRUE(contains(line_starting(text, "  refinance incentive, month 1"), "-0.625%")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  CPR, month 1"), "5.950%")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  severity if it defaulted in month 1"), "31.25%"))
      << text;
  EXPECT_TRUE(contains(line_starting(text, "  liquidation timeline"), "30 months")) << text;
}

TEST(ExplainJson, KeysInOrderNumbersUnrounded) {
  const Ordered doc = Ordered::parse(explain_json(sample_explanation()));
  EXPECT_EQ(keys_of(doc),
            (Keys{"loan_id", "row", "factors", "property_value", "junior_liens", "updated_ltv",
                  "default_multiplier", "base_cdr_month1", "cdr_month1", "delinquency",
                  "roll_share", "roll_months", "incentive_month1", "turnover_cpr_month1",
                  "refi_cpr_month1", "cpr_month1", "severity_month1", "timeline_months"}));
  EXPECT_EQ(doc.at("loan_id"), "L001");
  EXPECT_EQ(doc.at("row"), 2);
  ASSERT_EQ(doc.at("factors").size(), 2u);
  EXPECT_EQ(keys_of(doc.at("factors")[0]),
            (Keys{"factor", "value", "band", "default_multiplier", "prepay_multiplier"}));
  EXPECT_EQ(doc.at("factors")[1].at("band"), "80-90");
  EXPECT_DOUBLE_EQ(doc.at("junior_liens").get<double>(), 12'345.5);
  EXPECT_DOUBLE_EQ(doc.at("cdr_month1").get<double>(), 0.002016);
  EXPECT_EQ(doc.at("timeline_months"), 30);
}

// ---- Cash-flow report with a model --------------------------------------------------------------

PoolFlows one_month_pool() {
  PoolFlows p;
  p.months = 1;
  p.cutoff_balance = 1'000'000;
  for (std::vector<double>* v :
       {&p.begin_balance, &p.sched_principal, &p.prepayment, &p.defaults, &p.loss, &p.recovery,
        &p.gross_interest, &p.servicing, &p.net_interest, &p.advanced_interest,
        &p.total_principal, &p.cash_flow, &p.end_balance, &p.smm, &p.mdr, &p.cpr, &p.cdr,
        &p.cum_loss_pct})
    v->assign(1, 0.0);
  p.begin_balance[0] = 1'000'000;
  p.sched_principal[0] = p.total_principal[0] = p.cash_flow[0] = 1'000'000;
  return p;
}

TEST(CashflowReportWithModel, JsonHasTheModelAfterAssumptions) {
  const Scenario s = downturn();
  const LoanExplanation e = sample_explanation();
  const ModelNote note{"my-model.json", "my-scenarios.json", &s, &e};
  Assumptions a;
  a.advancing = Advancing::interest;
  const Ordered doc =
      Ordered::parse(cashflow_json(two_loan_tape(), a, one_month_pool(), 17, nullptr, &note));
  EXPECT_EQ(keys_of(doc), (Keys{"file", "cutoff_date", "payment_delay_days", "assumptions", "model",
                                "arm_curve", "summary", "months", "rejected", "caution"}));
  // Only advancing is read with the model, so only advancing is reported as an assumption.
  EXPECT_EQ(doc.at("assumptions"), Ordered({{"advancing", "interest"}}));
  const Ordered& model = doc.at("model");
  EXPECT_EQ(keys_of(model), (Keys{"tables", "scenarios", "scenario", "explanation"}));
  EXPECT_EQ(model.at("tables"), "my-model.json");
  EXPECT_EQ(model.at("scenarios"), "my-scenarios.json");
  EXPECT_EQ(model.at("scenario").at("name"), "downturn");
  EXPECT_DOUBLE_EQ(model.at("scenario").at("rate_shock").at("parallel_bp").get<double>(), 50);
  EXPECT_EQ(model.at("explanation").at("loan_id"), "L001");
  EXPECT_EQ(doc.at("caution"), std::string(caution_text()));
}

TEST(CashflowReportWithModel, WithoutAModelTheDocumentIsUnchanged) {
  const Ordered doc = Ordered::parse(cashflow_json(two_loan_tape(), {}, one_month_pool(), 17));
  EXPECT_FALSE(doc.contains("model"));
  EXPECT_TRUE(doc.at("assumptions").contains("prepay"));
}

TEST(CashflowReportWithModel, TextShowsTheModelInPlaceOfTheCurves) {
  const Scenario s = downturn();
  const LoanExplanation e = sample_explanation();
  const ModelNote note{"built-in", "built-in", &s, &e};
  const std::string text =
      cashflow_text(two_loan_tape(), {}, one_month_pool(), 17, nullptr, &note);
  EXPECT_TRUE(contains(text, "\nModel: loan-level (built-in tables), scenario downturn: ")) << text;
  EXPECT_TRUE(contains(text, "  prices fall, then recover\n")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  advancing"), "none")) << text;
  EXPECT_EQ(line_starting(text, "  prepayment (CPR)"), "") << text;  // the curves are not read
  EXPECT_TRUE(contains(text, "explanation of loan L001 (row 2)")) << text;
  EXPECT_TRUE(ends_with_caution(text)) << text;
}

// ---- Price report with a model ------------------------------------------------------------------

YieldCurve flat_curve() {
  YieldCurve c;
  c.source = "flat 4.5%";
  c.as_of = kCutoff;
  c.flat = true;
  c.flat_rate = 0.045;
  return c;
}

BidRequest model_request(const CreditModel& model, const Scenario& scenario) {
  BidRequest r;
  r.value = 0.065;
  r.settlement = {kCutoff, kCutoff, 17};
  r.model = &model;
  r.scenario = scenario;
  return r;
}

BidResult model_result() {
  BidResult r;
  r.cutoff_balance = 1'000'000;
  r.clean_price = r.dirty_price = 99;
  r.expected_loss = 12'000;
  r.expected_loss_pct = 1.2;
  r.cum_default_pct = 4.5;
  r.severity_pct = 26.6666;
  r.scenario = "downturn";
  return r;
}

TEST(PriceReportWithModel, JsonHasTheModelAndTheModelledCredit) {
  const CreditModel model = default_credit_model();
  const Scenario s = downturn();
  const BidRequest request = model_request(model, s);
  const ModelNote note{"built-in", "built-in", &request.scenario, nullptr};
  const Ordered doc =
      Ordered::parse(price_json(two_loan_tape(), flat_curve(), request, model_result(), &note));
  EXPECT_EQ(keys_of(doc),
            (Keys{"file", "cutoff_date", "settlement_date", "payment_delay_days", "curve",
                  "assumptions", "model", "target", "bid", "loss_adjusted", "no_loss", "credit",
                  "risk", "loans_priced", "rejected", "caution"}));
  EXPECT_EQ(doc.at("model").at("tables"), "built-in");
  EXPECT_EQ(doc.at("model").at("scenario").at("name"), "downturn");
  EXPECT_TRUE(doc.at("model").at("explanation").is_null());
  EXPECT_EQ(keys_of(doc.at("credit")), (Keys{"credit_cost_bp", "expected_loss",
                                             "expected_loss_pct", "cum_default_pct",
                                             "severity_pct"}));
  EXPECT_DOUBLE_EQ(doc.at("credit").at("cum_default_pct").get<double>(), 4.5);
}

TEST(PriceReportWithModel, WithoutANoteTheTablesAreNamedFromTheModel) {
  const CreditModel built_in = default_credit_model();
  CreditModel custom = built_in;
  custom.sale_cost += 0.01;
  const Scenario s = downturn();
  for (const auto& [model, name] : {std::pair{&built_in, "built-in"}, {&custom, "custom"}}) {
    const Ordered doc = Ordered::parse(
        price_json(two_loan_tape(), flat_curve(), model_request(*model, s), model_result()));
    EXPECT_EQ(doc.at("model").at("tables"), name);
    EXPECT_TRUE(doc.at("model").at("scenarios").is_null());
  }
}

TEST(PriceReportWithModel, TextShowsModelCreditAndEndsWithTheCaution) {
  const CreditModel model = default_credit_model();
  const BidRequest request = model_request(model, downturn());
  const std::string text = price_text(two_loan_tape(), flat_curve(), request, model_result());
  EXPECT_TRUE(contains(text, "\nModel: loan-level (built-in tables), scenario downturn: ")) << text;
  EXPECT_EQ(line_starting(text, "  prepayment (CPR)"), "") << text;
  EXPECT_TRUE(contains(line_starting(text, "  lifetime defaults"), "4.5000%")) << text;
  EXPECT_TRUE(contains(line_starting(text, "  loss severity"), "26.67%")) << text;
  EXPECT_TRUE(contains(text, "every loan re-projected")) << text;
  EXPECT_TRUE(ends_with_caution(text)) << text;
}

}  // namespace
}  // namespace poolbid
