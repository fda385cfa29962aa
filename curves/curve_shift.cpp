// Shifted yield curves: continuous zero rates (Actual/365 Fixed) moved by a parallel amount plus
// key-rate triangles, over the unchanged term structure (quotes are not re-bootstrapped).
// The key-rate triangles added together are the piecewise-linear interpolation of the key bumps
// through the key tenors, flat before the first and after the last; key tenors are read as curve
// time (Actual/365 Fixed years from as_of). The shifted YieldCurve keeps the source, quotes,
// flat_rate and indexes of the curve it came from; parallel_shift_bp and key_rate_shifts say what
// moved. Tested: tests/curves/curve_shift_test.cpp.
#include <fmt/core.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <ql/termstructures/yieldtermstructure.hpp>
#include <stdexcept>
#include <utility>
#include <vector>

#include "curves/curves.h"

namespace poolbid {
namespace {

namespace ql = QuantLib;

constexpr double kBasisPoint = 1e-4;

// The base curve with its zero rates moved by spread(t): DF(t) = DF_base(t) exp(-spread(t) t).
// Holds the base by shared_ptr, so it outlives the YieldCurve it came from. Not a QuantLib
// observer of anything: a plain, immutable curve, safe to read from any thread.
class ShiftedCurve final : public ql::YieldTermStructure {
 public:
  ShiftedCurve(std::shared_ptr<const ql::YieldTermStructure> base, double parallel,
               std::vector<double> key_times, std::vector<double> key_spreads)
      : ql::YieldTermStructure(base->referenceDate(), base->calendar(), base->dayCounter()),
        base_(std::move(base)),
        parallel_(parallel),
        key_times_(std::move(key_times)),
        key_spreads_(std::move(key_spreads)) {
    enableExtrapolation();
  }

  ql::Date maxDate() const override { return base_->maxDate(); }

  // Decimal, continuous: the parallel shift plus the key-rate bumps interpolated at time t.
  double spread(ql::Time t) const {
    if (key_times_.empty()) return parallel_;
    if (t <= key_times_.front()) return parallel_ + key_spreads_.front();
    if (t >= key_times_.back()) return parallel_ + key_spreads_.back();
    const auto upper = std::upper_bound(key_times_.begin(), key_times_.end(), t);
    const auto k = static_cast<std::size_t>(upper - key_times_.begin());
    const double w = (t - key_times_[k - 1]) / (key_times_[k] - key_times_[k - 1]);
    return parallel_ + (1 - w) * key_spreads_[k - 1] + w * key_spreads_[k];
  }

 protected:
  ql::DiscountFactor discountImpl(ql::Time t) const override {
    return base_->discount(t, true) * std::exp(-spread(t) * t);
  }

 private:
  std::shared_ptr<const ql::YieldTermStructure> base_;
  double parallel_;
  std::vector<double> key_times_;
  std::vector<double> key_spreads_;
};

void check(const CurveShift& shift) {
  if (!std::isfinite(shift.parallel_bp))
    throw std::invalid_argument("shift_curve: the parallel shift must be a finite number of bp");
  if (shift.key_years.size() != shift.key_bp.size())
    throw std::invalid_argument(
        fmt::format("shift_curve: {} key tenors but {} key-rate shifts; give one shift per tenor",
                    shift.key_years.size(), shift.key_bp.size()));
  for (std::size_t i = 0; i < shift.key_years.size(); ++i) {
    const double years = shift.key_years[i];
    if (!std::isfinite(years) || years <= 0 || (i > 0 && years <= shift.key_years[i - 1]))
      throw std::invalid_argument(fmt::format(
          "shift_curve: key tenor {} ({} years) must be positive and above the one before", i,
          years));
    if (!std::isfinite(shift.key_bp[i]))
      throw std::invalid_argument(
          fmt::format("shift_curve: the shift at key tenor {} years must be finite", years));
  }
}

}  // namespace

YieldCurve shift_curve(const YieldCurve& curve, const CurveShift& shift) {
  check(shift);
  if (!curve.term_structure) throw std::invalid_argument("shift_curve: the curve is not built");
  YieldCurve shifted = curve;
  if (shift.parallel_bp == 0 &&
      std::all_of(shift.key_bp.begin(), shift.key_bp.end(), [](double bp) { return bp == 0; }))
    return shifted;
  std::vector<double> spreads;
  for (double bp : shift.key_bp) spreads.push_back(bp * kBasisPoint);
  shifted.term_structure = std::make_shared<ShiftedCurve>(
      curve.term_structure, shift.parallel_bp * kBasisPoint, shift.key_years, std::move(spreads));

  shifted.parallel_shift_bp += shift.parallel_bp;
  auto& keys = shifted.key_rate_shifts;
  for (std::size_t i = 0; i < shift.key_years.size(); ++i) {
    const auto same = std::find_if(
        keys.begin(), keys.end(), [&](const auto& key) { return key.first == shift.key_years[i]; });
    if (same != keys.end())
      same->second += shift.key_bp[i];
    else
      keys.emplace_back(shift.key_years[i], shift.key_bp[i]);
  }
  std::sort(keys.begin(), keys.end());
  return shifted;
}

}  // namespace poolbid
