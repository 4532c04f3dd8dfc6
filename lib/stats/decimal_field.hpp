// Exact parsing of decimal numbers in outcome-table fields (time_s, shot): the internals of
// the outcome table reader (outcome_table_reader.cpp), in a header of their own so that
// tests can check them against std::from_chars directly.
//
// parse_time accepts what std::from_chars accepts for a double (plus the finiteness rule of
// time_s) and keeps the common short form `[-]digits[.digits]` (at most 15 digits, at most 8
// on either side of the point) as an integer mantissa and a count of fraction digits, so
// that the correctly rounded double is one division away. parse_time_right_aligned reads
// that short form with one 16-byte SSE2 pass over the field instead of two word passes;
// it accepts exactly the short form and gives the same Decimal, or declines (false) and
// leaves the field to parse_time.
#pragma once

#include <bit>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <string_view>

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

namespace macroreal::detail {

// A finite decimal number. Fast path: at most 15 digits with an optional point, kept as
// mantissa and fraction digits; `approx` = mantissa * 10^-fraction (within 2^-52 relative
// of the value) orders the rows, and exact() gives mantissa / 10^fraction, both exact
// doubles, so the quotient is correctly rounded (Clinger, PLDI 1990), the same double
// std::from_chars gives. The division is only done for the first and last time of each
// sequence. Anything else goes to std::from_chars and is exact at once (fraction = -1).
struct Decimal {
  double approx = 0.0;
  std::uint64_t mantissa = 0;
  int fraction = -1;
  bool negative = false;

  double exact() const {
    static constexpr double kPow10[16] = {1e0, 1e1, 1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                          1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
    if (fraction < 0) return approx;
    const double t = static_cast<double>(mantissa) / kPow10[fraction];
    return negative ? -t : t;
  }
};

// Up to 8 ASCII digits at p (n in 1..8) by word arithmetic; false if one is not a digit.
// Leading '0' bytes pad the word to 8 digits; the digit test and the combination are the
// well-known SWAR steps (e.g. Lemire, "Number parsing at a gigabyte per second", Softw.
// Pract. Exp. 51:1700 (2021)).
[[gnu::always_inline]] inline bool eight_digits(const char* p, std::size_t n, std::uint64_t& value) {
  // n in 1..8. Shifting the n digits to the top drops the bytes after them, so the word
  // needs no mask; the leading bytes are filled with '0' (no branch for n = 8).
  std::uint64_t w;
  std::memcpy(&w, p, 8);
  if constexpr (std::endian::native == std::endian::big) w = __builtin_bswap64(w);
  w = (w << (8 * (8 - n))) | ((0x3030303030303030ull >> (8 * n - 1)) >> 1);
  if (((w & 0xF0F0F0F0F0F0F0F0ull) | (((w + 0x0606060606060606ull) & 0xF0F0F0F0F0F0F0F0ull) >> 4)) !=
      0x3333333333333333ull)
    return false;
  w = (w & 0x0F0F0F0F0F0F0F0Full) * 2561 >> 8;
  w = (w & 0x00FF00FF00FF00FFull) * 6553601 >> 16;
  value = (w & 0x0000FFFF0000FFFFull) * 42949672960001ull >> 32;
  return true;
}

// `f` must have 16 readable bytes from its start and 8 after its end.
[[gnu::always_inline]] inline bool parse_time(std::string_view f, Decimal& d) {
  static constexpr double kInvPow10[16] = {1e0,  1e-1, 1e-2,  1e-3,  1e-4,  1e-5,  1e-6,  1e-7,
                                           1e-8, 1e-9, 1e-10, 1e-11, 1e-12, 1e-13, 1e-14, 1e-15};
  static constexpr std::uint64_t kPow10i[9] = {1,      10,      100,      1000,     10000,
                                               100000, 1000000, 10000000, 100000000};
  const char* p = f.data();
  std::size_t n = f.size();
  const bool negative = n > 0 && *p == '-';
  if (negative) {
    ++p;
    --n;
  }
  // Fast path: [int digits <= 8][.[fraction digits <= 8]], 1 to 15 digits in all.
  if (n > 0 && n <= 17) {
    // The '.' among the first n <= 17 bytes: one 16-byte compare (the padding after every
    // buffer makes the bytes after the field readable) instead of a memchr call per row.
    const char* dot = nullptr;
#if defined(__SSE2__)
    {
      const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p));
      std::uint32_t m = static_cast<std::uint32_t>(_mm_movemask_epi8(_mm_cmpeq_epi8(v, _mm_set1_epi8('.'))));
      if (n < 16) m &= (std::uint32_t{1} << n) - 1;
      if (m != 0) dot = p + __builtin_ctz(m);
      else if (n > 16 && p[16] == '.') dot = p + 16;
    }
#else
    dot = static_cast<const char*>(std::memchr(p, '.', n));
#endif
    const std::size_t ni = dot ? static_cast<std::size_t>(dot - p) : n;
    const std::size_t nf = dot ? n - ni - 1 : 0;
    std::uint64_t a = 0, b = 0;
    if (ni <= 8 && nf <= 8 && ni + nf >= 1 && ni + nf <= 15 && (ni == 0 || eight_digits(p, ni, a)) &&
        (nf == 0 || eight_digits(dot + 1, nf, b))) {
      const std::uint64_t m = a * kPow10i[nf] + b;
      const double approx = static_cast<double>(m) * kInvPow10[nf];
      d = {negative ? -approx : approx, m, static_cast<int>(nf), negative};
      return true;
    }
  }
  double t = 0.0;
  const auto [ptr, ec] = std::from_chars(f.data(), f.data() + f.size(), t);
  d = {t, 0, -1, false};
  return ec == std::errc() && ptr == f.data() + f.size() && std::isfinite(t);
}


// The short form of parse_time by one 16-byte pass: `f` must have 16 readable bytes
// ending at its end (f.data() + f.size() - 16 onwards) and 8 after it. Returns true with
// the Decimal parse_time's short form gives, or false (nothing decided: hand the field to
// parse_time) when the field is not of the short form.
// The field is loaded so that its last byte is byte 15; the point is deleted by shifting
// the bytes before it up by one, the bytes before the digits are zeroed, and the 16 digit
// values are combined in three multiply-add steps (10, 100, 10^4) into two 8-digit halves.
[[gnu::always_inline]] inline bool parse_time_right_aligned(std::string_view f, Decimal& d) {
#if defined(__SSE2__)
  static constexpr double kInvPow10[16] = {1e0,  1e-1, 1e-2,  1e-3,  1e-4,  1e-5,  1e-6,  1e-7,
                                           1e-8, 1e-9, 1e-10, 1e-11, 1e-12, 1e-13, 1e-14, 1e-15};
  std::size_t n = f.size();
  const bool negative = n > 0 && f[0] == '-';
  if (negative) --n;
  if (n == 0 || n > 16) return false;
  const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(f.data() + f.size() - 16));
  const std::uint32_t field = (0xFFFFu << (16 - n)) & 0xFFFFu;  // bytes 16 - n .. 15
  const __m128i digit = _mm_sub_epi8(v, _mm_set1_epi8('0'));
  const __m128i nine = _mm_set1_epi8(9);
  const std::uint32_t is_digit =
      static_cast<std::uint32_t>(_mm_movemask_epi8(_mm_cmpeq_epi8(_mm_max_epu8(digit, nine), nine)));
  const std::uint32_t is_point =
      static_cast<std::uint32_t>(_mm_movemask_epi8(_mm_cmpeq_epi8(v, _mm_set1_epi8('.')))) & field;
  if (((is_digit | is_point) & field) != field || (is_point & (is_point - 1)) != 0) return false;
  const int point = is_point != 0 ? std::countr_zero(is_point) : -1;  // byte of the point
  const std::size_t nf = is_point != 0 ? static_cast<std::size_t>(15 - point) : 0;
  const std::size_t ni = n - nf - (is_point != 0 ? 1 : 0);
  const std::size_t nd = ni + nf;
  if (ni > 8 || nf > 8 || nd < 1 || nd > 15) return false;
  const __m128i index = _mm_setr_epi8(0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15);
  // Bytes after the point keep their place; the bytes before it move up by one.
  const __m128i after = _mm_cmpgt_epi8(index, _mm_set1_epi8(static_cast<char>(point)));
  __m128i digits = _mm_or_si128(_mm_and_si128(after, digit), _mm_andnot_si128(after, _mm_slli_si128(digit, 1)));
  // The nd digits now fill bytes 16 - nd .. 15; zero the rest.
  digits = _mm_and_si128(digits, _mm_cmpgt_epi8(index, _mm_set1_epi8(static_cast<char>(15 - nd))));
  const __m128i zero = _mm_setzero_si128();
  const __m128i by10 = _mm_set_epi16(1, 10, 1, 10, 1, 10, 1, 10);
  const __m128i pairs = _mm_packs_epi32(_mm_madd_epi16(_mm_unpacklo_epi8(digits, zero), by10),
                                        _mm_madd_epi16(_mm_unpackhi_epi8(digits, zero), by10));
  const __m128i quads = _mm_madd_epi16(pairs, _mm_set_epi16(1, 100, 1, 100, 1, 100, 1, 100));
  const __m128i eights = _mm_madd_epi16(_mm_packs_epi32(quads, quads),
                                        _mm_set_epi16(1, 10000, 1, 10000, 1, 10000, 1, 10000));
  const auto high = static_cast<std::uint64_t>(static_cast<std::uint32_t>(_mm_cvtsi128_si32(eights)));
  const auto low = static_cast<std::uint64_t>(static_cast<std::uint32_t>(_mm_cvtsi128_si32(_mm_srli_si128(eights, 4))));
  const std::uint64_t m = high * 100000000u + low;
  const double approx = static_cast<double>(m) * kInvPow10[nf];
  d = {negative ? -approx : approx, m, static_cast<int>(nf), negative};
  return true;
#else
  (void)f;
  (void)d;
  return false;
#endif
}

}  // namespace macroreal::detail
