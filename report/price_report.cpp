// `poolbid price` reports: the bid as a terminal text report and a JSON document (tape, curve,
// assumptions, target, bid, loss-adjusted and no-loss views, credit, risk, rejected rows), and
// each loan's value at the pool's yield as CSV. Units: JSON rates and spreads decimals, prices
// percent of cut-off UPB, money dollars, fields ending in _bp basis points; CSV as its header says.
#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>
#include <fmt/format.h>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/format.h"
#include "report/model_parts.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::pool_view_json;
using detail::short_number;

using detail::Align;
using detail::Json;

using detail::count_text;
using detail::CsvBuffer;
using detail::kValueWidth;
using detail::number_or_null;
using detail::put_fixed;
using detail::put_money;

// Text report.
constexpr int kPriceDecimals = 3;     // percent of UPB: 98.625
constexpr int kRateDecimals = 3;      // yields in percent: 7.250
constexpr int kBpDecimals = 1;        // spreads in basis points
constexpr int kYearsDecimals = 2;     // WAL, durations, convexity
constexpr int kLossPctDecimals = 4;   // expected loss, percent of UPB
// Loans CSV.
constexpr int kCsvPriceDecimals = 6;
constexpr int kCsvRateDecimals = 4;   // note rate, percent
constexpr int kCsvWalDecimals = 4;
constexpr int kCsvLossPctDecimals = 4;

// ---- Text pieces --------------------------------------------------------------------------------

// A decimal rate as percent: 0.0725 -> "7.250"; "-" when not finite.
std::string percent(double rate, int decimals = kRateDecimals) {
  return detail::fixed_or_dash(100 * rate, decimals);
}

// A decimal spread in basis points: 0.02505 -> "250.5".
std::string basis_points(double spread) {
  return detail::fixed_or_dash(1e4 * spread, kBpDecimals);
}

std::string_view kind_name(CurveQuote::Kind kind) {
  switch (kind) {
    case CurveQuote::Kind::deposit: return "deposit";
    case CurveQuote::Kind::swap: return "swap";
    case CurveQuote::Kind::par_yield: return "par_yield";
  }
  return "unknown";
}

std::string_view target_name(BidTarget target) {
  switch (target) {
    case BidTarget::yield: return "yield";
    case BidTarget::spread: return "spread";
    case BidTarget::price: return "price";
  }
  return "unknown";
}

// "target: loss-adjusted yield 7.250% BEY" and its kin.
std::string target_text(const BidRequest& request) {
  switch (request.target) {
    case BidTarget::yield:
      return fmt::format("loss-adjusted yield {}% BEY", percent(request.value));
    case BidTarget::spread:
      return fmt::format("loss-adjusted Z-spread {} bp", short_number(1e4 * request.value));
    case BidTarget::price:
      return fmt::format("clean price {}", detail::fixed_or_dash(request.value, kPriceDecimals));
  }
  return "unknown";
}

bool shifted(const YieldCurve& curve) {
  return curve.parallel_shift_bp != 0 || !curve.key_rate_shifts.empty();
}

// "+25 bp parallel; key rates 2y +10 bp, 10y -5 bp".
std::string shift_text(const YieldCurve& curve) {
  std::string out;
  if (curve.parallel_shift_bp != 0)
    out = fmt::format("{} bp parallel", short_number(curve.parallel_shift_bp, true));
  if (!curve.key_rate_shifts.empty()) {
    out += out.empty() ? "key rates " : "; key rates ";
    bool first = true;
    for (const auto& [years, bp] : curve.key_rate_shifts) {
      out += fmt::format("{}{}y {} bp", first ? "" : ", ", short_number(years),
                         short_number(bp, true));
      first = false;
    }
  }
  return out;
}

std::string curve_section(const YieldCurve& curve) {
  detail::TextTable table{{}, {Align::left, Align::left}, {}};
  table.rows.push_back({"source", detail::display_text(curve.source, 200)});
  table.rows.push_back({"as of", detail::iso_date(curve.as_of)});
  if (!curve.description.empty())
    table.rows.push_back({"description", detail::display_text(curve.description, 200)});
  if (curve.flat) {
    table.rows.push_back(
        {"rates", fmt::format("flat {}% (continuous zero rate, Actual/365 Fixed)",
                              percent(curve.flat_rate))});
  } else {
    std::string quotes = detail::count_of(curve.quotes.size(), "quote", "quotes");
    if (!curve.quotes.empty()) {
      const auto [shortest, longest] = std::minmax_element(
          curve.quotes.begin(), curve.quotes.end(),
          [](const CurveQuote& a, const CurveQuote& b) { return a.months < b.months; });
      quotes += fmt::format(", {} to {}", detail::display_text(shortest->tenor, kValueWidth),
                            detail::display_text(longest->tenor, kValueWidth));
    }
    table.rows.push_back({"rates", std::move(quotes)});
  }
  if (shifted(curve)) table.rows.push_back({"shift", shift_text(curve)});
  return detail::render(table);
}

std::string assumptions_section(const Assumptions& a) {
  const detail::TextTable table{{}, {Align::left, Align::left}, detail::assumption_rows(a)};
  return detail::render(table);
}

double accrued_pct(const BidResult& r) {
  return r.cutoff_balance > 0 ? 100 * r.accrued / r.cutoff_balance
                              : std::numeric_limits<double>::quiet_NaN();
}

std::string bid_section(const BidResult& r) {
  detail::TextTable table{{}, {Align::left, Align::right, Align::right, Align::left}, {}};
  auto price = [](double x) { return detail::fixed_or_dash(x, kPriceDecimals); };
  table.rows = {
      {"clean price", price(r.clean_price), detail::dollars(r.clean_value),
       "the bid, before accrued interest"},
      {"accrued interest", price(accrued_pct(r)), detail::dollars(r.accrued),
       "cut-off to settlement, 30/360, at the net coupon"},
      {"dirty price", price(r.dirty_price), detail::dollars(r.dirty_value),
       "what the buyer pays at settlement"},
  };
  return detail::render(table);
}

std::string views_section(const BidResult& r) {
  detail::TextTable table{
      {"", "loss-adjusted", "no-loss"}, {Align::left, Align::right, Align::right}, {}};
  const PoolView& la = r.loss_adjusted;
  const PoolView& nl = r.no_loss;
  auto years = [](double x) { return detail::fixed_or_dash(x, kYearsDecimals); };
  table.rows = {
      {"cash-flow yield, monthly compounding (%)", percent(la.cfy), percent(nl.cfy)},
      {"bond-equivalent yield (%)", percent(la.bey), percent(nl.bey)},
      {"Z-spread (bp)", basis_points(la.z_spread), basis_points(nl.z_spread)},
      {"par yield at WAL (%)", percent(la.par_yield_at_wal), percent(nl.par_yield_at_wal)},
      {"spread at WAL (bp)", basis_points(la.spread_at_wal), basis_points(nl.spread_at_wal)},
      {"WAL (years)", years(la.wal_years), years(nl.wal_years)},
      {"modified duration", years(la.modified_duration), years(nl.modified_duration)},
  };
  return detail::render(table);
}

// With the model: its lifetime defaults and severity too.
std::string credit_section(const BidResult& r, bool model) {
  detail::TextTable table{{}, {Align::left, Align::right, Align::left}, {}};
  table.rows = {
      {"credit cost", detail::fixed_or_dash(r.credit_cost_bp, kBpDecimals) + " bp",
       "no-loss Z-spread less loss-adjusted"},
      {"expected lifetime loss", detail::dollars(r.expected_loss),
       fmt::format("{}% of cut-off UPB", detail::fixed_or_dash(r.expected_loss_pct,
                                                               kLossPctDecimals))},
  };
  if (model) {
    table.rows.push_back({"lifetime defaults",
                          detail::fixed_or_dash(r.cum_default_pct, kLossPctDecimals) + "%",
                          "of cut-off UPB, as the model projects them"});
    table.rows.push_back({"loss severity", detail::fixed_or_dash(r.severity_pct, 2) + "%",
                          "lifetime loss / lifetime defaults"});
  }
  return detail::render(table);
}

std::string risk_section(const BidResult& r, const BidRequest& request) {
  detail::TextTable table{{}, {Align::left, Align::right, Align::left}, {}};
  auto years = [](double x) { return detail::fixed_or_dash(x, kYearsDecimals); };
  table.rows = {
      {"effective duration", years(r.effective_duration), ""},
      {"effective convexity", years(r.effective_convexity), ""},
      {"DV01", detail::dollars(r.dv01), "per 1 bp fall in the curve"},
  };
  for (const BidResult::KeyRateDuration& k : r.key_rate_durations)
    table.rows.push_back({fmt::format("key-rate duration {}y", short_number(k.years)),
                          years(k.duration), "that tenor's zero rate alone, as a triangle"});
  table.rows.push_back({"ARM loans on coupon paths", count_text(r.arm_loans),
                        "coupons from the curve's index forwards"});
  if (request.model)
    return fmt::format("risk (curve moved up and down {} bp, every loan re-projected, Z-spread "
                       "held; durations in years)\n{}"
                       "  (the model's refinancing reads the market mortgage rate, so "
                       "prepayments and ARM coupons\n   move with the curve)\n",
                       short_number(request.shock_bp), detail::render(table));
  return fmt::format("risk (curve moved up and down {} bp, cash flows re-projected, Z-spread "
                     "held; durations in years)\n{}"
                     "  (the prepayment and default curves do not read rates: only ARM coupons "
                     "move with the curve,\n   so the negative convexity refinancing gives "
                     "mortgages is not in these figures)\n",
                     short_number(request.shock_bp), detail::render(table));
}

// [{"years": 2, "duration": 0.41}, ...] in key-tenor order.
Json key_rate_json(const BidResult& r) {
  Json out = Json::array();
  for (const BidResult::KeyRateDuration& k : r.key_rate_durations)
    out.push_back(Json{{"years", number_or_null(k.years)},
                       {"duration", number_or_null(k.duration)}});
  return out;
}

// The pricing cut-off; the tape's, when it has one, must be the same day.
Date cutoff_of(const TapeRead& tape, const BidRequest& request) {
  const Date cutoff = request.settlement.cutoff;
  if (!cutoff.ok())
    throw std::invalid_argument("price report: the settlement has no valid cut-off date");
  if (tape.cutoff && *tape.cutoff != cutoff)
    throw std::invalid_argument(fmt::format(
        "price report: the tape's cut-off {} differs from the settlement's cut-off {}",
        detail::iso_date(*tape.cutoff), detail::iso_date(cutoff)));
  return cutoff;
}

// The model note a report shows: the caller's, or one made from the request (tables named
// "built-in" or "custom"); null without a model.
struct ModelView {
  std::optional<ModelNote> made;
  const ModelNote* note = nullptr;
};
ModelView model_view(const BidRequest& request, const ModelNote* given) {
  ModelView view;
  if (!request.model) return view;
  if (given) {
    view.made = *given;
  } else {
    view.made = ModelNote{detail::tables_name(*request.model), "", nullptr, nullptr};
  }
  if (!view.made->scenario) view.made->scenario = &request.scenario;
  view.note = &*view.made;
  return view;
}

// The curve valued on: with the model, the given curve moved by the scenario's rate shock.
const YieldCurve& valued_curve(const YieldCurve& curve, const BidRequest& request,
                               const BidResult& result) {
  return request.model && result.curve.term_structure ? result.curve : curve;
}

// ---- JSON pieces --------------------------------------------------------------------------------

Json curve_json(const YieldCurve& curve) {
  Json quotes = Json::array();
  for (const CurveQuote& q : curve.quotes)
    quotes.push_back(Json{{"kind", std::string(kind_name(q.kind))},
                          {"tenor", q.tenor},
                          {"rate", number_or_null(q.rate)}});
  Json key_rates = Json::array();
  for (const auto& [years, bp] : curve.key_rate_shifts)
    key_rates.push_back(Json{{"years", number_or_null(years)}, {"bp", number_or_null(bp)}});
  return Json{
      {"source", curve.source},
      {"as_of", detail::iso_date(curve.as_of)},
      {"description", curve.description},
      {"flat", curve.flat},
      {"flat_rate", curve.flat ? number_or_null(curve.flat_rate) : Json(nullptr)},
      {"quotes", std::move(quotes)},
      {"parallel_shift_bp", number_or_null(curve.parallel_shift_bp)},
      {"key_rate_shifts", std::move(key_rates)},
  };
}

// ---- Loans CSV ----------------------------------------------------------------------------------

void check_sizes(const LoanArrays& loans, const LoanFlows& f) {
  if (f.present_value.empty())
    throw std::invalid_argument(
        "loan values: no present values; price the pool with loan values requested");
  detail::check_loan_columns("loan values", loans, {&f.present_value, &f.loss, &f.wal_years});
}

// Loans [first, last) appended to `out`, one line each.
void put_value_rows(CsvBuffer& out, const LoanArrays& loans, const LoanFlows& f,
                    const std::vector<std::string>& sellers, std::size_t first,
                    std::size_t last) {
  for (std::size_t i = first; i < last; ++i) {
    const double balance = loans.current_balance[i];
    const double value = f.present_value[i];
    const double loss = f.loss[i];
    detail::put_loan_cells(out, loans, sellers, i);
    out.push_back(',');
    put_money(out, balance);
    out.push_back(',');
    put_fixed(out, 100 * loans.note_rate[i], kCsvRateDecimals);
    out.push_back(',');
    put_money(out, value);
    out.push_back(',');
    put_fixed(out, 100 * value / balance, kCsvPriceDecimals);  // empty cell if balance is 0
    out.push_back(',');
    put_fixed(out, f.wal_years[i], kCsvWalDecimals);
    out.push_back(',');
    put_money(out, loss);
    out.push_back(',');
    put_fixed(out, 100 * loss / balance, kCsvLossPctDecimals);
    out.push_back('\n');
  }
}

}  // namespace

std::string price_text(const TapeRead& tape, const YieldCurve& given_curve,
                       const BidRequest& request, const BidResult& result,
                       const ModelNote* model_note) {
  const Date cutoff = cutoff_of(tape, request);
  const YieldCurve& curve = valued_curve(given_curve, request, result);
  const ModelView model = model_view(request, model_note);
  const int delay = request.settlement.delay_days;
  std::string out = fmt::format("poolbid price: {}\n", detail::display_text(tape.file, 200));
  out += fmt::format("loans priced: {} (UPB {}), net coupon {}%\n",
                     count_text(tape.rows_accepted()), detail::dollars(result.cutoff_balance),
                     percent(result.net_coupon));
  out += fmt::format("cut-off date: {}\nsettlement date: {}\n", detail::iso_date(cutoff),
                     detail::iso_date(request.settlement.settle));
  out += fmt::format("payment delay: {} (month 1 paid {})\n",
                     detail::count_of(static_cast<std::size_t>(std::max(delay, 0)), "day",
                                      "days"),
                     detail::iso_date(payment_date(cutoff, 1, delay)));

  out += "\ncurve\n";
  out += curve_section(curve);
  if (model.note) {
    out += "\nmodel (loss-adjusted view; the no-loss view turns defaults off)\n";
    out += detail::model_section(*model.note, request.assumptions);
    out += detail::explanation_section(*model.note);
  } else {
    out += "\nassumptions (loss-adjusted view; the no-loss view turns defaults off)\n";
    out += assumptions_section(request.assumptions);
  }
  out += fmt::format("\ntarget: {}\n", target_text(request));

  out += "\nbid (price in % of cut-off UPB, value in dollars)\n";
  out += bid_section(result);
  out += "\nat the bid\n";
  out += views_section(result);
  out += "\ncredit\n";
  out += credit_section(result, model.note != nullptr);
  out += '\n';
  out += risk_section(result, request);

  out += detail::rejects_and_caution(tape, "priced");
  return out;
}

std::string price_json(const TapeRead& tape, const YieldCurve& given_curve,
                       const BidRequest& request, const BidResult& result,
                       const ModelNote* model_note) {
  const Date cutoff = cutoff_of(tape, request);
  const YieldCurve& curve = valued_curve(given_curve, request, result);
  const ModelView model = model_view(request, model_note);
  const BidResult& r = result;
  Json document = {
      {"file", tape.file},
      {"cutoff_date", detail::iso_date(cutoff)},
      {"settlement_date", detail::iso_date(request.settlement.settle)},
      {"payment_delay_days", request.settlement.delay_days},
      {"curve", curve_json(curve)},
      {"assumptions", model.note ? detail::model_assumptions_json(request.assumptions)
                                 : detail::assumptions_json(request.assumptions)},
      {"target", Json{{"kind", std::string(target_name(request.target))},
                      {"value", number_or_null(request.value)}}},
      {"bid", Json{{"clean_price", number_or_null(r.clean_price)},
                   {"dirty_price", number_or_null(r.dirty_price)},
                   {"accrued_pct", number_or_null(accrued_pct(r))},
                   {"accrued", number_or_null(r.accrued)},
                   {"clean_value", number_or_null(r.clean_value)},
                   {"dirty_value", number_or_null(r.dirty_value)}}},
      {"loss_adjusted", pool_view_json(r.loss_adjusted)},
      {"no_loss", pool_view_json(r.no_loss)},
      {"credit", Json{{"credit_cost_bp", number_or_null(r.credit_cost_bp)},
                      {"expected_loss", number_or_null(r.expected_loss)},
                      {"expected_loss_pct", number_or_null(r.expected_loss_pct)}}},
      {"risk", Json{{"effective_duration", number_or_null(r.effective_duration)},
                    {"effective_convexity", number_or_null(r.effective_convexity)},
                    {"dv01", number_or_null(r.dv01)},
                    {"shock_bp", number_or_null(request.shock_bp)},
                    {"key_rate_durations", key_rate_json(r)},
                    {"arm_loans", r.arm_loans}}},
      {"loans_priced", Json{{"loans", tape.rows_accepted()},
                            {"cutoff_balance", number_or_null(r.cutoff_balance)},
                            {"net_coupon", number_or_null(r.net_coupon)},
                            {"rows_read", tape.rows_read},
                            {"rows_rejected", tape.rows_rejected},
                            {"upb_rejected", number_or_null(tape.upb_rejected)}}},
      {"rejected", detail::rejected_json(tape)},
      {"caution", std::string(caution_text())},
  };
  if (model.note) {
    document = detail::insert_after(document, "assumptions", "model",
                                    detail::model_json(*model.note));
    document["credit"]["cum_default_pct"] = number_or_null(r.cum_default_pct);
    document["credit"]["severity_pct"] = number_or_null(r.severity_pct);
  }
  return detail::dump_json(document);
}

std::string loan_values_csv(const LoanArrays& loans, const BidResult& result) {
  const LoanFlows& flows = result.flows.loans;
  check_sizes(loans, flows);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  return detail::csv_document(kLoanValuesCsvHeader, loans.size(),
                              [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                                put_value_rows(out, loans, flows, sellers, first, last);
                              });
}

void write_loan_values_csv(std::ostream& stream, const LoanArrays& loans,
                           const BidResult& result) {
  const LoanFlows& flows = result.flows.loans;
  check_sizes(loans, flows);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  detail::write_csv_document(stream, kLoanValuesCsvHeader, loans.size(),
                             [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                               put_value_rows(out, loans, flows, sellers, first, last);
                             });
}

}  // namespace poolbid
