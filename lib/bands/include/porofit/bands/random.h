#pragma once
// Counter-based random streams: stream (seed, tag, index) is a fixed sequence
// whatever thread draws it, so resampling results do not depend on the thread
// count. Own normal and uniform transforms (not <random>'s distributions,
// whose algorithms differ between standard libraries) keep the draws the same
// on every platform.
#include <cmath>
#include <cstdint>

namespace porofit::bands {

/// SplitMix64 step (Steele, Lea & Flood, 2014, OOPSLA "Fast splittable
/// pseudorandom number generators"): used to seed and to mix stream ids.
inline std::uint64_t SplitMix64(std::uint64_t& state) {
  std::uint64_t z = (state += 0x9E3779B97F4A7C15ULL);
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
  return z ^ (z >> 31);
}

/// xoshiro256** (Blackman & Vigna, 2021, ACM TOMS 47(4) "Scrambled linear
/// pseudorandom number generators"), seeded through SplitMix64.
class Stream {
 public:
  Stream(std::uint64_t seed, std::uint64_t tag, std::uint64_t index) {
    std::uint64_t sm = seed;
    std::uint64_t mix = SplitMix64(sm) ^ (tag * 0xD1B54A32D192ED03ULL);
    mix = SplitMix64(mix) ^ (index * 0x9E3779B97F4A7C15ULL);
    for (auto& w : s_) w = SplitMix64(mix);
  }

  std::uint64_t Next() {
    const std::uint64_t result = Rotl(s_[1] * 5, 7) * 9;
    const std::uint64_t t = s_[1] << 17;
    s_[2] ^= s_[0];
    s_[3] ^= s_[1];
    s_[1] ^= s_[2];
    s_[0] ^= s_[3];
    s_[2] ^= t;
    s_[3] = Rotl(s_[3], 45);
    return result;
  }

  /// Uniform in [0, 1), 53 random bits.
  double Uniform() { return static_cast<double>(Next() >> 11) * 0x1.0p-53; }
  /// Uniform integer in [0, n), n > 0 (Lemire's multiply-shift; bias < n/2^64).
  std::uint64_t Below(std::uint64_t n) {
    __extension__ typedef unsigned __int128 Wide;
    return static_cast<std::uint64_t>((static_cast<Wide>(Next()) * n) >> 64);
  }
  /// +1 or -1 with probability 1/2 (Rademacher).
  double Sign() { return (Next() >> 63) != 0 ? 1.0 : -1.0; }
  /// Standard normal, Marsaglia polar method; the second value is kept.
  double Normal() {
    if (has_spare_) {
      has_spare_ = false;
      return spare_;
    }
    double u, v, s;
    do {
      u = 2.0 * Uniform() - 1.0;
      v = 2.0 * Uniform() - 1.0;
      s = u * u + v * v;
    } while (s >= 1.0 || s == 0.0);
    const double f = std::sqrt(-2.0 * std::log(s) / s);
    spare_ = v * f;
    has_spare_ = true;
    return u * f;
  }

 private:
  static std::uint64_t Rotl(std::uint64_t x, int k) { return (x << k) | (x >> (64 - k)); }
  std::uint64_t s_[4];
  double spare_ = 0;
  bool has_spare_ = false;
};

}  // namespace porofit::bands
