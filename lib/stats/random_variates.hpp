// Portable random variates for the statistics core: the same seed gives the same bytes with
// any standard library, because only std::mt19937_64's raw 64-bit output (fixed by the C++
// standard) is used and every distribution is written here.
//   uniform01:  53-bit mantissa from one engine word, open interval (0, 1).
//   binomial:   inversion (sequential search from 0) when n*min(p,1-p) < 10, otherwise
//               BTRD, the transformed rejection with decomposition of Hormann, "The
//               generation of binomial random variates", J. Stat. Comput. Simul. 46:101
//               (1993). Both are exact (no normal approximation).
//   multinomial: sequential conditional binomials, cell j gets Bin(n_left, w_j / sum_{i>=j} w_i).
//   normal:     Box-Muller from two uniform01 draws (used only by simulation helpers).
// Values can still differ in the last bit across platforms whose libm log/exp/pow differ; on one
// platform the sequence is fixed by the seed.
#pragma once

#include <cstdint>
#include <random>
#include <span>

namespace macroreal {

using RandomEngine = std::mt19937_64;

// SplitMix64 finaliser: a well-mixed 64-bit seed for stream `index` of master seed `seed`, so
// that parallel work units get independent, thread-count-independent engines.
std::uint64_t derive_seed(std::uint64_t seed, std::uint64_t index);

inline double uniform01(RandomEngine& g) {
  return (static_cast<double>(g() >> 11) + 0.5) * 0x1.0p-53;
}

double standard_normal(RandomEngine& g);

// Exact Binomial(n, p) draw; n >= 0, p in [0, 1] (throws DomainError otherwise).
long binomial(RandomEngine& g, long n, double p);

// Multinomial(n, w / sum w) into `out` (same size as `weights`, weights >= 0, not all zero
// unless n == 0). Allocation-free.
void multinomial(RandomEngine& g, long n, std::span<const double> weights, std::span<double> out);

}  // namespace macroreal
