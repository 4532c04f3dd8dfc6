// The outcome table reader's number parsers for time_s (stats/decimal_field.hpp) against
// std::from_chars (C++17 standard library, libstdc++: an implementation independent of
// ours, correctly rounded): the same accept / reject decision and bit for bit the same
// double for every field, over fixed edge cases and 3 x 10^5 random strings (fixed seed).
#include <charconv>
#include <cmath>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include <catch2/catch.hpp>

#include "stats/decimal_field.hpp"

using namespace macroreal;

namespace {

// The reference: what the time_s rule accepts (the whole field is a finite number).
bool reference(const std::string& text, double& value) {
  value = 0.0;
  const auto [ptr, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
  return ec == std::errc() && ptr == text.data() + text.size() && std::isfinite(value);
}

// Checks one field, placed as in the reader's buffers: digits and points before and after
// it (which the parsers read but must not use), 16 bytes on either side.
void check_field(const std::string& text) {
  const std::string around = "9.99999999.99999";  // 16 bytes
  const std::string buffer = around + text + around + around;
  const std::string_view f(buffer.data() + around.size(), text.size());
  INFO("field '" << text << "'");
  double want = 0.0;
  const bool ok = reference(text, want);

  detail::Decimal d;
  const bool got = detail::parse_time(f, d);
  REQUIRE(got == ok);
  if (ok) {
    const double x = d.exact();
    CHECK(x == want);
    CHECK(std::signbit(x) == std::signbit(want));
    // The documented ordering value: within 2^-52 relative of the value.
    CHECK(std::abs(d.approx - x) <= 0x1p-52 * std::abs(x));
  }

  detail::Decimal r;
  const bool fast = detail::parse_time_right_aligned(f, r);
#if defined(__SSE2__)
  // The one-pass parser takes exactly the short form that parse_time keeps as mantissa and
  // fraction digits, with the same result, and declines everything else.
  CHECK(fast == (ok && d.fraction >= 0));
#endif
  if (fast) {
    REQUIRE(ok);
    CHECK(r.mantissa == d.mantissa);
    CHECK(r.fraction == d.fraction);
    CHECK(r.negative == d.negative);
    CHECK(r.approx == d.approx);
    CHECK(r.exact() == want);
    CHECK(std::signbit(r.exact()) == std::signbit(want));
  }
}

std::string digits(std::mt19937_64& rng, int n) {
  std::string s;
  for (int i = 0; i < n; ++i) s += static_cast<char>('0' + rng() % 10);
  return s;
}

}  // namespace

TEST_CASE("Decimal fields: edge cases agree with std::from_chars", "[stats]") {
  const std::vector<std::string> cases = {
      "0", "-0", "0.", ".0", "-0.0", "-.5", "5.", ".5", "7", "00000000.00000001",
      "00000000", "0.00000000", "99999999.9999999", "9999999.99999999", "12345678.1234567",
      "1234567.12345678", "123456789.5", "0.123456789", "12345678.123456789",
      "999999999999999", "9999999999999999", "0.1", "0.2", "0.3", "2.675", "1.0000001",
      "24999.997500", "-24999.997500", "1e-3", "1.5E+10", "2e308", "1e400", "1e-400",
      "1.7976931348623157e308", "4.9e-324", "2.2250738585072014e-308", "0.1234567890123456789",
      "12345678901.5", "nan", "NaN", "-nan", "inf", "-inf", "infinity", "INF", "1e", "e5",
      "+1", "--1", "-", ".", "-.", "1..2", "1.2.3", "", " 1", "1 ", "0x10", "0x1p3", "1,5",
      "1-", "1e+", "1.e5", ".e5", "-1e-5"};
  for (const auto& c : cases) check_field(c);
}

TEST_CASE("Decimal fields: random strings agree with std::from_chars", "[stats]") {
  std::mt19937_64 rng(20261202);
  for (int i = 0; i < 100000; ++i) {
    // The short form and its neighbours: 0..9 digits on either side of an optional point.
    const int ni = static_cast<int>(rng() % 10), nf = static_cast<int>(rng() % 10);
    std::string s;
    if (rng() % 4 == 0) s += '-';
    s += digits(rng, ni);
    if (rng() % 5 != 0) {
      s += '.';
      s += digits(rng, nf);
    }
    check_field(s);
  }
  for (int i = 0; i < 100000; ++i) {
    // Many digits, leading zeros and exponents.
    std::string s;
    if (rng() % 3 == 0) s += '-';
    s.append(rng() % 4, '0');
    s += digits(rng, static_cast<int>(rng() % 25));
    s += '.';
    s += digits(rng, static_cast<int>(rng() % 25));
    if (rng() % 2 == 0) {
      s += rng() % 2 ? 'e' : 'E';
      if (rng() % 3 == 0) s += '-';
      s += std::to_string(rng() % 400);
    }
    check_field(s);
  }
  const std::string alphabet = "0123456789.-+eEinfaxp ";
  for (int i = 0; i < 100000; ++i) {
    // Arbitrary text over the characters of numbers (mostly malformed).
    std::string s;
    const int n = static_cast<int>(rng() % 19);
    for (int k = 0; k < n; ++k) s += alphabet[rng() % alphabet.size()];
    check_field(s);
  }
}
