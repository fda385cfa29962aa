// Tests of select_loans: every per-loan vector gathered, in the order asked, name tables kept.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <type_traits>
#include <stdexcept>
#include <vector>

#include "tape/reader.h"
#include "tape/tape.h"

namespace poolbid {
namespace {

const TapeRead& demo() {
  static const TapeRead tape =
      read_tape(POOLBID_SOURCE_DIR "/demo-pools/brindlecote-strict.csv", ReadOptions{});
  return tape;
}

TEST(SelectLoans, GathersEveryVectorInTheOrderAsked) {
  LoanArrays loans = demo().loans;
  const std::vector<std::uint32_t> pick = {5, 0, 1999, 5};
  LoanArrays out = select_loans(loans, pick);
  ASSERT_EQ(out.size(), pick.size());
  EXPECT_EQ(out.seller_names, loans.seller_names);
  EXPECT_EQ(out.arm_index_names, loans.arm_index_names);
  // Every vector: the picked entries, compared as values (NaN compares equal to NaN by bits).
  detail::for_each_loan_member([&](auto member, const auto&) {
    const auto& from = loans.*member;
    const auto& to = out.*member;
    ASSERT_EQ(to.size(), pick.size());
    for (std::size_t k = 0; k < pick.size(); ++k) {
      if constexpr (std::is_floating_point_v<std::decay_t<decltype(to[k])>>) {
        EXPECT_EQ(std::isnan(to[k]), std::isnan(from[pick[k]]));
        if (!std::isnan(to[k])) {
          EXPECT_EQ(to[k], from[pick[k]]);
        }
      } else {
        EXPECT_TRUE(to[k] == from[pick[k]]);
      }
    }
  });
  EXPECT_EQ(out.loan_id[0], loans.loan_id[5]);
  EXPECT_EQ(out.row[2], loans.row[1999]);
}

TEST(SelectLoans, NoneAndOutOfRange) {
  const LoanArrays& loans = demo().loans;
  const LoanArrays none = select_loans(loans, {});
  EXPECT_EQ(none.size(), 0u);
  EXPECT_EQ(none.loan_id.size(), 0u);
  const std::vector<std::uint32_t> past = {static_cast<std::uint32_t>(loans.size())};
  EXPECT_THROW(select_loans(loans, past), std::out_of_range);
}

}  // namespace
}  // namespace poolbid
