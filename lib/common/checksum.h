// 64-bit FNV-1a hashing, used for file checksums and for the fingerprint of a
// corpus that a model records. Not cryptographic: it guards against accidents.
#pragma once

#include <cstdint>
#include <span>
#include <string_view>

namespace loupe {

class Fnv1a64 {
 public:
  static constexpr std::uint64_t kOffset = 14695981039346656037ULL;
  static constexpr std::uint64_t kPrime = 1099511628211ULL;

  void update(const void* data, std::size_t size) {
    const auto* bytes = static_cast<const unsigned char*>(data);
    std::uint64_t h = state_;
    for (std::size_t i = 0; i < size; ++i) {
      h ^= bytes[i];
      h *= kPrime;
    }
    state_ = h;
  }
  void update(std::string_view text) {
    update(text.data(), text.size());
    // A terminator keeps ("ab","c") and ("a","bc") apart.
    const unsigned char zero = 0;
    update(&zero, 1);
  }
  template <typename T>
  void update_value(const T& value) {
    update(&value, sizeof(T));
  }
  std::uint64_t digest() const { return state_; }

 private:
  std::uint64_t state_ = kOffset;
};

inline std::uint64_t fnv1a64(const void* data, std::size_t size) {
  Fnv1a64 h;
  h.update(data, size);
  return h.digest();
}

}  // namespace loupe
