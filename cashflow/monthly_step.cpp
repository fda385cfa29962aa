// The monthly step of DESIGN.md section 4 over one chunk of loans, kBlockLoans at a time:
// months outer, loans inner, the block's state in arrays that stay in L1. No allocation, no pow and
// no division per loan-month: the level payment is carried forward and scaled by what survives.
#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <utility>
#include <vector>

#include "cashflow/engine.h"
#include "cashflow/loan_model.h"

namespace poolbid::detail {
namespace {

// By-value min and max: std::min / std::max return references, which can keep the loop below from
// vectorising.
inline int lesser(int a, int b) { return a < b ? a : b; }
inline double greater(double a, double b) { return a > b ? a : b; }

// One block's state, one slot per loan; `count` slots in use. Month counts the loop compares with
// (io_end, last) and flags (delinquent) are doubles so that the loop runs on one vector width.
// About 19 KiB, 41 KiB with the lifetime totals: within a 48 KiB L1 data cache.
struct Block {
  std::size_t first = 0;  // index of slot 0 in LoanArrays
  std::size_t count = 0;
  int months = 0;         // the block's last final month
  alignas(64) double balance[kBlockLoans];     // performing balance at the start of the month
  alignas(64) double payment[kBlockLoans];     // level payment on `balance`, before defaults
  alignas(64) double rate[kBlockLoans];        // note rate / 12
  alignas(64) double fee[kBlockLoans];         // servicing fee / 12
  alignas(64) double net[kBlockLoans];         // (note rate - servicing fee) / 12
  alignas(64) double io_factor[kBlockLoans];   // level payment per dollar once interest-only ends
  alignas(64) double io_end[kBlockLoans];      // last interest-only projection month; 0 = none
  alignas(64) double last[kBlockLoans];        // final projection month (maturity or balloon)
  alignas(64) double delinquent[kBlockLoans];  // 1 = defaults in full in month 1
  alignas(64) int age[kBlockLoans];            // loan age at cut-off, months
  // Lifetime totals (filled only when loan totals are asked for).
  alignas(64) double sched[kBlockLoans];
  alignas(64) double prepaid[kBlockLoans];
  alignas(64) double defaulted[kBlockLoans];
  alignas(64) double recovered[kBlockLoans];
  alignas(64) double gross[kBlockLoans];
  alignas(64) double serviced[kBlockLoans];
  alignas(64) double netpaid[kBlockLoans];
  alignas(64) double advanced[kBlockLoans];
  alignas(64) double timed_principal[kBlockLoans];  // sum of month x principal, for WAL
  alignas(64) double present_value[kBlockLoans];
  alignas(64) double last_cash[kBlockLoans];
  // Slot i holds loan index[i]. Without the model slots follow loan order; with it they are
  // grouped by liquidation lag (loan order within a lag), so each group's liquidations add into
  // one month. slot_of[k] is the slot of the block's k-th loan in loan order.
  std::uint32_t index[kBlockLoans];
  std::uint32_t slot_of[kBlockLoans];
  struct LagGroup {
    int lag;
    std::uint32_t begin, end;  // slots
  };
  LagGroup groups[kBlockLoans];
  std::size_t group_count = 0;
  // The loan-level model's per-loan terms (loan_model.h LoanTerms) and state.
  alignas(64) double default_mult[kBlockLoans];
  alignas(64) double refi_mult[kBlockLoans];
  alignas(64) double value[kBlockLoans];      // property value at cut-off
  alignas(64) double inv_value[kBlockLoans];
  alignas(64) double junior[kBlockLoans];
  alignas(64) double roll_mdr[kBlockLoans];
  alignas(64) double roll_end[kBlockLoans];   // last month of the roll; 0 = none
  alignas(64) double lag[kBlockLoans];        // liquidation lag, months
  alignas(64) int lag_months[kBlockLoans];
  alignas(64) int ltv_slot[kBlockLoans];      // -1 = band from the updated LTV
  alignas(64) double burnout[kBlockLoans];    // share of the refinance response left
  // This month's liquidation sums by slot, added by lag group after the loop.
  alignas(64) double recovered_now[kBlockLoans];
  alignas(64) double defaulted_now[kBlockLoans];
  alignas(64) double advance_now[kBlockLoans];
};

// Month of a coupon change that never comes: past any loan's last month.
constexpr int kNoChange = std::numeric_limits<int>::max();

// The block's coupon changes, merged into one list in month order (slot order within a month),
// so a month costs only its own changes however many ARMs the block holds.
struct CouponEvent {
  int month;
  std::uint32_t slot;
  double rate;  // annual
};
struct BlockCoupons {
  std::vector<CouponEvent> events;
  std::vector<CouponEvent> unsorted;     // gathered loan by loan, before the month sort
  std::vector<std::uint32_t> per_month;  // counting-sort buckets
  std::size_t next = 0;         // events[next ..] are still to come
  double annual[kBlockLoans];   // each slot's current note rate (listed slots only)
};

// Slot order: loan order, or with the model grouped by liquidation lag (a stable counting sort,
// so the order does not depend on anything but the loans).
void order_slots(const EngineInputs& in, std::size_t first, std::size_t count, Block& b) {
  b.group_count = 0;
  if (!in.model) {
    for (std::size_t k = 0; k < count; ++k) b.index[k] = b.slot_of[k] = static_cast<std::uint32_t>(k);
    for (std::size_t k = 0; k < count; ++k) b.index[k] += static_cast<std::uint32_t>(first);
    b.groups[0] = {in.lag, 0, static_cast<std::uint32_t>(count)};
    b.group_count = count ? 1 : 0;
    return;
  }
  const ModelTables& m = *in.model;
  const LoanArrays& l = *in.loans;
  std::vector<std::uint32_t> per_lag(static_cast<std::size_t>(in.max_lag) + 2, 0);
  int lags[kBlockLoans];
  for (std::size_t k = 0; k < count; ++k) {
    const std::size_t state = l.state[first + k];
    lags[k] = state < m.timeline.size() ? m.timeline[state] : m.timeline[0];
    ++per_lag[static_cast<std::size_t>(lags[k]) + 1];
  }
  for (std::size_t L = 1; L < per_lag.size(); ++L) per_lag[L] += per_lag[L - 1];
  for (std::size_t L = 0; L + 1 < per_lag.size(); ++L)
    if (per_lag[L + 1] > per_lag[L])
      b.groups[b.group_count++] = {static_cast<int>(L), per_lag[L], per_lag[L + 1]};
  for (std::size_t k = 0; k < count; ++k) {
    const std::uint32_t slot = per_lag[static_cast<std::size_t>(lags[k])]++;
    b.index[slot] = static_cast<std::uint32_t>(first + k);
    b.slot_of[k] = slot;
  }
}

void load_block(const EngineInputs& in, std::size_t first, std::size_t count, Block& b) {
  const LoanArrays& l = *in.loans;
  b.first = first;
  b.count = count;
  b.months = 0;
  order_slots(in, first, count, b);
  for (std::size_t i = 0; i < count; ++i) {
    const std::size_t g = b.index[i];
    const double r = l.note_rate[g] / 12.0;
    const double s = l.servicing_fee[g] / 12.0;
    const int remaining = l.remaining_term[g];
    const int io_end = l.io_months[g] > 0 ? std::clamp(l.io_months[g] - l.age[g], 0, remaining) : 0;
    const int last = final_month(l, g);
    b.balance[i] = l.current_balance[g];
    b.rate[i] = r;
    b.fee[i] = s;
    b.net[i] = r - s;
    b.io_end[i] = io_end;
    b.io_factor[i] = io_end > 0 && remaining > io_end ? annuity_factor(r, remaining - io_end) : 0.0;
    b.payment[i] = b.balance[i] * (io_end > 0 ? b.io_factor[i] : annuity_factor(r, remaining));
    b.last[i] = last;
    b.delinquent[i] = in.delinquent_default && (l.delinquency[g] == Delinquency::dq90_plus ||
                                                l.delinquency[g] == Delinquency::foreclosure)
                          ? 1.0
                          : 0.0;
    b.age[i] = l.age[g];
    b.months = std::max(b.months, last);
    if (in.model) {
      const LoanTerms terms = loan_terms(*in.model, l, g);
      b.default_mult[i] = terms.default_multiplier;
      b.refi_mult[i] = terms.refi_multiplier;
      b.value[i] = terms.property_value;
      b.inv_value[i] = 1.0 / terms.property_value;
      b.junior[i] = terms.junior;
      b.roll_mdr[i] = terms.roll_mdr;
      b.roll_end[i] = terms.roll_months;
      b.lag[i] = terms.timeline;
      b.lag_months[i] = terms.timeline;
      b.ltv_slot[i] = terms.ltv_slot;
      b.burnout[i] = 1.0;
      b.delinquent[i] = 0.0;
    }
  }
  if (in.loan_totals) {
    for (double* total : {b.sched, b.prepaid, b.defaulted, b.recovered, b.gross, b.serviced,
                          b.netpaid, b.advanced, b.timed_principal, b.present_value, b.last_cash})
      std::fill(total, total + count, 0.0);
  }
}

// The changes of the block's rate-changing loans, merged in month order; `out` is reused.
void coupon_events(const EngineInputs& in, const Block& b, BlockCoupons& out) {
  out.events.clear();
  out.unsorted.clear();
  out.next = 0;
  if (!in.coupons) return;
  const CouponPaths& paths = *in.coupons;
  const auto& listed = paths.loans;
  auto it = std::lower_bound(listed.begin(), listed.end(), b.first);
  for (; it != listed.end() && *it < b.first + b.count; ++it) {
    const auto k = static_cast<std::size_t>(it - listed.begin());
    const auto slot = b.slot_of[*it - b.first];
    out.annual[slot] = in.loans->note_rate[*it];
    for (std::size_t c = paths.begin[k]; c < paths.begin[k + 1]; ++c)
      if (paths.changes[c].month <= b.months)  // later changes never apply
        out.unsorted.push_back({paths.changes[c].month, slot, paths.changes[c].rate});
  }
  // Counting sort by month: stable, so changes of one month stay in slot order.
  out.per_month.assign(static_cast<std::size_t>(b.months) + 2, 0);
  for (const CouponEvent& e : out.unsorted) ++out.per_month[static_cast<std::size_t>(e.month)];
  std::uint32_t start = 0;
  for (std::uint32_t& bucket : out.per_month) start += std::exchange(bucket, start);
  out.events.resize(out.unsorted.size());
  for (const CouponEvent& e : out.unsorted)
    out.events[out.per_month[static_cast<std::size_t>(e.month)]++] = e;
}

// Month of the next change still to come, kNoChange if none.
int next_change(const BlockCoupons& coupons) {
  return coupons.next < coupons.events.size() ? coupons.events[coupons.next].month : kNoChange;
}

// Before month t: a loan whose coupon changes in month t takes the new rate and, if that moves its
// rate, its payment re-amortises the beginning balance over the months left (or, while
// interest-only, the payment it will start with). Returns the month of the block's next change.
int apply_coupon_changes(const EngineInputs& in, Block& b, BlockCoupons& coupons, int t) {
  for (; coupons.next < coupons.events.size() && coupons.events[coupons.next].month == t;
       ++coupons.next) {
    const CouponEvent& e = coupons.events[coupons.next];
    const std::size_t i = e.slot;
    if (e.rate == coupons.annual[i]) continue;
    coupons.annual[i] = e.rate;
    const int remaining = in.loans->remaining_term[b.index[i]];
    const int io_end = static_cast<int>(b.io_end[i]);
    b.rate[i] = e.rate / 12.0;
    b.net[i] = b.rate[i] - b.fee[i];
    if (t <= io_end) {
      b.io_factor[i] = remaining > io_end ? annuity_factor(b.rate[i], remaining - io_end) : 0.0;
    } else if (t <= remaining) {
      b.payment[i] = b.balance[i] * annuity_factor(b.rate[i], remaining - t + 1);
    }
  }
  return next_change(coupons);
}

// One loan-month's flows (dollars) from steps 1-5 of DESIGN.md section 4.
struct StepFlows {
  double defaulted, gross, servicing, net, sched, prepay, end;
};

// Steps 1-5 for slot i at this month's MDR and SMM: defaults off the beginning balance; interest
// on the performing balance, whose level payment scales with it; scheduled principal (the whole
// performing balance in the final month); prepayment on what is left. Moves the slot's balance
// and level payment on to the next month. Inlined into the vectorised loops.
[[gnu::always_inline]] inline StepFlows step_balance(Block& b, std::size_t i, double month,
                                                     double mdr, double smm) {
  const double begin = b.balance[i];
  const double defaulted = begin * mdr;
  const double performing = begin - defaulted;
  const bool interest_only = month <= b.io_end[i];
  const bool final_month = month == b.last[i];
  const double gross = performing * b.rate[i];
  const double servicing = performing * b.fee[i];
  const double net = performing * b.net[i];
  const double payment = interest_only ? gross : b.payment[i] * (1.0 - mdr);
  const double sched = final_month ? performing : payment - gross;
  const double prepay = final_month ? 0.0 : smm * (performing - sched);
  const double end = performing - sched - prepay;
  b.balance[i] = end;
  b.payment[i] = final_month      ? 0.0
                 : interest_only ? end * b.io_factor[i]
                                 : b.payment[i] * ((1.0 - mdr) * (1.0 - smm));
  return {defaulted, gross, servicing, net, sched, prepay, end};
}

// One month of the loop for one block. Template flags: which curves need a per-loan table lookup
// by loan age (rather than one value for the whole block this month), and whether per-loan totals
// are kept.
template <bool kPrepayByAge, bool kDefaultByAge, bool kSeverityByAge, bool kTotals>
void step_month(const EngineInputs& in, Block& b, int t, ChunkSums& sums) {
  const double* const smm_table = in.smm.by_month.data();
  const double* const mdr_table = in.mdr.by_month.data();
  const double* const severity_table = in.severity.by_month.data();
  const int smm_hold = in.smm.hold, mdr_hold = in.mdr.hold, severity_hold = in.severity.hold;
  const int lag = in.lag;
  const double lag_months = lag;
  // Months of interest advanced per defaulted dollar: the lag when advancing, else none.
  const double advance_months = in.advancing ? lag_months : 0.0;
  const std::size_t n = b.count;
  const double month = t;
  const double first_month = t == 1 ? 1.0 : 0.0;
  // One value for the block: the projection month's, or (loan-age clock, every loan past the
  // curve's last changing month) the held value.
  auto block_value = [t](const MonthlyTable& table) {
    return table.by_month[table.clock == CurveClock::loan_age ? table.hold
                                                              : std::min(t, table.hold)];
  };
  const double smm_now = block_value(in.smm);
  const double mdr_now = block_value(in.mdr);
  const double severity_now = block_value(in.severity);
  const double df_paid = kTotals ? in.discount[t] : 0.0;
  const double df_liquidated = kTotals ? in.discount[t + lag] : 0.0;
  const double df_advanced = kTotals && in.advancing ? in.advance_discount[t] : 0.0;

  double s_begin = 0, s_defaults = 0, s_sched = 0, s_prepay = 0, s_gross = 0, s_servicing = 0,
         s_net = 0, s_end = 0, s_recovery = 0, s_advance = 0;
#pragma omp simd reduction(+ : s_begin, s_defaults, s_sched, s_prepay, s_gross, s_servicing, \
                             s_net, s_end, s_recovery, s_advance)
  for (std::size_t i = 0; i < n; ++i) {
    double smm = smm_now, mdr = mdr_now, severity = severity_now;
    if constexpr (kPrepayByAge) smm = smm_table[lesser(b.age[i] + t, smm_hold)];
    if constexpr (kDefaultByAge) mdr = mdr_table[lesser(b.age[i] + t, mdr_hold)];
    if constexpr (kSeverityByAge)
      severity = severity_table[lesser(b.age[i] + t, severity_hold)];
    mdr = greater(mdr, b.delinquent[i] * first_month);

    const double begin = b.balance[i];
    const auto [defaulted, gross, servicing, net, sched, prepay, end] =
        step_balance(b, i, month, mdr, smm);
    // 6-7. The defaulted balance is liquidated `lag` months on; advances come out of recovery.
    const double advance = defaulted * b.net[i];
    const double kept = greater(0.0, 1.0 - severity - b.net[i] * advance_months);
    const double recovery = defaulted * kept;

    s_begin += begin;
    s_defaults += defaulted;
    s_sched += sched;
    s_prepay += prepay;
    s_gross += gross;
    s_servicing += servicing;
    s_net += net;
    s_end += end;
    s_recovery += recovery;
    s_advance += advance;

    if constexpr (kTotals) {
      const double advanced = advance * advance_months;
      b.sched[i] += sched;
      b.prepaid[i] += prepay;
      b.defaulted[i] += defaulted;
      b.recovered[i] += recovery;
      b.gross[i] += gross;
      b.serviced[i] += servicing;
      b.netpaid[i] += net;
      b.advanced[i] += advanced;
      b.timed_principal[i] += month * (sched + prepay) + (month + lag_months) * recovery;
      b.present_value[i] += (net + sched + prepay) * df_paid + recovery * df_liquidated +
                            advance * df_advanced;
      // Cash arrives this month, through the advances (months t .. t+lag-1) and at the sale.
      const double paid = greater(b.last_cash[i], net + sched + prepay > 0.0 ? month : 0.0);
      const double advanced_to = advanced > 0.0 ? month + advance_months - 1.0 : 0.0;
      b.last_cash[i] =
          greater(greater(paid, advanced_to), recovery > 0.0 ? month + lag_months : 0.0);
    }
  }
  auto& s = sums.by_month;
  s[kBegin][t] += s_begin;
  s[kDefaults][t] += s_defaults;
  s[kSched][t] += s_sched;
  s[kPrepay][t] += s_prepay;
  s[kGross][t] += s_gross;
  s[kServicing][t] += s_servicing;
  s[kNet][t] += s_net;
  s[kEnd][t] += s_end;
  s[kRecoveryByDefaultMonth][t] += s_recovery;
  s[kAdvanceByDefaultMonth][t] += s_advance;
}

// One month of the loan-level model for one block (DESIGN.md section 7 in the monthly step of
// section 4): each loan's MDR from its age, fixed multipliers and updated-LTV band; its SMM from
// turnover and the refinance S-curve in its incentive (burnout, score and LTV applied); its
// recovery from the property value at sale. Liquidations are kept per slot and added by lag group.
template <bool kTotals, bool kBaseByAge, bool kTurnoverByAge>
void step_model(const EngineInputs& in, Block& b, int t, ChunkSums& sums) {
  const ModelTables& m = *in.model;
  const double* const base_table = m.base_mdr.by_month.data();
  const double* const turnover_table = m.turnover_smm.by_month.data();
  const int base_hold = m.base_mdr.hold, turnover_hold = m.turnover_smm.hold;
  const int base_age = m.base_mdr.clock == CurveClock::loan_age ? 1 : 0;
  const int turnover_age = m.turnover_smm.clock == CurveClock::loan_age ? 1 : 0;
  // One value for the block when no loan needs its own lookup (see run_block).
  const double base_now = base_table[base_age ? base_hold : lesser(t, base_hold)];
  const double turnover_now = turnover_table[turnover_age ? turnover_hold : lesser(t, turnover_hold)];
  const double* const edges = m.ltv_edges.data();
  const double* const ltv_default = m.ltv_default.data();
  const double* const ltv_refi = m.ltv_refi.data();
  const double* const ltv_turnover = m.ltv_turnover.data();
  const double* const refi_table = m.refi_smm.data();
  const double* const house = m.house_price.data();
  const double house_now = house[t - 1];  // index at the start of the month
  const double inverse_house = 1.0 / house_now;
  const double mortgage = m.mortgage_rate[t];
  const double burnout_rate = m.burnout_per_unit;
  const double prepay_multiplier = m.prepay_multiplier;
  const double defaults_on = m.no_defaults ? 0.0 : 1.0;
  const double sale_factor = m.sale_factor;
  const double carrying = m.carrying_per_month * house_now;
  const double foreclosure_cost = m.foreclosure_cost;
  const double advancing = in.advancing ? 1.0 : 0.0;
  const double grid_low = kIncentiveLow, grid_scale = 1.0 / kIncentiveStep;
  const double grid_top = kIncentivePoints - 1;
  const std::size_t n = b.count;
  const double month = t;
  const double* const discount = kTotals ? in.discount.data() : nullptr;
  const double* const cumulative = kTotals ? in.cumulative_discount.data() : nullptr;
  const double df_paid = kTotals ? in.discount[t] : 0.0;
  const double cumulative_before = kTotals ? in.cumulative_discount[t - 1] : 0.0;

  double s_begin = 0, s_defaults = 0, s_sched = 0, s_prepay = 0, s_gross = 0, s_servicing = 0,
         s_net = 0, s_end = 0, s_advance = 0;
#pragma omp simd reduction(+ : s_begin, s_defaults, s_sched, s_prepay, s_gross, s_servicing, \
                             s_net, s_end, s_advance)
  for (std::size_t i = 0; i < n; ++i) {
    const double begin = b.balance[i];
    // Updated LTV band (fixed slot when the tape has no value or the factor reads neutral).
    const double ltv = (begin + b.junior[i]) * b.inv_value[i] * inverse_house;
    int band = 0;
#pragma GCC unroll 16
    for (int e = 0; e < kMaxLtvEdges; ++e) band += ltv >= edges[e] ? 1 : 0;
    const int slot = b.ltv_slot[i];  // (loads kept out of the selects: no branches)
    band = slot >= 0 ? slot : band;
    // Default: rolling delinquents first, then the base curve times the loan's multipliers.
    const double base = kBaseByAge ? base_table[lesser(base_age * b.age[i] + t, base_hold)]
                                   : base_now;
    const double hazard = base * b.default_mult[i] * ltv_default[band];
    const double rolling = b.roll_mdr[i];
    double mdr = month <= b.roll_end[i] ? rolling : hazard;
    mdr = (mdr < 1.0 ? mdr : 1.0) * defaults_on;
    // Prepayment: turnover + refinance in the incentive, read to the nearest basis point.
    const double incentive = 12.0 * b.rate[i] - mortgage;
    double point = (incentive - grid_low) * grid_scale + 0.5;
    point = point < 0.0 ? 0.0 : (point > grid_top ? grid_top : point);
    const double refi =
        refi_table[static_cast<int>(point)] * b.refi_mult[i] * ltv_refi[band] * b.burnout[i];
    b.burnout[i] *= greater(0.0, 1.0 - burnout_rate * greater(0.0, incentive));
    const double turnover =
        (kTurnoverByAge ? turnover_table[lesser(turnover_age * b.age[i] + t, turnover_hold)]
                        : turnover_now) *
        ltv_turnover[band];
    double smm = (refi + turnover) * prepay_multiplier;
    smm = smm < 1.0 ? smm : 1.0;

    // The monthly step, as in step_month.
    const auto [defaulted, gross, servicing, net, sched, prepay, end] =
        step_balance(b, i, month, mdr, smm);
    // Liquidation `lag` months on: the property sold at the index then, less costs; advances
    // (net interest while waiting) come out of the proceeds.
    const double lag = b.lag[i];
    const double sale = b.value[i] * house[t - 1 + b.lag_months[i]] * sale_factor;
    const double proceeds = sale - foreclosure_cost - carrying * b.value[i] * lag;
    const double capped = proceeds < begin ? proceeds : begin;
    const double recovery = mdr * greater(0.0, capped - begin * b.net[i] * lag * advancing);
    const double advance = defaulted * b.net[i];
    b.recovered_now[i] = recovery;
    b.defaulted_now[i] = defaulted;
    b.advance_now[i] = advance;

    s_begin += begin;
    s_defaults += defaulted;
    s_sched += sched;
    s_prepay += prepay;
    s_gross += gross;
    s_servicing += servicing;
    s_net += net;
    s_end += end;
    s_advance += advance;

    if constexpr (kTotals) {
      const double advance_months = lag * advancing;
      const double advanced = advance * advance_months;
      const int liquidation = t + b.lag_months[i];
      b.sched[i] += sched;
      b.prepaid[i] += prepay;
      b.defaulted[i] += defaulted;
      b.recovered[i] += recovery;
      b.gross[i] += gross;
      b.serviced[i] += servicing;
      b.netpaid[i] += net;
      b.advanced[i] += advanced;
      b.timed_principal[i] += month * (sched + prepay) + (month + lag) * recovery;
      const double df_advanced =
          advancing * (cumulative[liquidation - 1] - cumulative_before);
      b.present_value[i] += (net + sched + prepay) * df_paid + recovery * discount[liquidation] +
                            advance * df_advanced;
      const double paid = greater(b.last_cash[i], net + sched + prepay > 0.0 ? month : 0.0);
      const double advanced_to = advanced > 0.0 ? month + advance_months - 1.0 : 0.0;
      b.last_cash[i] = greater(greater(paid, advanced_to), recovery > 0.0 ? month + lag : 0.0);
    }
  }
  auto& s = sums.by_month;
  s[kBegin][t] += s_begin;
  s[kDefaults][t] += s_defaults;
  s[kSched][t] += s_sched;
  s[kPrepay][t] += s_prepay;
  s[kGross][t] += s_gross;
  s[kServicing][t] += s_servicing;
  s[kNet][t] += s_net;
  s[kEnd][t] += s_end;
  s[kAdvanceStart][t] += s_advance;
  // Liquidations, lag group by lag group.
  for (std::size_t k = 0; k < b.group_count; ++k) {
    const Block::LagGroup& group = b.groups[k];
    double recovered = 0, defaulted = 0, advanced = 0;
    for (std::uint32_t i = group.begin; i < group.end; ++i) {
      recovered += b.recovered_now[i];
      defaulted += b.defaulted_now[i];
      advanced += b.advance_now[i];
    }
    const std::size_t when = static_cast<std::size_t>(t + group.lag);
    s[kRecoveryByLiquidationMonth][when] += recovered;
    s[kLiquidatedByLiquidationMonth][when] += defaulted;
    s[kAdvanceStop][when] += advanced;
  }
}

void store_totals(const Block& b, LoanFlows& out) {
  const bool discounted = !out.present_value.empty();
  for (std::size_t i = 0; i < b.count; ++i) {
    const std::size_t g = b.index[i];
    out.sched_principal[g] = b.sched[i];
    out.prepayment[g] = b.prepaid[i];
    out.defaults[g] = b.defaulted[i];
    out.recovery[g] = b.recovered[i];
    out.loss[g] = b.defaulted[i] - b.recovered[i];
    out.gross_interest[g] = b.gross[i];
    out.servicing[g] = b.serviced[i];
    out.advanced_interest[g] = b.advanced[i];
    out.net_interest[g] = b.netpaid[i] + b.advanced[i];
    out.cash_flow[g] = out.net_interest[g] + b.sched[i] + b.prepaid[i] + b.recovered[i];
    const double principal = b.sched[i] + b.prepaid[i] + b.recovered[i];
    out.wal_years[g] = principal > 0.0 ? b.timed_principal[i] / (12.0 * principal) : 0.0;
    if (discounted) out.present_value[g] = b.present_value[i];
    out.last_month[g] = static_cast<std::int32_t>(b.last_cash[i]);
  }
}

using MonthStep = void (*)(const EngineInputs&, Block&, int, ChunkSums&);

// The month steps for each mix of per-loan lookups: index 4 = prepay, 2 = default, 1 = severity.
template <bool kTotals>
constexpr MonthStep kMonthSteps[8] = {
    step_month<false, false, false, kTotals>, step_month<false, false, true, kTotals>,
    step_month<false, true, false, kTotals>,  step_month<false, true, true, kTotals>,
    step_month<true, false, false, kTotals>,  step_month<true, false, true, kTotals>,
    step_month<true, true, false, kTotals>,   step_month<true, true, true, kTotals>,
};

// The block's months. A loan-age curve needs a lookup per loan only while some loan in the block
// is younger than the curve's last changing month; after that every loan reads the held value.
template <bool kTotals>
void run_block(const EngineInputs& in, Block& b, BlockCoupons& coupons, ChunkSums& sums) {
  const int youngest = b.count ? *std::min_element(b.age, b.age + b.count) : 0;
  auto per_loan = [youngest](const MonthlyTable& table, int t) {
    return table.clock == CurveClock::loan_age && youngest + t < table.hold;
  };
  int due = next_change(coupons);  // month of the next coupon change
  if (in.model) {
    constexpr MonthStep kModelSteps[4] = {
        step_model<kTotals, false, false>, step_model<kTotals, false, true>,
        step_model<kTotals, true, false>, step_model<kTotals, true, true>};
    for (int t = 1; t <= b.months; ++t) {
      if (t >= due) due = apply_coupon_changes(in, b, coupons, t);
      const int key = (per_loan(in.model->base_mdr, t) ? 2 : 0) +
                      (per_loan(in.model->turnover_smm, t) ? 1 : 0);
      kModelSteps[key](in, b, t, sums);
    }
    return;
  }
  for (int t = 1; t <= b.months; ++t) {
    if (t >= due) due = apply_coupon_changes(in, b, coupons, t);
    const int key = (per_loan(in.smm, t) ? 4 : 0) + (per_loan(in.mdr, t) ? 2 : 0) +
                    (per_loan(in.severity, t) ? 1 : 0);
    kMonthSteps<kTotals>[key](in, b, t, sums);
  }
}

}  // namespace

double annuity_factor(double r, int months) {
  if (months <= 0) return 0.0;
  if (r == 0.0) return 1.0 / months;
  return r / (1.0 - std::pow(1.0 + r, -months));
}

int final_month(const LoanArrays& loans, std::size_t i) {
  const int remaining = loans.remaining_term[i];
  const int balloon = loans.balloon_month[i];
  const int balloon_due = balloon - loans.age[i];  // projection month of the balloon
  if (balloon > 0 && balloon_due >= 1) return std::min(remaining, balloon_due);
  return remaining;
}

void project_chunk(const EngineInputs& in, std::size_t first, std::size_t last, ChunkSums& sums) {
  const auto loop = in.loan_totals ? run_block<true> : run_block<false>;
  auto block = std::make_unique<Block>();
  auto coupons = std::make_unique<BlockCoupons>();
  // The model's block state is larger (its per-loan terms): half a block keeps it in L1.
  const std::size_t size = in.model ? kBlockLoans / 2 : kBlockLoans;
  for (std::size_t start = first; start < last; start += size) {
    load_block(in, start, std::min(size, last - start), *block);
    coupon_events(in, *block, *coupons);
    loop(in, *block, *coupons, sums);
    if (in.loan_totals) store_totals(*block, *in.loan_totals);
  }
}

}  // namespace poolbid::detail
