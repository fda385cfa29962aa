// `poolbid compare` reports: several sellers' pools side by side -- strats, modelled credit, price
// at the common target, spreads at the common price -- and each later pool's price gap to the first
// attributed to underwriting factors, as text and JSON. Also the pieces `matrix` shares
// (report/compare_parts.h).
#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>
#include <nlohmann/json.hpp>

#include "cashflow/cashflow.h"
#include "curves/curves.h"
#include "pricing/pricing.h"
#include "report/compare_parts.h"
#include "report/format.h"
#include "report/report.h"
#include "tape/tape.h"

namespace poolbid {
namespace detail {

std::string pool_letter(std::size_t k) {
  std::string out;
  std::size_t n = k + 1;  // bijective base 26: 1 = A, 26 = Z, 27 = AA
  while (n > 0) {
    --n;
    out.insert(out.begin(), static_cast<char>('A' + n % 26));
    n /= 26;
  }
  return out;
}

std::vector<std::string> wrapped(std::string_view text, std::size_t width) {
  std::vector<std::string> lines;
  std::string line;
  std::size_t at = 0;
  while (at < text.size()) {
    const std::size_t space = text.find(' ', at);
    const std::string_view word =
        text.substr(at, space == std::string_view::npos ? std::string_view::npos : space - at);
    at = space == std::string_view::npos ? text.size() : space + 1;
    if (word.empty()) continue;
    if (!line.empty() && display_width(line) + 1 + display_width(word) > width) {
      lines.push_back(std::move(line));
      line.clear();
    }
    if (!line.empty()) line += ' ';
    line += word;
  }
  if (!line.empty()) lines.push_back(std::move(line));
  return lines;
}

std::string wrapped_text(std::string_view text, std::size_t width, std::string_view indent) {
  std::string out;
  bool first = true;
  for (const std::string& line : wrapped(text, width)) {
    if (!first) out += indent;
    out += line;
    out += '\n';
    first = false;
  }
  return out;
}

std::string percent_text(double rate, int decimals) { return fixed_or_dash(100 * rate, decimals); }
std::string bp_text(double spread) { return fixed_or_dash(1e4 * spread, 1); }

namespace {

using detail::pool_view_json;
using detail::short_number;

bool shifts(const CurveShift& shift) {
  return shift.parallel_bp != 0 ||
         std::any_of(shift.key_bp.begin(), shift.key_bp.end(), [](double bp) { return bp != 0; });
}

// "+50 bp parallel; key rates 2y +25 bp", or "unmoved".
std::string shock_text(const CurveShift& shift) {
  if (!shifts(shift)) return "unmoved";
  std::string out;
  if (shift.parallel_bp != 0)
    out = fmt::format("{} bp parallel", short_number(shift.parallel_bp, true));
  bool first = true;
  for (std::size_t k = 0; k < shift.key_years.size() && k < shift.key_bp.size(); ++k) {
    if (shift.key_bp[k] == 0) continue;
    out += first ? (out.empty() ? "key rates " : "; key rates ") : ", ";
    out += fmt::format("{}y {} bp", short_number(shift.key_years[k]),
                       short_number(shift.key_bp[k], true));
    first = false;
  }
  return out;
}

// "house prices +8%, +6%, +4%, then +3% a year", "house prices +3% a year".
std::string house_price_text(const Scenario& s) {
  const std::vector<double>& annual = s.house_price_annual;
  if (!annual.empty()) {
    constexpr std::size_t kShown = 6;
    std::string out = "house prices ";
    for (std::size_t k = 0; k + 1 < annual.size() && k < kShown; ++k)
      out += fmt::format("{}%, ", short_number(100 * annual[k], true));
    if (annual.size() > kShown + 1) out += "..., ";
    if (annual.size() > 1) out += "then ";
    return out + fmt::format("{}% a year", short_number(100 * annual.back(), true));
  }
  if (!s.house_price_monthly.empty()) {
    const double last = s.house_price_monthly.back() / s.house_price_monthly.front();
    return fmt::format("house prices by a monthly index over {} months ({}% by its end)",
                       s.house_price_monthly.size() - 1, short_number(100 * (last - 1), true));
  }
  return "house prices flat";
}

std::string_view target_kind(BidTarget target) {
  switch (target) {
    case BidTarget::yield: return "yield";
    case BidTarget::spread: return "spread";
    case BidTarget::price: return "price";
  }
  return "unknown";
}

// The pricing cut-off; each tape's, when it has one, must be the same day.
Date cutoff_of(std::span<const TapeRead* const> tapes, const BidRequest& request) {
  const Date cutoff = request.settlement.cutoff;
  if (!cutoff.ok())
    throw std::invalid_argument("comparison report: the settlement has no valid cut-off date");
  for (const TapeRead* tape : tapes)
    if (tape->cutoff && *tape->cutoff != cutoff)
      throw std::invalid_argument(
          fmt::format("comparison report: {}'s cut-off {} differs from the settlement's cut-off {}",
                      tape->file, iso_date(*tape->cutoff), iso_date(cutoff)));
  return cutoff;
}

std::string model_text(std::string_view source) {
  return source.empty() ? "built-in illustrative defaults (README: Loan-level model)"
                        : display_text(source, 200);
}

}  // namespace

std::string target_text(const BidRequest& request) {
  switch (request.target) {
    case BidTarget::yield:
      return fmt::format("loss-adjusted yield {}% BEY", percent_text(request.value));
    case BidTarget::spread:
      return fmt::format("loss-adjusted Z-spread {} bp", short_number(1e4 * request.value));
    case BidTarget::price: return fmt::format("clean price {}", fixed_or_dash(request.value, 3));
  }
  return "unknown";
}

std::string scenario_text(const Scenario& s) {
  return fmt::format("{}; rates {}; prepayment x{}, default x{}", house_price_text(s),
                     shock_text(s.rate_shock), short_number(s.prepay_multiplier),
                     short_number(s.default_multiplier));
}

std::string run_heading(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                        const BidRequest& request, std::string_view model_source) {
  const Date cutoff = cutoff_of(tapes, request);
  const int delay = request.settlement.delay_days;
  TextTable table{{}, {Align::left, Align::left}, {}};
  table.rows.push_back({"cut-off date", iso_date(cutoff)});
  table.rows.push_back({"settlement date", iso_date(request.settlement.settle)});
  table.rows.push_back(
      {"payment delay",
       fmt::format("{} (month 1 paid {})",
                   count_of(static_cast<std::size_t>(std::max(delay, 0)), "day", "days"),
                   iso_date(payment_date(cutoff, 1, delay)))});
  table.rows.push_back({"curve", fmt::format("{} (as of {})", display_text(curve.source, 200),
                                             iso_date(curve.as_of))});
  for (const std::string& line : wrapped(display_text(curve.description, 1000), kTextWidth - 17))
    table.rows.push_back({"", line});
  table.rows.push_back({"model", model_text(model_source)});
  table.rows.push_back({"advancing", std::string(to_string(request.assumptions.advancing))});
  table.rows.push_back({"target", target_text(request)});
  return render(table, "");
}

Json target_json(const BidRequest& request) {
  return Json{{"kind", std::string(target_kind(request.target))},
              {"value", number_or_null(request.value)}};
}

Json scenario_json(const Scenario& s) {
  Json key_rates = Json::array();
  for (std::size_t k = 0; k < s.rate_shock.key_years.size() && k < s.rate_shock.key_bp.size(); ++k)
    key_rates.push_back(Json{{"years", number_or_null(s.rate_shock.key_years[k])},
                             {"bp", number_or_null(s.rate_shock.key_bp[k])}});
  Json annual = Json::array(), monthly = Json::array();
  for (double x : s.house_price_annual) annual.push_back(number_or_null(x));
  for (double x : s.house_price_monthly) monthly.push_back(number_or_null(x));
  return Json{{"name", s.name},
              {"description", s.description},
              {"house_price_annual", std::move(annual)},
              {"house_price_monthly", std::move(monthly)},
              {"rate_shock", Json{{"parallel_bp", number_or_null(s.rate_shock.parallel_bp)},
                                  {"key_rates", std::move(key_rates)}}},
              {"prepay_multiplier", number_or_null(s.prepay_multiplier)},
              {"default_multiplier", number_or_null(s.default_multiplier)}};
}

Json run_json_head(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                   const BidRequest& request, std::string_view model_source) {
  const Date cutoff = cutoff_of(tapes, request);
  return Json{
      {"cutoff_date", iso_date(cutoff)},
      {"settlement_date", iso_date(request.settlement.settle)},
      {"payment_delay_days", request.settlement.delay_days},
      {"curve", Json{{"source", curve.source},
                     {"as_of", iso_date(curve.as_of)},
                     {"description", curve.description},
                     {"flat", curve.flat},
                     {"flat_rate", curve.flat ? number_or_null(curve.flat_rate) : Json(nullptr)}}},
      {"model",
       Json{{"source", model_source.empty() ? Json(nullptr) : Json(std::string(model_source))},
            {"built_in", model_source.empty()}}},
      {"advancing", std::string(to_string(request.assumptions.advancing))},
  };
}


Json tape_json(const TapeRead& tape, std::string_view name) {
  return Json{{"name", std::string(name)},
              {"file", tape.file},
              {"loans", tape.rows_accepted()},
              {"cutoff_balance", number_or_null(tape.upb_accepted)},
              {"rows_read", tape.rows_read},
              {"rows_rejected", tape.rows_rejected},
              {"upb_rejected", number_or_null(tape.upb_rejected)}};
}

std::string rejects_and_caution_of(std::span<const TapeRead* const> tapes,
                                   std::span<const std::string> names, std::string_view done) {
  std::string out = "\n";
  std::size_t rejected = 0, warned = 0;
  for (const TapeRead* tape : tapes) {
    rejected += tape->rows_rejected;
    warned += tape->rows_with_warnings;
  }
  if (rejected == 0) out += fmt::format("rejected rows: none; every row read is {}.\n", done);
  for (std::size_t k = 0; k < tapes.size(); ++k) {
    const TapeRead& tape = *tapes[k];
    if (tape.rows_rejected == 0) continue;
    out += fmt::format("rejected rows of {} ({}, {}): {}:\n", pool_letter(k),
                       display_text(k < names.size() ? names[k] : std::string(), 60),
                       display_text(tape.file, 200), rejects_heading(tape, done));
    out += rejects_table(tape);
  }
  if (warned > 0)
    out += fmt::format("{} with warnings {} {} as read; `poolbid check` lists the warnings.\n",
                       count_of(warned, "accepted row", "accepted rows"),
                       warned == 1 ? "is" : "are", done);
  out += fmt::format("\n{}\n", caution_text());
  return out;
}

}  // namespace detail

namespace {

using detail::Align;
using detail::Json;
using detail::number_or_null;
using detail::pool_letter;

constexpr int kPriceDecimals = 3;
constexpr int kPctDecimals = 2;
constexpr int kShareDecimals = 1;

// The strat tables shown side by side, by StratTable::title, with the label the report gives.
struct SideTable {
  std::string_view title, label;
};
constexpr SideTable kSideTables[] = {
    {"credit score", "credit score"},
    {"original LTV (%)", "original LTV (%)"},
    {"combined LTV (%)", "combined LTV (%)"},
    {"DTI (%)", "DTI (%)"},
    {"current balance ($)", "current balance ($)"},
    {"documentation", "documentation"},
    {"occupancy", "occupancy"},
    {"loan purpose", "loan purpose"},
    {"property type", "property type"},
    {"delinquency", "delinquency at cut-off"},
};

const StratTable* find_table(const Strats& s, std::string_view title) {
  for (const StratTable& t : s.tables)
    if (t.title == title) return &t;
  return nullptr;
}

// Every label any pool has in a table, in band order: each pool's rows are in band order, so a
// label new to the list goes right after the label that precedes it in that pool's table.
std::vector<std::string> merged_labels(const std::vector<const StratTable*>& tables) {
  std::vector<std::string> labels;
  for (const StratTable* t : tables) {
    if (t == nullptr) continue;
    std::size_t insert_at = 0;
    for (const StratRow& r : t->rows) {
      const auto found = std::find(labels.begin(), labels.end(), r.label);
      if (found != labels.end()) {
        insert_at = static_cast<std::size_t>(found - labels.begin()) + 1;
        continue;
      }
      labels.insert(labels.begin() + static_cast<std::ptrdiff_t>(insert_at), r.label);
      ++insert_at;
    }
  }
  return labels;
}

std::string factor_label(Factor f) {
  switch (f) {
    case Factor::score: return "credit score";
    case Factor::ltv: return "LTV and junior liens";
    case Factor::dti: return "DTI";
    case Factor::documentation: return "documentation";
    case Factor::occupancy: return "occupancy";
    case Factor::purpose: return "loan purpose";
    case Factor::property_type: return "property type";
    case Factor::delinquency: return "delinquency at cut-off";
    case Factor::count_: break;
  }
  return std::string(to_string(f));
}

std::string line_label(const AttributionLine& line) {
  return line.factor ? factor_label(*line.factor) : line.label;
}

std::string signed_points(double points) {
  return std::isfinite(points) ? fmt::format("{:+.{}f}", points, kPriceDecimals) : "-";
}

std::string signed_dollars(double dollars) {
  if (!std::isfinite(dollars)) return "-";
  const std::string d = detail::dollars(std::fabs(dollars));
  return (dollars < 0 ? "-" : "+") + d;
}

std::string strats_section(const std::vector<Strats>& strats) {
  const std::size_t n = strats.size();
  detail::TextTable table{{""}, {Align::left}, {}};
  for (std::size_t k = 0; k < n; ++k) {
    table.headers.push_back(pool_letter(k));
    table.align.push_back(Align::right);
  }
  auto row = [&](std::string label, auto cell) {
    std::vector<std::string> cells{std::move(label)};
    for (std::size_t k = 0; k < n; ++k) cells.push_back(cell(strats[k]));
    table.rows.push_back(std::move(cells));
  };
  auto pct = [](double ratio, int decimals) {
    return detail::fixed_or_dash(100 * ratio, decimals);
  };
  row("loans", [](const Strats& s) { return detail::count_text(s.loans); });
  row("UPB", [](const Strats& s) { return detail::dollars(s.upb); });
  row("average UPB", [](const Strats& s) { return detail::dollars(s.average_upb); });
  row("WAC (%)", [&](const Strats& s) { return pct(s.wac.value, 3); });
  row("WAM (months)", [](const Strats& s) { return detail::fixed_or_dash(s.wam.value, 0); });
  row("WALA (months)", [](const Strats& s) { return detail::fixed_or_dash(s.wala.value, 0); });
  row("WA credit score",
      [](const Strats& s) { return detail::fixed_or_dash(s.credit_score.value, 0); });
  row("WA original LTV (%)", [&](const Strats& s) { return pct(s.original_ltv.value, 1); });
  row("WA combined LTV (%)", [&](const Strats& s) { return pct(s.combined_ltv.value, 1); });
  row("WA DTI (%)", [&](const Strats& s) { return pct(s.dti.value, 1); });
  for (const SideTable& side : kSideTables) {
    std::vector<const StratTable*> tables;
    for (const Strats& s : strats) tables.push_back(find_table(s, side.title));
    const std::vector<std::string> labels = merged_labels(tables);
    if (labels.empty()) continue;
    std::vector<std::string> title_row{std::string(side.label)};
    title_row.resize(n + 1);
    table.rows.push_back(std::move(title_row));
    for (const std::string& label : labels) {
      std::vector<std::string> cells{"  " + detail::display_text(detail::plain_label(label), 40)};
      for (const StratTable* t : tables) {
        std::string cell = "-";
        if (t != nullptr)
          for (const StratRow& r : t->rows)
            if (r.label == label) cell = pct(r.upb_share, kShareDecimals);
        cells.push_back(std::move(cell));
      }
      table.rows.push_back(std::move(cells));
    }
  }
  return detail::render(table);
}

std::string results_section(const Comparison& c, const BidRequest& request) {
  const std::size_t n = c.pools.size();
  detail::TextTable table{{""}, {Align::left}, {}};
  for (std::size_t k = 0; k < n; ++k) {
    table.headers.push_back(pool_letter(k));
    table.align.push_back(Align::right);
  }
  auto row = [&](std::string label, auto cell) {
    std::vector<std::string> cells{std::move(label)};
    for (const ComparedPool& p : c.pools) cells.push_back(cell(p));
    table.rows.push_back(std::move(cells));
  };
  auto fixed = [](double x, int d) { return detail::fixed_or_dash(x, d); };
  row("lifetime defaults (% of UPB)",
      [&](const ComparedPool& p) { return fixed(p.cum_default_pct, kPctDecimals); });
  row("loss severity (% of defaulted balance)",
      [&](const ComparedPool& p) { return fixed(p.severity_pct, kPctDecimals); });
  row("lifetime loss (% of UPB)",
      [&](const ComparedPool& p) { return fixed(p.cum_loss_pct, kPctDecimals); });
  row("expected loss ($)",
      [](const ComparedPool& p) { return detail::dollars(p.bid.expected_loss); });
  row("WAL (years)", [&](const ComparedPool& p) { return fixed(p.wal_years, 2); });
  row("clean price (% of UPB)",
      [&](const ComparedPool& p) { return fixed(p.bid.clean_price, kPriceDecimals); });
  row("clean value ($)", [](const ComparedPool& p) { return detail::dollars(p.bid.clean_value); });
  if (request.target == BidTarget::yield)
    row("loss-adjusted Z-spread (bp)",
        [](const ComparedPool& p) { return detail::bp_text(p.bid.loss_adjusted.z_spread); });
  else
    row("loss-adjusted yield (BEY %)",
        [](const ComparedPool& p) { return detail::percent_text(p.bid.loss_adjusted.bey); });
  row("credit cost (bp)",
      [](const ComparedPool& p) { return detail::fixed_or_dash(p.bid.credit_cost_bp, 1); });
  return detail::render(table);
}

std::string common_price_section(const Comparison& c) {
  const std::size_t n = c.pools.size();
  detail::TextTable table{{""}, {Align::left}, {}};
  for (std::size_t k = 0; k < n; ++k) {
    table.headers.push_back(pool_letter(k));
    table.align.push_back(Align::right);
  }
  auto row = [&](std::string label, auto cell) {
    std::vector<std::string> cells{std::move(label)};
    for (const ComparedPool& p : c.pools) cells.push_back(cell(p.at_common_price));
    table.rows.push_back(std::move(cells));
  };
  row("loss-adjusted yield (BEY %)",
      [](const PoolAtPrice& a) { return detail::percent_text(a.loss_adjusted.bey); });
  row("loss-adjusted Z-spread (bp)",
      [](const PoolAtPrice& a) { return detail::bp_text(a.loss_adjusted.z_spread); });
  row("loss-adjusted spread at WAL (bp)",
      [](const PoolAtPrice& a) { return detail::bp_text(a.loss_adjusted.spread_at_wal); });
  row("no-loss Z-spread (bp)",
      [](const PoolAtPrice& a) { return detail::bp_text(a.no_loss.z_spread); });
  row("credit cost (bp)",
      [](const PoolAtPrice& a) { return detail::fixed_or_dash(a.credit_cost_bp, 1); });
  row("dirty value ($)", [](const PoolAtPrice& a) { return detail::dollars(a.dirty_value); });
  return detail::render(table);
}

// "A (Brindlecote Home Loans) comes out ahead by 3.210 points ($642,000.00 on B's balance) ...".
std::string verdict(const Attribution& att, const std::vector<std::string>& names) {
  const std::string a = fmt::format("{} ({})", pool_letter(0), detail::display_text(names[0], 60));
  const std::string b =
      fmt::format("{} ({})", pool_letter(att.pool), detail::display_text(names[att.pool], 60));
  constexpr double kSame = 0.0005;  // below the printed precision of a price
  if (!(std::fabs(att.gap_points) >= kSame))
    return detail::wrapped_text(fmt::format("{} and {} price the same at the target (gap {} "
                                            "points).",
                                            a, b, signed_points(att.gap_points)),
                                detail::kTextWidth);
  const bool a_ahead = att.gap_points > 0;
  const double sign = a_ahead ? 1.0 : -1.0;
  std::vector<const AttributionLine*> for_winner, against;
  for (const AttributionLine& l : att.lines) {
    if (l.label == "interaction") continue;  // not a reason: what the lines leave over
    if (sign * l.points >= kSame) for_winner.push_back(&l);
    if (sign * l.points <= -kSame) against.push_back(&l);
  }
  auto by_size = [](const AttributionLine* x, const AttributionLine* y) {
    return std::fabs(x->points) > std::fabs(y->points);
  };
  std::sort(for_winner.begin(), for_winner.end(), by_size);
  std::sort(against.begin(), against.end(), by_size);
  auto list = [](const std::vector<const AttributionLine*>& lines, std::size_t most) {
    std::string out;
    for (std::size_t k = 0; k < lines.size() && k < most; ++k)
      out += fmt::format("{}{} ({:.{}f} points)", k == 0 ? "" : ", ", line_label(*lines[k]),
                         std::fabs(lines[k]->points), kPriceDecimals);
    return out;
  };
  std::string out =
      fmt::format("{} comes out ahead of {} by {:.{}f} points of price ({} on {}'s balance).",
                  a_ahead ? a : b, a_ahead ? b : a, std::fabs(att.gap_points), kPriceDecimals,
                  detail::dollars(std::fabs(att.gap_dollars)), pool_letter(att.pool));
  if (!for_winner.empty()) out += fmt::format(" The biggest reasons: {}.", list(for_winner, 3));
  if (!against.empty()) out += fmt::format(" Working the other way: {}.", list(against, 2));
  return detail::wrapped_text(out, detail::kTextWidth);
}

std::string attribution_section(const Attribution& att, const std::vector<std::string>& names) {
  const std::string b = pool_letter(att.pool);
  detail::TextTable table{{"", "points", fmt::format("$ on {}'s UPB", b)},
                          {Align::left, Align::right, Align::right},
                          {}};
  for (const AttributionLine& l : att.lines)
    table.rows.push_back({line_label(l), signed_points(l.points), signed_dollars(l.dollars)});
  table.rows.push_back({fmt::format("total gap ({} - {})", pool_letter(0), b),
                        signed_points(att.gap_points), signed_dollars(att.gap_dollars)});
  std::string out = fmt::format(
      "price gap of {} to {} at the target, by underwriting factor\n"
      "(points of clean price; positive = {} worth more because of it)\n",
      b, pool_letter(0), pool_letter(0));
  out += detail::render(table);
  out += fmt::format(
      "  (a factor's line: how much reading it neutral moves {}'s price, less how much it moves "
      "{}'s;\n   collateral and terms: the gap with every factor neutral; interaction: the rest)\n",
      pool_letter(0), b);
  out += verdict(att, names);
  return out;
}

Json strats_json_of(const Strats& s) {
  auto average = [](const WeightedAverage& wa) {
    return Json{{"value", number_or_null(wa.value)}, {"missing", wa.missing}};
  };
  Json tables = Json::array();
  for (const SideTable& side : kSideTables) {
    const StratTable* t = find_table(s, side.title);
    if (t == nullptr) continue;
    Json rows = Json::array();
    for (const StratRow& r : t->rows)
      rows.push_back(Json{{"label", r.label},
                          {"count", r.count},
                          {"upb", number_or_null(r.upb)},
                          {"upb_share", number_or_null(r.upb_share)}});
    tables.push_back(Json{{"title", t->title}, {"rows", std::move(rows)}});
  }
  return Json{{"loans", s.loans},
              {"upb", number_or_null(s.upb)},
              {"average_upb", number_or_null(s.average_upb)},
              {"wac", average(s.wac)},
              {"wam", average(s.wam)},
              {"wala", average(s.wala)},
              {"credit_score", average(s.credit_score)},
              {"original_ltv", average(s.original_ltv)},
              {"combined_ltv", average(s.combined_ltv)},
              {"dti", average(s.dti)},
              {"tables", std::move(tables)}};
}

Json at_price_json(const PoolAtPrice& a) {
  return Json{{"clean_price", number_or_null(a.clean_price)},
              {"dirty_value", number_or_null(a.dirty_value)},
              {"loss_adjusted", detail::pool_view_json(a.loss_adjusted)},
              {"no_loss", detail::pool_view_json(a.no_loss)},
              {"credit_cost_bp", number_or_null(a.credit_cost_bp)},
              {"solved", a.solved}};
}

void check_inputs(std::span<const TapeRead* const> tapes, const Comparison& c) {
  if (tapes.size() != c.pools.size())
    throw std::invalid_argument(
        fmt::format("compare report: {} tapes for {} pools", tapes.size(), c.pools.size()));
  if (c.pools.empty()) throw std::invalid_argument("compare report: no pool");
  for (const TapeRead* t : tapes)
    if (t == nullptr) throw std::invalid_argument("compare report: a tape is null");
}

std::vector<std::string> names_of(const Comparison& c) {
  std::vector<std::string> names;
  for (const ComparedPool& p : c.pools) names.push_back(p.name);
  return names;
}

}  // namespace

std::string compare_text(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                         const BidRequest& request, const Comparison& comparison,
                         std::string_view model_source) {
  check_inputs(tapes, comparison);
  const std::vector<std::string> names = names_of(comparison);
  std::string out =
      fmt::format("poolbid compare: {}\n", detail::count_of(tapes.size(), "pool", "pools"));
  out += detail::run_heading(tapes, curve, request, model_source);
  std::string scenario =
      fmt::format("scenario: {}", detail::display_text(request.scenario.name, 60, "(unnamed)"));
  if (!request.scenario.description.empty())
    scenario += " -- " + detail::display_text(request.scenario.description, 1000);
  out += detail::wrapped_text(scenario, detail::kTextWidth, "  ");
  out.pop_back();  // the scenario's line goes on below
  out += "\n  " + detail::wrapped_text(detail::scenario_text(request.scenario),
                                       detail::kTextWidth - 2, "  ");

  out += "\npools\n";
  {
    detail::TextTable table{{}, {Align::left, Align::left, Align::left, Align::right}, {}};
    for (std::size_t k = 0; k < tapes.size(); ++k)
      table.rows.push_back({pool_letter(k), detail::display_text(names[k], 60),
                            detail::display_text(tapes[k]->file, 200),
                            detail::count_of(tapes[k]->rows_accepted(), "loan", "loans")});
    out += detail::render(table);
  }

  std::vector<Strats> strats;
  for (const TapeRead* t : tapes) strats.push_back(stratify(t->loans));
  out += "\ncollateral (accepted loans; averages weighted by UPB; each band's share of UPB, %)\n";
  out += strats_section(strats);

  out += fmt::format("\nthe model at the target ({}, scenario {})\n", detail::target_text(request),
                     detail::display_text(request.scenario.name, 60, "(unnamed)"));
  out += results_section(comparison, request);

  const bool from_first = !comparison.price_given;
  out += fmt::format(
      "\nat a common clean price of {:.{}f}{}\n", comparison.common_price, kPriceDecimals,
      from_first ? fmt::format(" ({}'s price at the target)", pool_letter(0)) : std::string());
  out += common_price_section(comparison);
  for (const ComparedPool& p : comparison.pools)
    if (!p.at_common_price.solved) {
      out += "  (\"-\": no yield or spread prices that pool's flows at this price)\n";
      break;
    }

  for (const Attribution& att : comparison.attributions) {
    out += '\n';
    out += attribution_section(att, names);
  }
  if (comparison.attributions.empty() && comparison.pools.size() > 1)
    out += "\n(no attribution: it was not asked for)\n";
  out += detail::rejects_and_caution_of(tapes, names, "compared");
  return out;
}

std::string compare_json(std::span<const TapeRead* const> tapes, const YieldCurve& curve,
                         const BidRequest& request, const Comparison& comparison,
                         std::string_view model_source) {
  check_inputs(tapes, comparison);
  Json document = detail::run_json_head(tapes, curve, request, model_source);
  document["scenario"] = detail::scenario_json(request.scenario);
  document["target"] = detail::target_json(request);
  document["common_price"] = Json{{"clean_price", number_or_null(comparison.common_price)},
                                  {"from", comparison.price_given ? "given" : "first_pool"}};
  Json pools = Json::array();
  for (std::size_t k = 0; k < tapes.size(); ++k) {
    const ComparedPool& p = comparison.pools[k];
    const BidResult& bid = p.bid;
    Json pool = detail::tape_json(*tapes[k], p.name);
    pool["cutoff_balance"] = number_or_null(bid.cutoff_balance);
    pool["strats"] = strats_json_of(stratify(tapes[k]->loans));
    pool["at_target"] = Json{{"clean_price", number_or_null(bid.clean_price)},
                             {"dirty_price", number_or_null(bid.dirty_price)},
                             {"clean_value", number_or_null(bid.clean_value)},
                             {"dirty_value", number_or_null(bid.dirty_value)},
                             {"accrued", number_or_null(bid.accrued)},
                             {"cum_default_pct", number_or_null(p.cum_default_pct)},
                             {"severity_pct", number_or_null(p.severity_pct)},
                             {"cum_loss_pct", number_or_null(p.cum_loss_pct)},
                             {"expected_loss", number_or_null(bid.expected_loss)},
                             {"wal_years", number_or_null(p.wal_years)},
                             {"loss_adjusted", detail::pool_view_json(bid.loss_adjusted)},
                             {"no_loss", detail::pool_view_json(bid.no_loss)},
                             {"credit_cost_bp", number_or_null(bid.credit_cost_bp)}};
    pool["at_common_price"] = at_price_json(p.at_common_price);
    Json neutral = nullptr;
    if (p.neutral_price.size() == kFactorCount) {
      neutral = Json::object();
      for (std::size_t f = 0; f < kFactorCount; ++f)
        neutral[std::string(to_string(static_cast<Factor>(f)))] =
            number_or_null(p.neutral_price[f]);
      neutral["all"] = number_or_null(p.all_neutral_price);
    }
    pool["neutral_prices"] = std::move(neutral);
    pool["rejected"] = detail::rejected_json(*tapes[k]);
    pools.push_back(std::move(pool));
  }
  document["pools"] = std::move(pools);
  Json attributions = Json::array();
  for (const Attribution& att : comparison.attributions) {
    Json lines = Json::array();
    for (const AttributionLine& l : att.lines)
      lines.push_back(
          Json{{"label", l.label},
               {"factor", l.factor ? Json(std::string(to_string(*l.factor))) : Json(nullptr)},
               {"points", number_or_null(l.points)},
               {"dollars", number_or_null(l.dollars)}});
    const std::string& a = comparison.pools.front().name;
    const std::string& b = comparison.pools[att.pool].name;
    attributions.push_back(Json{{"pool_a", a},
                                {"pool_b", b},
                                {"pool_b_index", att.pool},
                                {"sign", "positive = pool_a worth more because of the line"},
                                {"gap_points", number_or_null(att.gap_points)},
                                {"gap_dollars", number_or_null(att.gap_dollars)},
                                {"ahead", att.gap_points > 0   ? Json(a)
                                          : att.gap_points < 0 ? Json(b)
                                                               : Json(nullptr)},
                                {"lines", std::move(lines)}});
  }
  document["attribution"] = std::move(attributions);
  document["caution"] = std::string(caution_text());
  return detail::dump_json(document);
}

}  // namespace poolbid
