// Walker's alias method (Vose 1991 construction): draws from a fixed discrete
// distribution in O(1). The sampler uses it for the alpha part of the document
// proposal. Example: weights (1, 3) -> topic 1 three times as often as topic 0.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "model/random.h"

namespace loupe {

class AliasTable {
 public:
  AliasTable() = default;
  explicit AliasTable(std::span<const double> weights) { build(weights); }

  void build(std::span<const double> weights) {
    const std::size_t n = weights.size();
    probability_.assign(n, 1.0);
    alias_.resize(n);
    double total = 0;
    for (const double w : weights) total += w;
    std::vector<double> scaled(n);
    std::vector<std::uint32_t> small;
    std::vector<std::uint32_t> large;
    for (std::size_t i = 0; i < n; ++i) {
      alias_[i] = static_cast<std::uint32_t>(i);
      scaled[i] = weights[i] * static_cast<double>(n) / total;
      (scaled[i] < 1.0 ? small : large).push_back(static_cast<std::uint32_t>(i));
    }
    while (!small.empty() && !large.empty()) {
      const auto s = small.back();
      small.pop_back();
      const auto l = large.back();
      probability_[s] = scaled[s];
      alias_[s] = l;
      scaled[l] = (scaled[l] + scaled[s]) - 1.0;
      if (scaled[l] < 1.0) {
        large.pop_back();
        small.push_back(l);
      }
    }
    // Left-overs (rounding) keep probability 1 and point at themselves.
  }

  std::uint32_t draw(Xoshiro256& rng) const {
    const auto n = static_cast<std::uint32_t>(probability_.size());
    const std::uint64_t bits = rng.next();
    const auto slot = static_cast<std::uint32_t>(((bits >> 32) * n) >> 32);
    const double u = static_cast<double>(bits & 0xFFFFFFFFULL) * 0x1.0p-32;
    return u < probability_[slot] ? slot : alias_[slot];
  }
  std::size_t size() const { return probability_.size(); }

 private:
  std::vector<double> probability_;
  std::vector<std::uint32_t> alias_;
};

}  // namespace loupe
