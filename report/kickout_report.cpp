// `poolbid price --kickouts` reports: the price report with a kick-out section (credit box,
// decision economics, counts by reason, the bid with and without the kicked-out loans, the list),
// the same in JSON, and every loan's decision as CSV.
#include <algorithm>
#include <cmath>
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
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

using detail::pool_view_json;

using detail::Align;
using detail::CsvBuffer;
using detail::Json;
using detail::number_or_null;
using detail::put_fixed;
using detail::put_money;

constexpr int kPriceDecimals = 3;     // percent of UPB, as the price report
constexpr int kRateDecimals = 3;      // yields in percent
constexpr int kBpDecimals = 1;
constexpr int kLossPctDecimals = 4;
constexpr int kProbabilityDecimals = 2;  // default probabilities and p* in percent, text
// CSV.
constexpr int kCsvPriceDecimals = 6;
constexpr int kCsvPctDecimals = 4;

std::string percent(double rate, int decimals) { return detail::fixed_or_dash(100 * rate, decimals); }

// A number as typed: 620 -> "620", 95.5 -> "95.5" (up to 4 places).
std::string short_number(double x) {
  if (!std::isfinite(x)) return "-";
  std::string text = fmt::format("{:.4f}", x);
  text.erase(text.find_last_not_of('0') + 1);
  if (text.back() == '.') text.pop_back();
  return text;
}

template <class E>
std::vector<std::string> codes(const std::vector<E>& values) {
  std::vector<std::string> out;
  for (E v : values) out.emplace_back(to_string(v));
  return out;
}

std::vector<std::string> state_codes(const CreditBox& box) {
  std::vector<std::string> out;
  for (std::uint8_t s : box.states) out.emplace_back(state_code(s));
  return out;
}

// "full, limited" in plain words, or "any".
std::string allowed_text(const std::vector<std::string>& values) {
  if (values.empty()) return "any";
  std::string out;
  for (const std::string& v : values)
    out += fmt::format("{}{}", out.empty() ? "" : ", ", detail::plain_label(v));
  return out;
}

// The reasons a loan was kicked out, in order: the box's, then value, then default probability.
std::vector<std::string> all_reasons(const LoanDecision& d) {
  std::vector<std::string> out = d.box_reasons;
  if (d.below_price)
    out.push_back(fmt::format("value {} below allocated {}",
                              detail::fixed_or_dash(d.value_price, kPriceDecimals),
                              detail::fixed_or_dash(d.allocated_price, kPriceDecimals)));
  if (d.above_break_even)
    out.push_back(fmt::format("default probability {}% above break-even {}%",
                              percent(d.default_probability, kProbabilityDecimals),
                              percent(d.break_even, kProbabilityDecimals)));
  return out;
}

std::string joined(const std::vector<std::string>& items, std::string_view separator) {
  std::string out;
  for (const std::string& item : items) {
    if (!out.empty()) out += separator;
    out += item;
  }
  return out;
}

// ---- Text ---------------------------------------------------------------------------------------

std::string box_section(const CreditBox& box) {
  detail::TextTable table{{}, {Align::left, Align::left}, {}};
  auto at_most = [](const std::optional<double>& limit) {
    return limit ? fmt::format("at most {}%", short_number(100 * *limit)) : std::string("any");
  };
  table.rows = {
      {"credit score", box.min_score ? "at least " + short_number(*box.min_score) : "any"},
      {"LTV", at_most(box.max_ltv)},
      {"CLTV", at_most(box.max_cltv)},
      {"DTI", at_most(box.max_dti)},
      {"documentation", allowed_text(codes(box.documentation))},
      {"occupancy", allowed_text(codes(box.occupancy))},
      {"property type", allowed_text(codes(box.property_types))},
      {"state", allowed_text(state_codes(box))},
      {"a screened field missing", box.missing_inside ? "inside the box" : "outside the box"},
  };
  std::string title = fmt::format("credit box: {}", detail::display_text(box.source, 200));
  if (!box.description.empty())
    title += fmt::format(" ({})", detail::display_text(box.description, 200));
  return title + "\n" + detail::render(table);
}

// "loans' own p*: 11.11% to 100.00%, 38.52% weighted by UPB (1,990 with modelled severity; 10
// with none use s)".
std::string own_break_even_line(const LoanArrays& loans, const KickoutResult& r) {
  double low = INFINITY, high = -INFINITY, weighted = 0, upb = 0;
  std::size_t modelled = 0;
  for (std::size_t i = 0; i < r.loans.size(); ++i) {
    const LoanDecision& d = r.loans[i];
    if (!d.modelled_severity) continue;
    ++modelled;
    low = std::min(low, d.break_even);
    high = std::max(high, d.break_even);
    weighted += d.break_even * loans.current_balance[i];
    upb += loans.current_balance[i];
  }
  const std::size_t unmodelled = r.loans.size() - modelled;
  if (modelled == 0)
    return "  no loan is projected to default: every loan's p* uses s\n";
  return fmt::format("  loans' own p*: {}% to {}%, {}% weighted by UPB ({} with a modelled "
                     "severity{})\n",
                     percent(low, 2), percent(high, 2), percent(weighted / upb, 2),
                     detail::count_text(modelled),
                     unmodelled == 0
                         ? std::string()
                         : fmt::format("; {} without a default use s",
                                       detail::count_text(unmodelled)));
}

std::string economics_section(const LoanArrays& loans, const KickoutResult& r) {
  detail::TextTable table{{}, {Align::left, Align::right, Align::left}, {}};
  const DecisionEconomics& e = r.economics;
  table.rows = {
      {"margin m", percent(e.margin, 2) + "%", "lost by declining a loan that would have paid"},
      {"bad-loan loss s", percent(e.bad_loan_loss, 2) + "%",
       "lost by approving a loan that defaults"},
      {"break-even p* = m / (m + s)", percent(r.break_even, 2) + "%",
       "lifetime default probability at which the two balance"},
  };
  return "decision economics (shares of a loan's balance; illustrative, set with --margin and "
         "--bad-loan-loss)\n" +
         detail::render(table) +
         "  a loan is kicked out above its own p*, which uses its modelled severity (loss / "
         "defaults)\n  where it defaults and s where it does not\n" +
         own_break_even_line(loans, r);
}

std::string counts_section(const KickoutResult& r) {
  detail::TextTable table{{"", "loans", "UPB"}, {Align::left, Align::right, Align::right}, {}};
  auto row = [&](std::string label, const KickoutTally& t) {
    table.rows.push_back({std::move(label), detail::count_text(t.loans), detail::dollars(t.upb)});
  };
  row("outside the credit box", r.outside_box);
  for (std::size_t s = 0; s < r.by_screen.size(); ++s)
    if (r.by_screen[s].loans > 0)
      row(fmt::format("  {}", to_string(static_cast<BoxScreen>(s))), r.by_screen[s]);
  row("value below allocated price", r.below_price);
  row("default probability above break-even", r.above_break_even);
  row("kicked out (any reason)", r.kicked_total);
  row("kept", r.kept_total);
  return "decisions (a loan may have several reasons)\n" + detail::render(table) +
         "  (value below allocated price: worth less at the bid's yield than its share of the bid, "
         "the bid\n   shared out by each loan's no-loss value -- so its coupon and term are paid "
         "for and only\n   its credit can put it below)\n";
}

std::string bid_comparison_section(const KickoutResult& r) {
  const BidResult& w = r.whole;
  if (!r.without) {
    if (r.kicked.empty()) return "no loan is kicked out: the bid above stands\n";
    return "every loan is kicked out: there is no bid without them\n";
  }
  const BidResult& k = *r.without;
  detail::TextTable table{{"", "whole pool", "without kick-outs", "change"},
                          {Align::left, Align::right, Align::right, Align::right},
                          {}};
  auto price = [](double x) { return detail::fixed_or_dash(x, kPriceDecimals); };
  auto signed_fixed = [](double x, int decimals) {
    return std::isfinite(x) ? fmt::format("{:+.{}f}", x, decimals) : std::string("-");
  };
  table.rows = {
      {"loans", detail::count_text(r.kept.size() + r.kicked.size()),
       detail::count_text(r.kept.size()), "-" + detail::count_text(r.kicked.size())},
      {"cut-off UPB", detail::dollars(w.cutoff_balance), detail::dollars(k.cutoff_balance),
       detail::dollars(k.cutoff_balance - w.cutoff_balance)},
      {"clean price (%)", price(w.clean_price), price(k.clean_price),
       signed_fixed(k.clean_price - w.clean_price, kPriceDecimals)},
      {"dirty price (%)", price(w.dirty_price), price(k.dirty_price),
       signed_fixed(k.dirty_price - w.dirty_price, kPriceDecimals)},
      {"clean value", detail::dollars(w.clean_value), detail::dollars(k.clean_value),
       detail::dollars(k.clean_value - w.clean_value)},
      {"loss-adjusted BEY (%)", percent(w.loss_adjusted.bey, kRateDecimals),
       percent(k.loss_adjusted.bey, kRateDecimals),
       signed_fixed(100 * (k.loss_adjusted.bey - w.loss_adjusted.bey), kRateDecimals)},
      {"loss-adjusted Z-spread (bp)", detail::fixed_or_dash(1e4 * w.loss_adjusted.z_spread, kBpDecimals),
       detail::fixed_or_dash(1e4 * k.loss_adjusted.z_spread, kBpDecimals),
       signed_fixed(1e4 * (k.loss_adjusted.z_spread - w.loss_adjusted.z_spread), kBpDecimals)},
      {"credit cost (bp)", detail::fixed_or_dash(w.credit_cost_bp, kBpDecimals),
       detail::fixed_or_dash(k.credit_cost_bp, kBpDecimals),
       signed_fixed(k.credit_cost_bp - w.credit_cost_bp, kBpDecimals)},
      {"expected lifetime loss (% of UPB)", detail::fixed_or_dash(w.expected_loss_pct,
                                                                  kLossPctDecimals),
       detail::fixed_or_dash(k.expected_loss_pct, kLossPctDecimals),
       signed_fixed(k.expected_loss_pct - w.expected_loss_pct, kLossPctDecimals)},
  };
  return "the bid with and without the kicked-out loans (same target; prices in % of each "
         "pool's cut-off UPB)\n" +
         detail::render(table);
}

std::string list_section(const LoanArrays& loans, const KickoutResult& r,
                         std::size_t list_limit) {
  if (r.kicked.empty()) return "";
  const std::size_t shown = std::min(list_limit, r.kicked.size());
  std::string out = shown == r.kicked.size()
                        ? fmt::format("kicked-out loans ({}, tape order)\n",
                                      detail::count_text(r.kicked.size()))
                        : fmt::format("kicked-out loans (the first {} of {}, tape order)\n",
                                      detail::count_text(shown),
                                      detail::count_text(r.kicked.size()));
  if (shown == 0) {
    out += "  (not listed here; every loan's decision is in --kickouts-csv FILE and --json)\n";
    return out;
  }
  detail::TextTable table{{"row", "loan id", "UPB", "value", "default %", "p* %", "reasons"},
                          {Align::right, Align::left, Align::right, Align::right, Align::right,
                           Align::right, Align::left},
                          {}};
  for (std::size_t k = 0; k < shown; ++k) {
    const std::uint32_t i = r.kicked[k];
    const LoanDecision& d = r.loans[i];
    table.rows.push_back({detail::count_text(loans.row[i]),
                          detail::display_text(loans.loan_id[i], detail::kLoanIdWidth, "(none)"),
                          detail::dollars(loans.current_balance[i]),
                          detail::fixed_or_dash(d.value_price, kPriceDecimals),
                          percent(d.default_probability, kProbabilityDecimals),
                          percent(d.break_even, kProbabilityDecimals),
                          joined(all_reasons(d), "; ")});
  }
  out += detail::render(table);
  if (shown < r.kicked.size())
    out += fmt::format("  ... and {} more: every loan's decision is in --kickouts-csv FILE and "
                       "--json\n",
                       detail::count_text(r.kicked.size() - shown));
  out += "  (value: the loan's cash at the pool's loss-adjusted yield per 100 of its balance; "
         "allocated:\n   the bid's dirty value shared out by no-loss value at that yield, per 100)\n";
  return out;
}

std::string kickout_section(const LoanArrays& loans, const KickoutResult& r,
                            std::size_t list_limit) {
  std::string out = "\nkick-outs\n";
  out += box_section(r.box);
  out += '\n';
  out += economics_section(loans, r);
  out += '\n';
  out += counts_section(r);
  out += '\n';
  out += bid_comparison_section(r);
  const std::string list = list_section(loans, r, list_limit);
  if (!list.empty()) out += "\n" + list;
  return out;
}

// ---- JSON ---------------------------------------------------------------------------------------

// The box as a credit box file reads it (LTV, CLTV and DTI in percent).
Json box_json(const CreditBox& box) {
  auto limit = [](const std::optional<double>& x, double scale) {
    return x ? number_or_null(*x * scale) : Json(nullptr);
  };
  auto list = [](std::vector<std::string> values) {
    return values.empty() ? Json(nullptr) : Json(std::move(values));
  };
  return Json{
      {"description", box.description},
      {"min_score", limit(box.min_score, 1)},
      {"max_ltv", limit(box.max_ltv, 100)},
      {"max_cltv", limit(box.max_cltv, 100)},
      {"max_dti", limit(box.max_dti, 100)},
      {"documentation", list(codes(box.documentation))},
      {"occupancy", list(codes(box.occupancy))},
      {"property_types", list(codes(box.property_types))},
      {"states", list(state_codes(box))},
      {"missing_fields", box.missing_inside ? "inside" : "outside"},
  };
}

Json tally_json(const KickoutTally& t) {
  return Json{{"loans", t.loans}, {"upb", number_or_null(t.upb)}};
}

// Screen keys in JSON: "score", "ltv", "cltv", "dti", "documentation", "occupancy",
// "property_type", "state".
std::string screen_key(BoxScreen s) {
  switch (s) {
    case BoxScreen::ltv: return "ltv";
    case BoxScreen::cltv: return "cltv";
    case BoxScreen::dti: return "dti";
    case BoxScreen::property_type: return "property_type";
    default: return std::string(to_string(s));
  }
}

Json without_json(const KickoutResult& r) {
  if (!r.without)
    return Json{{"status", r.kicked.empty() ? "none_kicked" : "all_kicked"},
                {"bid", nullptr},
                {"loss_adjusted", nullptr},
                {"no_loss", nullptr},
                {"credit", nullptr},
                {"loans_priced", nullptr}};
  const BidResult& k = *r.without;
  const double accrued_pct = k.cutoff_balance > 0 ? 100 * k.accrued / k.cutoff_balance : NAN;
  return Json{
      {"status", "priced"},
      {"bid", Json{{"clean_price", number_or_null(k.clean_price)},
                   {"dirty_price", number_or_null(k.dirty_price)},
                   {"accrued_pct", number_or_null(accrued_pct)},
                   {"accrued", number_or_null(k.accrued)},
                   {"clean_value", number_or_null(k.clean_value)},
                   {"dirty_value", number_or_null(k.dirty_value)}}},
      {"loss_adjusted", pool_view_json(k.loss_adjusted)},
      {"no_loss", pool_view_json(k.no_loss)},
      {"credit", Json{{"credit_cost_bp", number_or_null(k.credit_cost_bp)},
                      {"expected_loss", number_or_null(k.expected_loss)},
                      {"expected_loss_pct", number_or_null(k.expected_loss_pct)}}},
      {"loans_priced", Json{{"loans", r.kept.size()},
                            {"cutoff_balance", number_or_null(k.cutoff_balance)},
                            {"net_coupon", number_or_null(k.net_coupon)}}},
  };
}

Json kicked_json(const LoanArrays& loans, const KickoutResult& r) {
  Json out = Json::array();
  for (const std::uint32_t i : r.kicked) {
    const LoanDecision& d = r.loans[i];
    out.push_back(Json{
        {"row", loans.row[i]},
        {"loan_id", loans.loan_id[i]},
        {"cutoff_balance", number_or_null(loans.current_balance[i])},
        {"outside_box", d.outside_box},
        {"below_price", d.below_price},
        {"above_break_even", d.above_break_even},
        {"reasons", all_reasons(d)},
        {"value", number_or_null(d.value)},
        {"value_price", number_or_null(d.value_price)},
        {"allocated", number_or_null(d.allocated)},
        {"allocated_price", number_or_null(d.allocated_price)},
        {"default_probability", number_or_null(d.default_probability)},
        {"severity", number_or_null(d.severity)},
        {"severity_modelled", d.modelled_severity},
        {"break_even", number_or_null(d.break_even)},
        {"expected_loss", number_or_null(d.expected_loss)},
        {"expected_loss_pct", number_or_null(d.expected_loss_pct)},
    });
  }
  return out;
}

Json kickouts_json(const LoanArrays& loans, const KickoutResult& r) {
  Json by_screen = Json::object();
  for (std::size_t s = 0; s < r.by_screen.size(); ++s)
    by_screen[screen_key(static_cast<BoxScreen>(s))] = tally_json(r.by_screen[s]);
  return Json{
      {"box", box_json(r.box)},
      {"box_source", r.box.source},
      {"economics", Json{{"margin", number_or_null(r.economics.margin)},
                         {"bad_loan_loss", number_or_null(r.economics.bad_loan_loss)},
                         {"break_even", number_or_null(r.break_even)}}},
      {"counts", Json{{"outside_box", tally_json(r.outside_box)},
                      {"by_screen", std::move(by_screen)},
                      {"below_price", tally_json(r.below_price)},
                      {"above_break_even", tally_json(r.above_break_even)},
                      {"kicked", tally_json(r.kicked_total)},
                      {"kept", tally_json(r.kept_total)}}},
      {"without", without_json(r)},
      {"kicked", kicked_json(loans, r)},
  };
}

// ---- CSV ----------------------------------------------------------------------------------------

void check_sizes(const LoanArrays& loans, const KickoutResult& r) {
  if (r.loans.size() != loans.size())
    throw std::invalid_argument(fmt::format("kick-outs CSV: {} decisions for {} loans",
                                            r.loans.size(), loans.size()));
  detail::check_loan_columns("kick-outs CSV", loans, {&loans.current_balance});
}

void put_flag(CsvBuffer& out, bool flag) {
  out.push_back(',');
  out.push_back(flag ? '1' : '0');
}

void put_decision_rows(CsvBuffer& out, const LoanArrays& loans, const KickoutResult& r,
                       const std::vector<std::string>& sellers, std::size_t first,
                       std::size_t last) {
  for (std::size_t i = first; i < last; ++i) {
    const LoanDecision& d = r.loans[i];
    detail::put_loan_cells(out, loans, sellers, i);
    out.push_back(',');
    put_money(out, loans.current_balance[i]);
    out.push_back(',');
    const std::string_view decision = d.kicked() ? "kick" : "keep";
    out.append(decision.data(), decision.data() + decision.size());
    put_flag(out, d.outside_box);
    put_flag(out, d.below_price);
    put_flag(out, d.above_break_even);
    out.push_back(',');
    put_money(out, d.value);
    out.push_back(',');
    put_fixed(out, d.value_price, kCsvPriceDecimals);
    out.push_back(',');
    put_money(out, d.allocated);
    out.push_back(',');
    put_fixed(out, d.allocated_price, kCsvPriceDecimals);
    out.push_back(',');
    put_fixed(out, 100 * d.default_probability, kCsvPctDecimals);
    out.push_back(',');
    put_fixed(out, 100 * d.severity, kCsvPctDecimals);
    put_flag(out, d.modelled_severity);
    out.push_back(',');
    put_fixed(out, 100 * d.break_even, kCsvPctDecimals);
    out.push_back(',');
    put_money(out, d.expected_loss);
    out.push_back(',');
    put_fixed(out, d.expected_loss_pct, kCsvPctDecimals);
    out.push_back(',');
    detail::put_csv_text(out, joined(all_reasons(d), "; "));
    out.push_back('\n');
  }
}

}  // namespace

std::string price_kickouts_text(const TapeRead& tape, const YieldCurve& curve,
                                const BidRequest& request, const KickoutResult& result,
                                const ModelNote* model, std::size_t list_limit) {
  std::string out = price_text(tape, curve, request, result.whole, model);
  const std::string tail = detail::rejects_and_caution(tape, "priced");
  if (out.size() < tail.size() || out.compare(out.size() - tail.size(), tail.size(), tail) != 0)
    throw std::logic_error("price_kickouts_text: the price report does not end as expected");
  out.resize(out.size() - tail.size());
  out += kickout_section(tape.loans, result, list_limit);
  out += tail;
  return out;
}

std::string price_kickouts_json(const TapeRead& tape, const YieldCurve& curve,
                                const BidRequest& request, const KickoutResult& result,
                                const ModelNote* model) {
  const Json price = Json::parse(price_json(tape, curve, request, result.whole, model));
  Json document = Json::object();
  bool placed = false;
  for (const auto& [key, value] : price.items()) {
    if (key == "rejected") {
      document["kickouts"] = kickouts_json(tape.loans, result);
      placed = true;
    }
    document[key] = value;
  }
  if (!placed) document["kickouts"] = kickouts_json(tape.loans, result);
  return detail::dump_json(document);
}

std::string kickouts_csv(const LoanArrays& loans, const KickoutResult& result) {
  check_sizes(loans, result);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  return detail::csv_document(kKickoutsCsvHeader, loans.size(),
                              [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                                put_decision_rows(out, loans, result, sellers, first, last);
                              });
}

void write_kickouts_csv(std::ostream& stream, const LoanArrays& loans,
                        const KickoutResult& result) {
  check_sizes(loans, result);
  const std::vector<std::string> sellers = detail::csv_seller_names(loans);
  detail::write_csv_document(stream, kKickoutsCsvHeader, loans.size(),
                             [&](CsvBuffer& out, std::size_t first, std::size_t last) {
                               put_decision_rows(out, loans, result, sellers, first, last);
                             });
}

}  // namespace poolbid
