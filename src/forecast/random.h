#pragma once
// Seeded random numbers for the forecast, reproducible bit for bit on every
// platform and standard library.
//
// The generator is std::mt19937_64, whose output sequence the C++ standard
// fixes ([rand.predef]: the 10000th output of a default-constructed engine is
// 9981545732273789042). The standard's distributions (uniform_int_distribution
// and friends) are *not* fixed — libraries differ — so readyby draws its
// uniform indices itself (uniform_below) and needs no other distribution.
//
// Every draw gets its own generator, seeded from (seed, stream, index) by
// stream_seed, so a draw's numbers do not depend on which thread runs it or
// on how many draws ran before it.

#include <cstdint>
#include <random>

namespace readyby {

/// The forecast's default seed (any fixed value would do; this one is
/// documented in docs/forecast.md and the command's usage).
inline constexpr uint64_t kDefaultForecastSeed = 20260101;

/// SplitMix64's output function (Steele, Lea and Flood, "Fast splittable
/// pseudorandom number generators", OOPSLA 2014; constants from memory): a
/// bijective 64-bit mixer, used only to derive independent-looking seeds.
constexpr uint64_t splitmix64(uint64_t x) {
  uint64_t z = x + 0x9e3779b97f4a7c15ULL;
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

/// The seed of draw `index` of `stream` for a forecast seeded with `seed`.
constexpr uint64_t stream_seed(uint64_t seed, uint64_t stream, uint64_t index) {
  return splitmix64(splitmix64(splitmix64(seed) ^ stream) ^ index);
}

/// A uniform integer in [0, n), n >= 1: rejection of the low 2^64 mod n
/// outputs, then the remainder (the method of OpenBSD's arc4random_uniform;
/// common practice). Exactly uniform; consumes one or, rarely, more outputs.
inline uint64_t uniform_below(std::mt19937_64& rng, uint64_t n) {
  const uint64_t threshold = (0 - n) % n;  // 2^64 mod n
  while (true) {
    const uint64_t x = rng();
    if (x >= threshold) return x % n;
  }
}

}  // namespace readyby
