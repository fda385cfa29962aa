// The yardstick loop: blocks of 256 loans, months outer and loans inner, pool sums per month by
// `omp simd` reductions (compiled with -fopenmp-simd; no OpenMP runtime). See tight_loop.h.
#include "bench/tight_loop.h"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <thread>

namespace poolbid::bench {
namespace {

constexpr int kBlock = 256;
constexpr std::size_t kChunkLoans = 64 * kBlock;

// Pool sums kept per month; loss and recovery land in the month of liquidation; adv_added is
// the net interest on balance newly defaulted that month, advanced for lag_months months.
enum Sum { begin_, defaults_, sched_, prepay_, gross_, servicing_, net_, adv_added_, loss_,
           recovery_, end_, kSums };

// Month t of sum s sits at acc[s * span + t - 1].
template <bool SmmByAge, bool MdrByAge, bool SevByAge, bool Advance>
void project_block(const TightLoans& loans, const TightAssumptions& a, std::size_t first, int n,
                   double* acc, int span) {
  alignas(64) double balance[kBlock], payment[kBlock], c12[kBlock], s12[kBlock], n12[kBlock],
      cutoff_default[kBlock];
  alignas(64) std::int32_t remaining[kBlock], age[kBlock];
  int last = 0;
  for (int i = 0; i < n; ++i) {
    const std::size_t k = first + static_cast<std::size_t>(i);
    const double b = loans.balance[k];
    const double r = loans.note_rate[k] / 12;
    const int m = loans.remaining_term[k];
    balance[i] = b;
    payment[i] = r > 0 ? b * r / (1 - std::pow(1 + r, -m)) : b / m;
    c12[i] = r;
    s12[i] = loans.servicing_fee[k] / 12;
    n12[i] = c12[i] - s12[i];
    cutoff_default[i] = loans.default_at_cutoff.empty() ? 0.0 : loans.default_at_cutoff[k];
    remaining[i] = m;
    age[i] = loans.age[k];
    last = std::max(last, m);
  }
  const double* smm_table = a.smm.by_month.data();
  const double* mdr_table = a.mdr.by_month.data();
  const double* sev_table = a.severity.by_month.data();
  const int smm_hold = a.smm.hold, mdr_hold = a.mdr.hold, sev_hold = a.severity.hold;
  const int lag = a.lag_months;
  const double advance_months = lag;

  for (int t = 1; t <= last; ++t) {
    const double smm_month = smm_table[std::min(t, smm_hold)];
    const double mdr_month = mdr_table[std::min(t, mdr_hold)];
    const double sev_month = sev_table[std::min(t, sev_hold)];
    const double month_one = t == 1 ? 1.0 : 0.0;
    double s_begin = 0, s_defaults = 0, s_sched = 0, s_prepay = 0, s_gross = 0, s_servicing = 0,
           s_net = 0, s_adv = 0, s_loss = 0, s_recovery = 0, s_end = 0;
#pragma omp simd reduction(+ : s_begin, s_defaults, s_sched, s_prepay, s_gross, s_servicing, \
                               s_net, s_adv, s_loss, s_recovery, s_end)
    for (int i = 0; i < n; ++i) {
      const double smm = SmmByAge ? smm_table[std::min(age[i] + t, smm_hold)] : smm_month;
      double mdr = MdrByAge ? mdr_table[std::min(age[i] + t, mdr_hold)] : mdr_month;
      const double forced = month_one * cutoff_default[i];
      mdr = forced > mdr ? forced : mdr;
      const double sev = SevByAge ? sev_table[std::min(age[i] + t, sev_hold)] : sev_month;
      const double b = balance[i];
      const double d = mdr * b;
      const double performing = b - d;
      const double pay = payment[i] * (1 - mdr);
      const double gross = performing * c12[i];
      const double servicing = performing * s12[i];
      const double net = performing * n12[i];
      const double sched = t >= remaining[i] ? performing : pay - gross;
      const double prepay = smm * (performing - sched);
      const double end = performing - sched - prepay;
      balance[i] = end;
      payment[i] = pay * (1 - smm);
      double recovery, loss;
      if constexpr (Advance) {
        const double share = 1 - sev - n12[i] * advance_months;
        recovery = d * (share > 0 ? share : 0.0);
        loss = d - recovery;
        s_adv += d * n12[i];
      } else {
        recovery = d * (1 - sev);
        loss = d * sev;
      }
      s_begin += b;
      s_defaults += d;
      s_sched += sched;
      s_prepay += prepay;
      s_gross += gross;
      s_servicing += servicing;
      s_net += net;
      s_loss += loss;
      s_recovery += recovery;
      s_end += end;
    }
    const int m = t - 1;
    acc[begin_ * span + m] += s_begin;
    acc[defaults_ * span + m] += s_defaults;
    acc[sched_ * span + m] += s_sched;
    acc[prepay_ * span + m] += s_prepay;
    acc[gross_ * span + m] += s_gross;
    acc[servicing_ * span + m] += s_servicing;
    acc[net_ * span + m] += s_net;
    acc[adv_added_ * span + m] += s_adv;
    acc[loss_ * span + m + lag] += s_loss;
    acc[recovery_ * span + m + lag] += s_recovery;
    acc[end_ * span + m] += s_end;
  }
}

using BlockFn = void (*)(const TightLoans&, const TightAssumptions&, std::size_t, int, double*,
                         int);

template <bool S, bool M, bool V>
BlockFn pick_advance(bool advance) {
  return advance ? &project_block<S, M, V, true> : &project_block<S, M, V, false>;
}
template <bool S, bool M>
BlockFn pick_severity(bool sev_by_age, bool advance) {
  return sev_by_age ? pick_advance<S, M, true>(advance) : pick_advance<S, M, false>(advance);
}
template <bool S>
BlockFn pick_default(bool mdr_by_age, bool sev_by_age, bool advance) {
  return mdr_by_age ? pick_severity<S, true>(sev_by_age, advance)
                    : pick_severity<S, false>(sev_by_age, advance);
}
BlockFn pick(const TightAssumptions& a) {
  return a.smm.by_age ? pick_default<true>(a.mdr.by_age, a.severity.by_age, a.advance_interest)
                      : pick_default<false>(a.mdr.by_age, a.severity.by_age, a.advance_interest);
}

}  // namespace

TightPool tight_project(const TightLoans& loans, const TightAssumptions& a, unsigned threads) {
  const std::size_t count = loans.balance.size();
  int longest = 0;
  for (const std::int32_t m : loans.remaining_term) longest = std::max(longest, int{m});
  const int span = longest + a.lag_months + 1;
  const std::size_t chunks = (count + kChunkLoans - 1) / kChunkLoans;
  std::vector<double> partial(chunks * kSums * static_cast<std::size_t>(span), 0.0);
  const BlockFn block = pick(a);

  auto run_chunks = [&](std::size_t from, std::size_t to) {
    for (std::size_t c = from; c < to; ++c) {
      double* acc = partial.data() + c * kSums * static_cast<std::size_t>(span);
      const std::size_t end = std::min(count, (c + 1) * kChunkLoans);
      for (std::size_t first = c * kChunkLoans; first < end; first += kBlock)
        block(loans, a, first, static_cast<int>(std::min<std::size_t>(kBlock, end - first)), acc,
              span);
    }
  };
  const std::size_t workers = std::max<std::size_t>(1, std::min<std::size_t>(threads, chunks));
  std::vector<std::thread> pool;
  for (std::size_t w = 1; w < workers; ++w)
    pool.emplace_back(run_chunks, w * chunks / workers, (w + 1) * chunks / workers);
  run_chunks(0, chunks / workers);
  for (std::thread& th : pool) th.join();

  std::vector<double> sums(kSums * static_cast<std::size_t>(span), 0.0);
  for (std::size_t c = 0; c < chunks; ++c)
    for (std::size_t j = 0; j < sums.size(); ++j)
      sums[j] += partial[c * sums.size() + j];
  auto column = [&](int s) { return sums.begin() + s * span; };

  TightPool pool_flows;
  int months = 0;
  for (int m = 0; m < span; ++m)
    if (column(begin_)[m] != 0 || column(loss_)[m] != 0 || column(recovery_)[m] != 0) months = m + 1;
  pool_flows.months = months;
  auto take = [&](int s) { return std::vector<double>(column(s), column(s) + months); };
  pool_flows.begin_balance = take(begin_);
  pool_flows.defaults = take(defaults_);
  pool_flows.sched_principal = take(sched_);
  pool_flows.prepayment = take(prepay_);
  pool_flows.gross_interest = take(gross_);
  pool_flows.servicing = take(servicing_);
  pool_flows.net_interest = take(net_);
  pool_flows.loss = take(loss_);
  pool_flows.recovery = take(recovery_);
  pool_flows.end_balance = take(end_);
  pool_flows.advanced_interest.assign(months, 0.0);
  if (a.advance_interest) {
    // Balance defaulting in month t earns advances in months t .. t + lag - 1.
    for (int m = 0; m < months; ++m) {
      double advanced = 0;
      for (int t = std::max(0, m - a.lag_months + 1); t <= m; ++t) advanced += column(adv_added_)[t];
      pool_flows.advanced_interest[m] = advanced;
      pool_flows.net_interest[m] += advanced;
    }
  }
  return pool_flows;
}

}  // namespace poolbid::bench
