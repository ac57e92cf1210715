#include <doctest/doctest.h>

#include "solver/base/judgment.h"

TEST_CASE("judgment kinds round-trip through their names") {
  for (int k = 0; k <= 4; ++k) {
    const auto kind = static_cast<kith::JudgmentKind>(k);
    kith::JudgmentKind back{};
    REQUIRE(kith::judgment_kind_from_string(kith::to_string(kind), &back));
    CHECK(back == kind);
  }
  kith::JudgmentKind unused{};
  CHECK_FALSE(kith::judgment_kind_from_string("sideways", &unused));
}
