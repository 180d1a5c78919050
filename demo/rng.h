#pragma once
// Rng: the simulator's only source of randomness. xoshiro256** (Blackman &
// Vigna 2018) seeded through splitmix64, with the distributions implemented
// here rather than taken from <random>, whose distributions are not specified
// bit for bit and differ between standard libraries. Same seed, same stream,
// on every machine. Streams for independent parts of a scenario are derived
// with Rng::derive(tag), so adding draws to one part never shifts another.
#include <array>
#include <cstdint>
#include <string_view>

namespace budledger::demo {

std::uint64_t splitmix64(std::uint64_t& state);

class Rng {
 public:
  explicit Rng(std::uint64_t seed);

  // A new generator whose stream depends only on this generator's seed and `tag`.
  Rng derive(std::string_view tag, std::uint64_t index = 0) const;

  std::uint64_t next();
  double uniform();                      // [0, 1), 53 random bits
  double uniform(double lo, double hi);  // [lo, hi)
  bool bernoulli(double p);
  int uniformInt(int lo, int hiInclusive);
  double normal();  // standard normal (Marsaglia polar method)
  double normal(double mean, double sd) { return mean + sd * normal(); }
  double exponential(double mean);           // mean > 0
  double gamma(double shape, double scale);  // Marsaglia & Tsang (2000)
  // Gamma with the given mean and coefficient of variation (cv = 0: the mean).
  double gammaMeanCv(double mean, double cv);
  int poisson(double mean);  // exact (inversion) below 30, normal approximation above

 private:
  std::uint64_t seed_;
  std::array<std::uint64_t, 4> s_{};
  bool haveSpare_ = false;
  double spare_ = 0.0;
};

// Fast standard-normal deviates for per-pixel noise: a 65,536-entry table of
// normal quantiles indexed by 16-bit slices of one 64-bit draw (four deviates
// per draw). Tails are cut at |z| ~ 4.3, which camera noise never reaches.
class NormalTable {
 public:
  NormalTable();
  float operator[](std::uint16_t i) const { return table_[i]; }

 private:
  std::array<float, 65536> table_{};
};
const NormalTable& normalTable();

// Inverse of the standard normal CDF (Acklam's rational approximation), p in (0, 1).
double normalQuantile(double p);

}  // namespace budledger::demo
