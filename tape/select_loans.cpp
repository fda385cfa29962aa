// select_loans: a subset of a tape's loans, every per-loan vector gathered in one pass each.
#include <stdexcept>

#include "tape/reader.h"
#include "tape/tape.h"

namespace poolbid {

LoanArrays select_loans(const LoanArrays& loans, std::span<const std::uint32_t> indexes) {
  for (const std::uint32_t i : indexes)
    if (i >= loans.size()) throw std::out_of_range("select_loans: loan index past the tape");
  LoanArrays out;
  out.seller_names = loans.seller_names;
  out.arm_index_names = loans.arm_index_names;
  detail::for_each_loan_member([&](auto member, const auto&) {
    const auto& from = loans.*member;
    auto& to = out.*member;
    to.reserve(indexes.size());
    for (const std::uint32_t i : indexes) to.push_back(from[i]);
  });
  return out;
}

}  // namespace poolbid
