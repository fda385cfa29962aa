// The loan-level model's set-up: the run (scenario economy and market mortgage rate), the tables the
// monthly loop reads, each loan's fixed terms, and a loan's explanation.
#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>

#include <fmt/core.h>

#include "cashflow/engine.h"
#include "cashflow/loan_model.h"

namespace poolbid {
namespace detail {
namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();

bool neutral(const ModelTables& t, Factor f) { return (t.neutral & factor_bit(f)) != 0; }

double positive_or_nan(double v) { return std::isfinite(v) && v > 0 ? v : std::nan(""); }

}  // namespace

int ltv_band(const ModelTables& tables, double ltv) {
  int k = 0;
  for (double edge : tables.ltv_edges) k += ltv >= edge ? 1 : 0;
  return k;
}

int incentive_point(double incentive) {
  const double x = std::round((incentive - kIncentiveLow) / kIncentiveStep);
  return static_cast<int>(std::clamp(x, 0.0, double(kIncentivePoints - 1)));
}

ModelTables model_tables(const ModelRun& run, bool no_defaults) {
  if (!run.model) throw std::invalid_argument("project_pool: the model run has no model tables");
  const CreditModel& m = *run.model;
  ModelTables t;
  t.model = run.model;
  t.base_mdr = monthly_rate_table(m.base_default);
  t.turnover_smm = monthly_rate_table(m.turnover);
  t.neutral = run.neutral;
  t.no_defaults = no_defaults;
  t.prepay_multiplier = run.prepay_multiplier;
  t.default_multiplier = run.default_multiplier;

  // One set of LTV bounds for the three tables: each merged band reads each table's value there.
  std::vector<double> edges;
  for (const BandTable* table : {&m.ltv_default, &m.ltv_refi, &m.ltv_turnover})
    edges.insert(edges.end(), table->upper.begin(), table->upper.end());
  std::sort(edges.begin(), edges.end());
  edges.erase(std::unique(edges.begin(), edges.end()), edges.end());
  if (edges.size() > std::size_t(kMaxLtvEdges))
    throw std::invalid_argument(fmt::format(
        "the model's LTV tables have {} distinct band bounds between them; at most {} are "
        "supported",
        edges.size(), kMaxLtvEdges));
  t.ltv_edges.fill(kInfinity);
  std::copy(edges.begin(), edges.end(), t.ltv_edges.begin());
  for (std::size_t k = 0; k <= edges.size(); ++k) {
    // A value inside merged band k: its lower bound (or below the first bound).
    const double v = k == 0 ? -kInfinity : edges[k - 1];
    t.ltv_default[k] = band_value(m.ltv_default, v);
    t.ltv_refi[k] = band_value(m.ltv_refi, v);
    t.ltv_turnover[k] = band_value(m.ltv_turnover, v);
  }
  t.ltv_default[kMaxLtvEdges + 1] = m.ltv_default.missing;
  t.ltv_refi[kMaxLtvEdges + 1] = m.ltv_refi.missing;
  t.ltv_turnover[kMaxLtvEdges + 1] = m.ltv_turnover.missing;
  t.ltv_default[kMaxLtvEdges + 2] = t.ltv_refi[kMaxLtvEdges + 2] =
      t.ltv_turnover[kMaxLtvEdges + 2] = 1.0;

  t.refi_smm.resize(kIncentivePoints);
  for (int j = 0; j < kIncentivePoints; ++j) {
    const double incentive = kIncentiveLow + j * kIncentiveStep;
    const double cpr = m.refi_max_cpr / (1.0 + std::exp(-(incentive - m.refi_midpoint) / m.refi_width));
    t.refi_smm[j] = smm_from_cpr(std::min(cpr, 1.0));
  }
  t.burnout_per_unit = m.burnout * 100.0;
  t.sale_factor = (1.0 - m.distressed_discount) * (1.0 - m.sale_cost);
  t.carrying_per_month = m.carrying_cost / 12.0;
  t.foreclosure_cost = m.foreclosure_cost;

  t.house_price = run.house_price_index;
  t.mortgage_rate.assign(run.mortgage_rate.size() + 1, 0.0);
  std::copy(run.mortgage_rate.begin(), run.mortgage_rate.end(), t.mortgage_rate.begin() + 1);

  for (int v = 0; v < 4; ++v) {
    t.documentation[v] = category_value(m.documentation_default, to_string(Documentation(v)));
    t.occupancy[v] = category_value(m.occupancy_default, to_string(Occupancy(v)));
    t.purpose[v] = category_value(m.purpose_default, to_string(Purpose(v)));
  }
  for (int v = 0; v < 7; ++v)
    t.property[v] = category_value(m.property_default, to_string(PropertyType(v)));
  for (int v = 0; v < 6; ++v) {
    const std::string_view name = to_string(Delinquency(v));
    for (const auto& [key, roll] : m.delinquency_roll)
      if (key == name && roll.default_share > 0) {
        t.roll_months[v] = std::max(roll.months, 1);
        t.roll_mdr[v] = 1.0 - std::pow(1.0 - std::min(roll.default_share, 1.0),
                                       1.0 / t.roll_months[v]);
      }
  }
  t.cured_multiplier = m.cured_multiplier;
  t.timeline.fill(std::max(m.default_timeline_months, 0));
  for (std::size_t s = 1; s < t.timeline.size(); ++s) {
    const std::string_view code = state_code(static_cast<std::uint8_t>(s));
    if (code.empty()) continue;
    for (const auto& [key, months] : m.timeline_months)
      if (key == code) t.timeline[s] = std::max(months, 0);
  }
  t.max_timeline = *std::max_element(t.timeline.begin(), t.timeline.end());
  return t;
}

LoanTerms loan_terms(const ModelTables& t, const LoanArrays& l, std::size_t i) {
  const CreditModel& m = *t.model;
  LoanTerms terms;
  const auto doc = static_cast<std::size_t>(l.documentation[i]);
  const auto occ = static_cast<std::size_t>(l.occupancy[i]);
  const auto pur = static_cast<std::size_t>(l.purpose[i]);
  const auto prop = static_cast<std::size_t>(l.property_type[i]);
  double d = t.default_multiplier;
  if (!neutral(t, Factor::score)) {
    d *= band_value(m.score_default, l.credit_score[i]);
    terms.refi_multiplier = band_value(m.score_refi, l.credit_score[i]);
  }
  if (!neutral(t, Factor::dti)) d *= band_value(m.dti_default, l.dti[i]);
  if (!neutral(t, Factor::documentation)) d *= doc < 4 ? t.documentation[doc] : 1.0;
  if (!neutral(t, Factor::occupancy)) d *= occ < 4 ? t.occupancy[occ] : 1.0;
  if (!neutral(t, Factor::purpose)) d *= pur < 4 ? t.purpose[pur] : 1.0;
  if (!neutral(t, Factor::property_type)) d *= prop < 7 ? t.property[prop] : 1.0;
  const auto dq = static_cast<std::size_t>(l.delinquency[i]);
  if (!neutral(t, Factor::delinquency) && dq < 6 && t.roll_months[dq] > 0) {
    terms.roll_months = t.roll_months[dq];
    terms.roll_mdr = t.roll_mdr[dq];
    d *= t.cured_multiplier;
    terms.refi_multiplier *= m.delinquent_refi;
  }
  terms.default_multiplier = d;

  // Property value at cut-off: the tape's, else original balance over LTV, else current balance
  // over LTV; neither value nor LTV: the assumed LTV, read as missing.
  const double balance = l.current_balance[i];
  const double ltv = positive_or_nan(l.original_ltv[i]);
  const double stated = positive_or_nan(l.property_value[i]);
  const double original = positive_or_nan(l.original_balance[i]);
  if (neutral(t, Factor::ltv)) {
    terms.property_value = balance / m.assumed_ltv;
    terms.ltv_slot = kMaxLtvEdges + 2;
  } else {
    if (std::isfinite(stated)) {
      terms.property_value = stated;
    } else if (std::isfinite(ltv)) {
      terms.property_value = (std::isfinite(original) ? original : balance) / ltv;
    } else {
      terms.property_value = balance / m.assumed_ltv;
      terms.ltv_slot = kMaxLtvEdges + 1;
    }
    const double cltv = positive_or_nan(l.combined_ltv[i]);
    if (std::isfinite(cltv) && std::isfinite(ltv) && cltv > ltv)
      terms.junior = (cltv - ltv) * terms.property_value;
  }
  const std::size_t state = l.state[i];
  terms.timeline = state < t.timeline.size() ? t.timeline[state] : t.timeline[0];
  return terms;
}

}  // namespace detail

std::string_view to_string(Factor f) {
  switch (f) {
    case Factor::score: return "score";
    case Factor::ltv: return "ltv";
    case Factor::dti: return "dti";
    case Factor::documentation: return "documentation";
    case Factor::occupancy: return "occupancy";
    case Factor::purpose: return "purpose";
    case Factor::property_type: return "property_type";
    case Factor::delinquency: return "delinquency";
    case Factor::count_: break;
  }
  return "?";
}

ModelRun model_run(const CreditModel& model, const Scenario& scenario, const YieldCurve& curve,
                   Date cutoff, int months, FactorSet neutral) {
  if (months < 1) throw std::invalid_argument("model_run: months must be at least 1");
  ModelRun run;
  run.model = &model;
  run.scenario = scenario.name;
  run.months = months;
  run.house_price_index = house_price_index(scenario, months);
  run.mortgage_rate = mortgage_rate_path(curve, cutoff, months);
  run.prepay_multiplier = scenario.prepay_multiplier;
  run.default_multiplier = scenario.default_multiplier;
  run.neutral = neutral;
  return run;
}

LoanExplanation explain_loan(const LoanArrays& loans, std::size_t index, const ModelRun& run) {
  using namespace detail;
  if (index >= loans.size())
    throw std::out_of_range(fmt::format("explain_loan: loan {} of {}", index, loans.size()));
  const ModelTables t = model_tables(run, false);
  const CreditModel& m = *run.model;
  const LoanTerms terms = loan_terms(t, loans, index);
  const std::size_t i = index;
  LoanExplanation e;
  e.loan_id = loans.loan_id[i];
  e.row = i < loans.row.size() ? loans.row[i] : 0;

  auto number = [](double v, const char* format) {
    return std::isfinite(v) ? fmt::format(fmt::runtime(format), v) : std::string("not given");
  };
  auto band_line = [&](Factor f, double value, const BandTable& table, double scale,
                       const char* format, const BandTable* refi) {
    FactorLine line;
    line.factor = std::string(to_string(f));
    line.value = number(value * scale, format);
    line.band = band_label(table, band_index(table, value), scale);
    if (refi && band_label(*refi, band_index(*refi, value), scale) != line.band)
      line.band += " (refinance " + band_label(*refi, band_index(*refi, value), scale) + ")";
    if (!(t.neutral & factor_bit(f))) {
      line.default_multiplier = band_value(table, value);
      if (refi) line.prepay_multiplier = band_value(*refi, value);
    } else {
      line.band += " (read neutral)";
    }
    e.factors.push_back(line);
  };
  auto category_line = [&](Factor f, std::string_view value, double multiplier) {
    FactorLine line;
    line.factor = std::string(to_string(f));
    line.value = value.empty() || value == "unknown" ? "not given" : std::string(value);
    line.band = line.value;
    if (!(t.neutral & factor_bit(f)))
      line.default_multiplier = multiplier;
    else
      line.band += " (read neutral)";
    e.factors.push_back(line);
  };
  band_line(Factor::score, loans.credit_score[i], m.score_default, 1.0, "{:.0f}", &m.score_refi);
  band_line(Factor::dti, loans.dti[i], m.dti_default, 100.0, "{:.1f}%", nullptr);
  const auto doc = static_cast<std::size_t>(loans.documentation[i]);
  const auto occ = static_cast<std::size_t>(loans.occupancy[i]);
  const auto pur = static_cast<std::size_t>(loans.purpose[i]);
  const auto prop = static_cast<std::size_t>(loans.property_type[i]);
  category_line(Factor::documentation, to_string(loans.documentation[i]),
                doc < 4 ? t.documentation[doc] : 1.0);
  category_line(Factor::occupancy, to_string(loans.occupancy[i]), occ < 4 ? t.occupancy[occ] : 1.0);
  category_line(Factor::purpose, to_string(loans.purpose[i]), pur < 4 ? t.purpose[pur] : 1.0);
  category_line(Factor::property_type, to_string(loans.property_type[i]),
                prop < 7 ? t.property[prop] : 1.0);

  // Updated LTV at cut-off and its band (the loop re-reads it every month).
  const double balance = loans.current_balance[i];
  const double hpi0 = t.house_price.empty() ? 1.0 : t.house_price[0];
  e.property_value = terms.property_value;
  e.junior_liens = terms.junior;
  e.updated_ltv = (balance + terms.junior) / (terms.property_value * hpi0);
  const int slot = terms.ltv_slot >= 0 ? terms.ltv_slot : ltv_band(t, e.updated_ltv);
  {
    FactorLine line;
    line.factor = "ltv";
    line.value = fmt::format("{:.1f}% updated at cut-off", e.updated_ltv * 100);
    if (terms.ltv_slot == kMaxLtvEdges + 1) {
      line.value = "not given";
      line.band = "missing";
    } else if (terms.ltv_slot == kMaxLtvEdges + 2) {
      line.band = "reference (read neutral)";
    } else {
      line.band = band_label(m.ltv_default, band_index(m.ltv_default, e.updated_ltv), 100.0);
    }
    line.default_multiplier = t.ltv_default[slot];
    line.prepay_multiplier = t.ltv_refi[slot];
    e.factors.insert(e.factors.begin() + 1, line);
  }
  // Delinquency.
  e.delinquency = std::string(to_string(loans.delinquency[i]));
  {
    FactorLine line;
    line.factor = "delinquency";
    line.value = e.delinquency.empty() || e.delinquency == "unknown" ? "not given" : e.delinquency;
    line.band = line.value;
    if (terms.roll_months > 0) {
      const auto dq = static_cast<std::size_t>(loans.delinquency[i]);
      for (const auto& [key, roll] : m.delinquency_roll)
        if (key == to_string(Delinquency(dq))) e.roll_share = roll.default_share;
      e.roll_months = terms.roll_months;
      line.band = fmt::format("rolls {:.0f}% to default over {} months, then x{:g}",
                              e.roll_share * 100, e.roll_months, t.cured_multiplier);
      line.default_multiplier = t.cured_multiplier;
      line.prepay_multiplier = m.delinquent_refi;
    } else if (t.neutral & factor_bit(Factor::delinquency)) {
      line.band += " (read neutral)";
    }
    e.factors.push_back(line);
  }
  {
    FactorLine line;
    line.factor = "scenario";
    line.value = run.scenario;
    line.band = "multipliers";
    line.default_multiplier = t.default_multiplier;
    line.prepay_multiplier = t.prepay_multiplier;
    e.factors.push_back(line);
  }
  e.timeline_months = terms.timeline;
  e.default_multiplier = terms.default_multiplier * t.ltv_default[slot];

  // Month 1, as the loop computes it.
  const int age = loans.age[i] + 1;
  auto read = [](const MonthlyTable& table, int month) {
    return table.by_month[std::min(month, table.hold)];
  };
  const int base_month = t.base_mdr.clock == CurveClock::loan_age ? age : 1;
  const int turn_month = t.turnover_smm.clock == CurveClock::loan_age ? age : 1;
  const double base_mdr = read(t.base_mdr, base_month);
  double mdr = terms.roll_months > 0 ? terms.roll_mdr
                                     : base_mdr * terms.default_multiplier * t.ltv_default[slot];
  mdr = std::min(mdr, 1.0);
  e.base_cdr_month1 = cdr_from_mdr(base_mdr);
  e.cdr_month1 = cdr_from_mdr(mdr);
  const double mortgage = t.mortgage_rate.size() > 1 ? t.mortgage_rate[1] : 0.0;
  e.incentive_month1 = loans.note_rate[i] - mortgage;
  const double refi = t.refi_smm[incentive_point(e.incentive_month1)] * terms.refi_multiplier *
                      t.ltv_refi[slot] * t.prepay_multiplier;
  const double turnover = read(t.turnover_smm, turn_month) * t.ltv_turnover[slot] *
                          t.prepay_multiplier;
  e.refi_cpr_month1 = cpr_from_smm(std::min(refi, 1.0));
  e.turnover_cpr_month1 = cpr_from_smm(std::min(turnover, 1.0));
  e.cpr_month1 = cpr_from_smm(std::min(refi + turnover, 1.0));

  // Severity if the loan defaulted in month 1 (lost interest at the net rate included).
  const int lag = terms.timeline;
  const std::size_t sale_month =
      std::min<std::size_t>(std::size_t(lag), t.house_price.empty() ? 0 : t.house_price.size() - 1);
  const double hpi_sale = t.house_price.empty() ? 1.0 : t.house_price[sale_month];
  const double proceeds = terms.property_value * hpi_sale * t.sale_factor - t.foreclosure_cost -
                          t.carrying_per_month * terms.property_value * hpi0 * lag;
  const double net_rate = loans.note_rate[i] - loans.servicing_fee[i];
  e.severity_month1 = std::max(0.0, 1.0 - std::min(balance, proceeds) / balance) +
                      net_rate * lag / 12.0;
  return e;
}

}  // namespace poolbid
