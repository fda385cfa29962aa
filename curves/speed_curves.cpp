// PSA and SDA standard curves, CPR <-> SMM and CDR <-> MDR, a curve's value by month and the
// monthly tables the projection loop reads (DESIGN.md sections 2 and 3).
#include <algorithm>
#include <cmath>
#include <cstddef>

#include "curves/curves.h"

namespace poolbid {
namespace {

// The last month in which a curve's value can still change; later months read this one.
int hold_month(const SpeedCurve& curve) {
  switch (curve.shape) {
    case CurveShape::constant:
      return 1;
    case CurveShape::vector:
      return std::max<int>(1, static_cast<int>(curve.values.size()));
    case CurveShape::ramp:
      return std::max(1, curve.ramp_months);
    case CurveShape::psa:
      return 30;  // 6% x multiple from age 30 on
    case CurveShape::sda:
      return 120;  // 0.03% x multiple from age 120 on
  }
  return 1;
}

// 1 - (1 - annual)^(1/12), written with log1p/expm1 so small rates keep their digits.
double monthly_from_annual(double annual) { return -std::expm1(std::log1p(-annual) / 12.0); }
double annual_from_monthly(double monthly) { return -std::expm1(12.0 * std::log1p(-monthly)); }

template <typename Convert>
MonthlyTable tabulate(const SpeedCurve& curve, Convert convert) {
  MonthlyTable table;
  table.hold = hold_month(curve);
  table.clock = curve.clock;
  table.by_month.resize(static_cast<std::size_t>(table.hold) + 1);
  for (int k = 1; k <= table.hold; ++k) table.by_month[k] = convert(curve_value(curve, k));
  table.by_month[0] = table.by_month[1];
  return table;
}

}  // namespace

Rate psa_cpr(double multiple, int age_months) {
  const double age = std::max(age_months, 0);
  return multiple * 0.06 * std::min(1.0, age / 30.0);
}

Rate sda_cdr(double multiple, int age_months) {
  const int age = std::max(age_months, 0);
  double cdr = 0.0003;  // from 120 (the decline's end)
  if (age <= 30)
    cdr = 0.0002 * age;  // 0.02% x age
  else if (age <= 60)
    cdr = 0.006;  // 0.60%
  else if (age < 120)
    cdr = 0.006 - 0.000095 * (age - 60);  // down 0.0095% a month
  return multiple * cdr;
}

double smm_from_cpr(Rate cpr) { return monthly_from_annual(cpr); }
Rate cpr_from_smm(double smm) { return annual_from_monthly(smm); }
double mdr_from_cdr(Rate cdr) { return monthly_from_annual(cdr); }
Rate cdr_from_mdr(double mdr) { return annual_from_monthly(mdr); }

double curve_value(const SpeedCurve& curve, int month) {
  const int k = std::max(month, 1);
  switch (curve.shape) {
    case CurveShape::constant:
      return curve.value;
    case CurveShape::vector: {
      if (curve.values.empty()) return 0.0;
      const std::size_t i =
          std::min<std::size_t>(static_cast<std::size_t>(k) - 1, curve.values.size() - 1);
      return curve.values[i];
    }
    case CurveShape::ramp: {
      if (k >= curve.ramp_months) return curve.ramp_to;  // also ramp_months <= 1: constant
      const double step = (curve.ramp_to - curve.ramp_from) / (curve.ramp_months - 1);
      return curve.ramp_from + step * (k - 1);
    }
    case CurveShape::psa:
      return psa_cpr(curve.value, k);
    case CurveShape::sda:
      return sda_cdr(curve.value, k);
  }
  return 0.0;
}

MonthlyTable monthly_rate_table(const SpeedCurve& annual_rate) {
  return tabulate(annual_rate, monthly_from_annual);
}

MonthlyTable monthly_share_table(const SpeedCurve& share) {
  return tabulate(share, [](double v) { return v; });
}

}  // namespace poolbid
