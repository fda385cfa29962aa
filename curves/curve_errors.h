// Private to curves/: the CurveError builder, shared by the yield-curve file reader and sampling.
#pragma once

#include <string_view>

#include "curves/curve_forms.h"
#include "curves/curves.h"

namespace poolbid::detail {

// The error for `value` at `place`; what() = "<source>[ key <key>][, value]'<value>': <message>",
// the same shape as assumption_error.
CurveError curve_error(Place place, std::string_view value, std::string_view message);

}  // namespace poolbid::detail
