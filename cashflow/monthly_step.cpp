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

void load_block(const EngineInputs& in, std::size_t first, std::size_t count, Block& b) {
  const LoanArrays& l = *in.loans;
  b.first = first;
  b.count = count;
  b.months = 0;
  for (std::size_t i = 0; i < count; ++i) {
    const std::size_t g = first + i;
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
    const auto slot = static_cast<std::uint32_t>(*it - b.first);
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
    const int remaining = in.loans->remaining_term[b.first + i];
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

    // 1. Defaults off the beginning balance.
    const double begin = b.balance[i];
    const double defaulted = begin * mdr;
    const double performing = begin - defaulted;
    // 2-4. Interest on the performing balance; the level payment scales with it.
    const bool interest_only = month <= b.io_end[i];
    const bool final_month = month == b.last[i];
    const double gross = performing * b.rate[i];
    const double servicing = performing * b.fee[i];
    const double net = performing * b.net[i];
    const double payment = interest_only ? gross : b.payment[i] * (1.0 - mdr);
    const double sched = final_month ? performing : payment - gross;
    // 5. Prepayment on what is left after scheduled principal.
    const double prepay = final_month ? 0.0 : smm * (performing - sched);
    const double end = performing - sched - prepay;
    b.balance[i] = end;
    b.payment[i] = final_month      ? 0.0
                   : interest_only ? end * b.io_factor[i]
                                   : b.payment[i] * ((1.0 - mdr) * (1.0 - smm));
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

void store_totals(const Block& b, LoanFlows& out) {
  const bool discounted = !out.present_value.empty();
  for (std::size_t i = 0; i < b.count; ++i) {
    const std::size_t g = b.first + i;
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
  for (std::size_t start = first; start < last; start += kBlockLoans) {
    load_block(in, start, std::min(kBlockLoans, last - start), *block);
    coupon_events(in, *block, *coupons);
    loop(in, *block, *coupons, sums);
    if (in.loan_totals) store_totals(*block, *in.loan_totals);
  }
}

}  // namespace poolbid::detail
