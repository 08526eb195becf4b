// Fast, reproducible random numbers for the sampler: splitmix64 to derive seeds
// (master seed -> chain -> sweep -> document) and xoshiro256+ as the generator.
// Our own code, so a seed gives the same numbers on every compiler and library.
#pragma once

#include <cmath>
#include <cstdint>
#include <initializer_list>

namespace loupe {

// splitmix64 (Steele, Lea & Flood 2014): one step of the mixing function.
inline std::uint64_t splitmix64(std::uint64_t& state) {
  std::uint64_t z = (state += 0x9E3779B97F4A7C15ULL);
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
  return z ^ (z >> 31);
}

// A seed for a sub-stream named by a path of indices, e.g.
// derive_seed(master, {chain}) or derive_seed(chain_seed, {sweep, document}).
inline std::uint64_t derive_seed(std::uint64_t seed, std::initializer_list<std::uint64_t> path) {
  std::uint64_t state = seed;
  std::uint64_t value = splitmix64(state);
  for (const auto index : path) {
    state = value ^ (index * 0xD1B54A32D192ED03ULL + 0x8CB92BA72F3D8DD7ULL);
    value = splitmix64(state);
  }
  return value;
}

// xoshiro256+ (Blackman & Vigna 2018): 64-bit output, period 2^256 - 1. The low
// bits are weaker, so doubles and bounded integers use the high bits.
class Xoshiro256 {
 public:
  explicit Xoshiro256(std::uint64_t seed) {
    std::uint64_t state = seed;
    for (auto& word : s_) word = splitmix64(state);
  }

  std::uint64_t next() {
    const std::uint64_t result = s_[0] + s_[3];
    const std::uint64_t t = s_[1] << 17;
    s_[2] ^= s_[0];
    s_[3] ^= s_[1];
    s_[1] ^= s_[2];
    s_[0] ^= s_[3];
    s_[2] ^= t;
    s_[3] = (s_[3] << 45) | (s_[3] >> 19);
    return result;
  }

  // Uniform in [0, 1) with 53 random bits.
  double uniform() { return static_cast<double>(next() >> 11) * 0x1.0p-53; }

  // Uniform integer in [0, n), n < 2^32 (Lemire's multiply-shift; bias < n / 2^32).
  std::uint32_t below(std::uint32_t n) {
    return static_cast<std::uint32_t>(((next() >> 32) * static_cast<std::uint64_t>(n)) >> 32);
  }

  // Standard normal (Marsaglia polar method).
  double normal() {
    for (;;) {
      const double u = 2.0 * uniform() - 1.0;
      const double v = 2.0 * uniform() - 1.0;
      const double s = u * u + v * v;
      if (s > 0.0 && s < 1.0) return u * std::sqrt(-2.0 * std::log(s) / s);
    }
  }

  // Gamma(shape, 1) by Marsaglia & Tsang (2000); shape < 1 through the
  // boost Gamma(shape + 1) * U^(1/shape).
  double gamma(double shape) {
    if (shape < 1.0) {
      const double u = uniform();
      return gamma(shape + 1.0) * std::pow(u > 0.0 ? u : 0x1.0p-53, 1.0 / shape);
    }
    const double d = shape - 1.0 / 3.0;
    const double c = 1.0 / std::sqrt(9.0 * d);
    for (;;) {
      double x;
      double v;
      do {
        x = normal();
        v = 1.0 + c * x;
      } while (v <= 0.0);
      v = v * v * v;
      const double u = uniform();
      if (u < 1.0 - 0.0331 * x * x * x * x) return d * v;
      if (std::log(u) < 0.5 * x * x + d * (1.0 - v + std::log(v))) return d * v;
    }
  }

 private:
  std::uint64_t s_[4];
};

}  // namespace loupe
