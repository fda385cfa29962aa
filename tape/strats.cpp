// Strats: the pool summary and stratification tables of accepted loans, all UPB-weighted.
// A loan without a field is left out of that field's average and counted as missing; every sum
// runs in loan order, so the same tape gives the same figures to the last bit. Band edges:
// credit score, note rate and balance bands hold their lower edge (620 is in 620-659); LTV, CLTV
// and DTI bands their upper edge (80.00% is in 70.01-80). Tested in tests/tape/strats_test.cpp.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <map>
#include <optional>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include <fmt/core.h>

#include "tape/tape.h"

namespace poolbid {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kTopStates = 10;

double ratio_or_nan(double numerator, double denominator) {
  return denominator > 0 ? numerator / denominator : kNaN;
}

// Running sums for one table row, added to in loan order.
struct RowSums {
  std::size_t count = 0;
  double upb = 0;
  double rate_sum = 0, rate_upb = 0;    // sum of balance x note rate; balance of loans with one
  double score_sum = 0, score_upb = 0;
  double ltv_sum = 0, ltv_upb = 0;
};

void add_loan(RowSums& sums, const LoanArrays& loans, std::size_t i) {
  const double upb = loans.current_balance[i];
  ++sums.count;
  sums.upb += upb;
  if (std::isfinite(loans.note_rate[i])) {
    sums.rate_sum += upb * loans.note_rate[i];
    sums.rate_upb += upb;
  }
  if (std::isfinite(loans.credit_score[i])) {
    sums.score_sum += upb * loans.credit_score[i];
    sums.score_upb += upb;
  }
  if (std::isfinite(loans.original_ltv[i])) {
    sums.ltv_sum += upb * loans.original_ltv[i];
    sums.ltv_upb += upb;
  }
}

StratRow finish_row(std::string label, const RowSums& sums, double pool_upb) {
  return StratRow{std::move(label),
                  sums.count,
                  sums.upb,
                  ratio_or_nan(sums.upb, pool_upb),
                  ratio_or_nan(sums.rate_sum, sums.rate_upb),
                  ratio_or_nan(sums.score_sum, sums.score_upb),
                  ratio_or_nan(sums.ltv_sum, sums.ltv_upb)};
}

// A table of fixed bands: `band_of(i)` gives loan i's band index, or nullopt when the loan lacks
// the field. Rows come out in band order, empty bands left out, then "missing" if any loan
// lacks the field.
template <typename BandOf>
StratTable banded_table(std::string title, const std::vector<std::string>& labels,
                        const LoanArrays& loans, double pool_upb, BandOf band_of) {
  std::vector<RowSums> bands(labels.size());
  RowSums missing;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const std::optional<std::size_t> band = band_of(i);
    add_loan(band ? bands[*band] : missing, loans, i);
  }
  StratTable table{std::move(title), {}};
  for (std::size_t b = 0; b < bands.size(); ++b)
    if (bands[b].count > 0) table.rows.push_back(finish_row(labels[b], bands[b], pool_upb));
  if (missing.count > 0) table.rows.push_back(finish_row("missing", missing, pool_upb));
  return table;
}

// Credit score bands (common practice). Each band includes its lower edge and excludes its
// upper one: 620 is in 620-659, and so is 659.5; 619.9 is in <620.
StratTable credit_score_table(const LoanArrays& loans, double pool_upb) {
  static constexpr std::array<double, 5> kLowerEdges = {620, 660, 700, 740, 780};
  const std::vector<std::string> labels = {"<620",    "620-659", "660-699",
                                           "700-739", "740-779", "780+"};
  return banded_table("credit score", labels, loans, pool_upb,
                      [&](std::size_t i) -> std::optional<std::size_t> {
                        const double score = loans.credit_score[i];
                        if (!std::isfinite(score)) return std::nullopt;
                        return static_cast<std::size_t>(
                            std::upper_bound(kLowerEdges.begin(), kLowerEdges.end(), score) -
                            kLowerEdges.begin());
                      });
}

// A ratio in hundredths of a percent, the precision of the band labels: 0.8 -> 8000. Rounding
// first makes 80.00% land in the same band however the reader's arithmetic left the last bit.
// Clamped so a wild value cannot overflow the integer (it still lands in the outermost band).
long long hundredths_of_percent(double ratio) {
  return std::llround(std::clamp(ratio * 10000, -1e15, 1e15));
}

// Bands of a percent ratio where each band includes its UPPER edge (common practice for LTV
// and DTI): 80.00% is in 70.01-80, 80.01% in 80.01-85, 60.00% in <=60.
template <std::size_t N>
StratTable upper_inclusive_table(std::string title, const std::vector<double>& ratios,
                                 const std::array<long long, N>& upper_edges,
                                 const std::vector<std::string>& labels,
                                 const LoanArrays& loans, double pool_upb) {
  return banded_table(std::move(title), labels, loans, pool_upb,
                      [&](std::size_t i) -> std::optional<std::size_t> {
                        if (!std::isfinite(ratios[i])) return std::nullopt;
                        const long long h = hundredths_of_percent(ratios[i]);
                        return static_cast<std::size_t>(
                            std::lower_bound(upper_edges.begin(), upper_edges.end(), h) -
                            upper_edges.begin());
                      });
}

StratTable ltv_table(std::string title, const std::vector<double>& ltv, const LoanArrays& loans,
                     double pool_upb) {
  static constexpr std::array<long long, 7> kUpperEdges = {6000, 7000, 8000, 8500,
                                                           9000, 9500, 10000};
  const std::vector<std::string> labels = {"<=60",     "60.01-70", "70.01-80", "80.01-85",
                                           "85.01-90", "90.01-95", "95.01-100", ">100"};
  return upper_inclusive_table(std::move(title), ltv, kUpperEdges, labels, loans, pool_upb);
}

StratTable dti_table(const LoanArrays& loans, double pool_upb) {
  static constexpr std::array<long long, 5> kUpperEdges = {2000, 3000, 3600, 4300, 5000};
  const std::vector<std::string> labels = {"<=20",     "20.01-30", "30.01-36",
                                           "36.01-43", "43.01-50", ">50"};
  return upper_inclusive_table("DTI (%)", loans.dti, kUpperEdges, labels, loans, pool_upb);
}

// Note rate in half-point bands found in the data, ascending. Each band includes its lower edge
// and excludes its upper one: 6.50% and 6.875% are in "6.50-6.99", 7.00% in "7.00-7.49". Rates
// are rounded to a thousandth of a percent first (6.125% is written to three places).
StratTable note_rate_table(const LoanArrays& loans, double pool_upb) {
  std::map<long long, RowSums> bands;  // key: lower edge in half points (13 = 6.50%)
  RowSums missing;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const double rate = loans.note_rate[i];
    if (!std::isfinite(rate)) {
      add_loan(missing, loans, i);
      continue;
    }
    // 0.065 -> 6500 thousandths of a percent; clamped so a wild value cannot overflow.
    const long long thousandths = std::llround(std::clamp(rate * 100000, -1e15, 1e15));
    const long long band = thousandths >= 0 ? thousandths / 500 : -((-thousandths + 499) / 500);
    add_loan(bands[band], loans, i);
  }
  StratTable table{"note rate (%)", {}};
  for (const auto& [band, sums] : bands) {
    const double low = static_cast<double>(band) * 0.5;
    table.rows.push_back(finish_row(fmt::format("{:.2f}-{:.2f}", low, low + 0.49), sums, pool_upb));
  }
  if (missing.count > 0) table.rows.push_back(finish_row("missing", missing, pool_upb));
  return table;
}

// Current balance bands. Each band includes its lower edge: $100,000.00 is in
// 100,000-199,999, and so is $199,999.50; $1,000,000.00 is in >=1,000,000.
StratTable balance_table(const LoanArrays& loans, double pool_upb) {
  static constexpr std::array<double, 6> kLowerEdges = {100'000, 200'000, 300'000,
                                                        400'000, 600'000, 1'000'000};
  const std::vector<std::string> labels = {"<100,000",        "100,000-199,999",
                                           "200,000-299,999", "300,000-399,999",
                                           "400,000-599,999", "600,000-999,999",
                                           ">=1,000,000"};
  return banded_table("current balance ($)", labels, loans, pool_upb,
                      [&](std::size_t i) -> std::optional<std::size_t> {
                        const double upb = loans.current_balance[i];
                        return static_cast<std::size_t>(
                            std::upper_bound(kLowerEdges.begin(), kLowerEdges.end(), upb) -
                            kLowerEdges.begin());
                      });
}

// A category table: one row per enum value in enum order, "unknown" (value 0 when the enum has
// one) last, labels from to_string.
template <typename Enum, std::size_t Count>
StratTable category_table(std::string title, const std::vector<Enum>& values, bool has_unknown,
                          const LoanArrays& loans, double pool_upb) {
  std::array<RowSums, Count> sums{};
  for (std::size_t i = 0; i < loans.size(); ++i) {
    const auto v = static_cast<std::size_t>(values[i]);
    if (v >= Count)
      throw std::invalid_argument(
          fmt::format("stratify: {} of loan {} is not a known value ({})", title, i, v));
    add_loan(sums[v], loans, i);
  }
  std::vector<std::size_t> order;
  for (std::size_t v = has_unknown ? 1 : 0; v < Count; ++v) order.push_back(v);
  if (has_unknown) order.push_back(0);
  StratTable table{std::move(title), {}};
  for (std::size_t v : order)
    if (sums[v].count > 0)
      table.rows.push_back(
          finish_row(std::string(to_string(static_cast<Enum>(v))), sums[v], pool_upb));
  return table;
}

// States: the ten largest by UPB (a tie goes to the code first in the alphabet), one "other"
// row for every other state, and "missing" for loans without a state. "other" is summed over
// loans in loan order, like every row.
StratTable state_table(const LoanArrays& loans, double pool_upb) {
  constexpr std::size_t kSlots = 256;
  auto known = [&](std::size_t i) { return !state_code(loans.state[i]).empty(); };
  std::array<double, kSlots> upb_by_state{};
  std::array<std::size_t, kSlots> count_by_state{};
  for (std::size_t i = 0; i < loans.size(); ++i) {
    if (!known(i)) continue;
    upb_by_state[loans.state[i]] += loans.current_balance[i];
    ++count_by_state[loans.state[i]];
  }
  std::vector<std::uint8_t> present;
  for (std::size_t s = 0; s < kSlots; ++s)
    if (count_by_state[s] > 0) present.push_back(static_cast<std::uint8_t>(s));
  std::sort(present.begin(), present.end(), [&](std::uint8_t a, std::uint8_t b) {
    if (upb_by_state[a] != upb_by_state[b]) return upb_by_state[a] > upb_by_state[b];
    return state_code(a) < state_code(b);
  });
  const std::size_t top = std::min(present.size(), kTopStates);
  std::array<int, kSlots> rank;  // position among the top ten; -1 = "other"
  rank.fill(-1);
  for (std::size_t r = 0; r < top; ++r) rank[present[r]] = static_cast<int>(r);

  std::vector<RowSums> rows(top);
  RowSums other, missing;
  for (std::size_t i = 0; i < loans.size(); ++i) {
    if (!known(i))
      add_loan(missing, loans, i);
    else if (rank[loans.state[i]] < 0)
      add_loan(other, loans, i);
    else
      add_loan(rows[static_cast<std::size_t>(rank[loans.state[i]])], loans, i);
  }
  StratTable table{"state (top 10 by UPB)", {}};
  for (std::size_t r = 0; r < top; ++r)
    table.rows.push_back(finish_row(std::string(state_code(present[r])), rows[r], pool_upb));
  if (other.count > 0) table.rows.push_back(finish_row("other", other, pool_upb));
  if (missing.count > 0) table.rows.push_back(finish_row("missing", missing, pool_upb));
  return table;
}

template <typename T>
WeightedAverage weighted_average(const std::vector<T>& values, const std::vector<double>& upb) {
  double sum = 0, weight = 0;
  std::size_t missing = 0;
  for (std::size_t i = 0; i < values.size(); ++i) {
    const double v = static_cast<double>(values[i]);
    if (!std::isfinite(v)) {
      ++missing;
      continue;
    }
    sum += upb[i] * v;
    weight += upb[i];
  }
  return WeightedAverage{ratio_or_nan(sum, weight), missing};
}

// Every vector stratify reads must hold one slot per loan; a short one would be read past its end.
void require_same_length(const LoanArrays& loans) {
  const std::size_t n = loans.size();
  auto check = [&](const char* name, std::size_t size) {
    if (size != n)
      throw std::invalid_argument(fmt::format(
          "stratify: LoanArrays.{} has {} entries but current_balance has {}", name, size, n));
  };
  check("note_rate", loans.note_rate.size());
  check("remaining_term", loans.remaining_term.size());
  check("age", loans.age.size());
  check("credit_score", loans.credit_score.size());
  check("original_ltv", loans.original_ltv.size());
  check("combined_ltv", loans.combined_ltv.size());
  check("dti", loans.dti.size());
  check("occupancy", loans.occupancy.size());
  check("purpose", loans.purpose.size());
  check("documentation", loans.documentation.size());
  check("property_type", loans.property_type.size());
  check("amortization", loans.amortization.size());
  check("delinquency", loans.delinquency.size());
  check("state", loans.state.size());
}

}  // namespace

Strats stratify(const LoanArrays& loans) {
  require_same_length(loans);
  Strats s;
  s.loans = loans.size();
  for (double upb : loans.current_balance) s.upb += upb;
  s.average_upb = s.loans > 0 ? s.upb / static_cast<double>(s.loans) : kNaN;

  const std::vector<double>& w = loans.current_balance;
  s.wac = weighted_average(loans.note_rate, w);
  s.wam = weighted_average(loans.remaining_term, w);
  s.wala = weighted_average(loans.age, w);
  s.credit_score = weighted_average(loans.credit_score, w);
  s.original_ltv = weighted_average(loans.original_ltv, w);
  s.combined_ltv = weighted_average(loans.combined_ltv, w);
  s.dti = weighted_average(loans.dti, w);

  const double pool = s.upb;
  s.tables.push_back(credit_score_table(loans, pool));
  s.tables.push_back(ltv_table("original LTV (%)", loans.original_ltv, loans, pool));
  s.tables.push_back(ltv_table("combined LTV (%)", loans.combined_ltv, loans, pool));
  s.tables.push_back(dti_table(loans, pool));
  s.tables.push_back(note_rate_table(loans, pool));
  s.tables.push_back(balance_table(loans, pool));
  s.tables.push_back(category_table<Occupancy, 4>("occupancy", loans.occupancy, true, loans, pool));
  s.tables.push_back(category_table<Purpose, 4>("loan purpose", loans.purpose, true, loans, pool));
  s.tables.push_back(
      category_table<Documentation, 4>("documentation", loans.documentation, true, loans, pool));
  s.tables.push_back(
      category_table<PropertyType, 7>("property type", loans.property_type, true, loans, pool));
  s.tables.push_back(category_table<Amortization, 4>("amortization type", loans.amortization,
                                                     false, loans, pool));
  s.tables.push_back(
      category_table<Delinquency, 6>("delinquency", loans.delinquency, true, loans, pool));
  s.tables.push_back(state_table(loans, pool));
  return s;
}

}  // namespace poolbid
