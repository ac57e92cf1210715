// Portable random numbers: uniform, integer, normal draws and a shuffle built from the raw output
// of std::mt19937_64, whose sequence the C++ standard fixes bit for bit. The standard's
// distributions (std::normal_distribution, std::uniform_int_distribution, std::shuffle) are not
// specified that far: another standard library draws other numbers from the same seed. These are.
//   uniform01:  (u >> 11) 2^-53, in [0, 1)
//   below(n):   uniform in 0 .. n-1 by rejection (no bias): draws until u < 2^64 - (2^64 mod n), then u mod n
//   normal:     Box-Muller from two uniforms, sqrt(-2 log(1 - u1)) cos(2 pi u2), with the portable log
//               and cos (portable_math.h), so the same bits on every machine
//   shuffle:    Fisher-Yates, swapping position i with below(i + 1), from the end
// Functions of the generator passed in; a generator is used from one thread.
#pragma once
#include <cmath>
#include <cstdint>
#include <iterator>
#include <random>
#include <utility>

#include "solver/base/portable_math.h"

namespace kith {

inline double uniform01(std::mt19937_64& rng) { return double(rng() >> 11) * (1.0 / 9007199254740992.0); }

inline uint64_t below(std::mt19937_64& rng, uint64_t n) {
  if (n <= 1) return 0;
  const uint64_t limit = UINT64_MAX - (UINT64_MAX % n + 1) % n;  // the largest multiple of n, minus one
  uint64_t u = rng();
  while (u > limit) u = rng();
  return u % n;
}

inline double normal(std::mt19937_64& rng, double mean = 0.0, double sd = 1.0) {
  constexpr double kTwoPi = 6.283185307179586;
  const double u1 = uniform01(rng), u2 = uniform01(rng);
  return mean + sd * (std::sqrt(-2.0 * pm::log(1.0 - u1)) * pm::cos(kTwoPi * u2));
}

template <typename It>
void shuffle(It first, It last, std::mt19937_64& rng) {
  const auto n = std::distance(first, last);
  for (auto i = n - 1; i > 0; --i) {
    using std::swap;
    swap(first[i], first[decltype(i)(below(rng, uint64_t(i) + 1))]);
  }
}

}  // namespace kith
