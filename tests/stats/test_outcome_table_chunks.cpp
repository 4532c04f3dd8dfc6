// The outcome table reader's chunked read (OutcomeTableOptions::threads > 1): a regular file
// is cut into chunks at line starts, tallied by two threads and merged in file order. These
// tests put chunk boundaries inside rows (chunks of 64 bytes up), bad rows and duplicated
// shots in later chunks, and check the counts against hand-counted tables and against the
// one-thread stream, and error messages for the first bad line with its line number.
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <string>
#include <vector>

#if defined(__linux__)
#include <unistd.h>
#endif

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "stats/outcome_table_reader.hpp"

using namespace macroreal;

namespace {

SequenceSpec seq(std::string name, std::vector<std::string> steps, std::vector<int> dark_is) {
  SequenceSpec s;
  s.name = std::move(name);
  s.steps = std::move(steps);
  s.dark_is = std::move(dark_is);
  return s;
}

Protocol destructive_protocol() {
  Protocol p;
  p.readout = Readout::destructive;
  p.sequences = {seq("AB+", {"A", "B"}, {+1, +1}), seq("AB-", {"A", "B"}, {-1, +1}),
                 seq("B", {"B"}, {+1}), seq("ABC", {"A", "B", "C"}, {+1, -1, +1})};
  return p;
}

double cell(const OutcomeTableRead& r, const std::string& seq_name, const OutcomeString& o) {
  const auto* s = r.counts.find(seq_name);
  REQUIRE(s != nullptr);
  const int j = s->cell_index(o);
  REQUIRE(j >= 0);
  return s->counts[static_cast<std::size_t>(j)];
}

// A file in the temporary directory, removed at the end of the test.
struct TempTable {
  std::string path;
  TempTable(const std::string& stem, const std::string& text) {
#if defined(__linux__)
    const std::string id = std::to_string(::getpid());
#else
    const std::string id = "0";
#endif
    path = (std::filesystem::temp_directory_path() / (stem + "-" + id + ".csv")).string();
    std::ofstream out(path, std::ios::binary);
    out << text;
  }
  ~TempTable() { std::remove(path.c_str()); }
};

OutcomeTableOptions options(int threads, std::size_t block, BadRowPolicy policy) {
  OutcomeTableOptions o;
  o.threads = threads;
  o.block_bytes = block;
  o.bad_rows = policy;
  return o;
}

std::string error_of(const std::string& path, const Protocol& p, const OutcomeTableOptions& o) {
  try {
    read_outcome_table(path, p, o);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

// Everything the reader returns, compared field by field.
void check_same(const OutcomeTableRead& a, const OutcomeTableRead& b) {
  CHECK(a.counts.rows.read == b.counts.rows.read);
  CHECK(a.counts.rows.used == b.counts.rows.used);
  CHECK(a.counts.rows.rejected == b.counts.rows.rejected);
  CHECK(a.counts.rows.reasons == b.counts.rows.reasons);
  CHECK(a.photon_count_results == b.photon_count_results);
  REQUIRE(a.counts.sequences.size() == b.counts.sequences.size());
  for (std::size_t s = 0; s < a.counts.sequences.size(); ++s) {
    CHECK(a.counts.sequences[s].counts == b.counts.sequences[s].counts);
    CHECK(a.time_ranges[s].any == b.time_ranges[s].any);
    CHECK(a.time_ranges[s].first == b.time_ranges[s].first);
    CHECK(a.time_ranges[s].last == b.time_ranges[s].last);
  }
}

// A hand-counted table (invented): what each row is, is written beside it.
const std::string kSmallTable =
    "sequence,shot,time_s,r1,r2,r3\n"  // line 1
    "# invented rows for the chunk tests\n"
    "AB+,0,0.5,dark,dark,\n"      // 3: used, AB+ (+,+)
    "AB+,1,0.25,dark,bright,\n"   // 4: used, AB+ (+,-)
    "AB+,2,2.0,bright,,\n"        // 5: used, AB+ (-)
    "B,0,1.5,dark,,\n"            // 6: used, B (+)
    "XY,0,1.0,dark,,\n"           // 7: unknown sequence
    "AB+,1,3.0,dark,dark,\n"      // 8: duplicated shot (line 4)
    "AB+,3,0.75,bright,dark,\n"   // 9: result after shot ended
    "AB+,4,0.8,dark,,\n"          // 10: missing result
    "B,1,x,dark,,\n"              // 11: malformed time_s
    "B,2x,1.0,dark,,\n"           // 12: malformed shot
    "B,3,1.0,dork,,\n"            // 13: malformed result
    "B,4,0.125,bright,,\n"        // 14: used, B (-)
    "AB+,5,4.0,dark,dark,\n"      // 15: used, AB+ (+,+)
    "B,0,5.0,bright,,\n"          // 16: duplicated shot (line 6)
    "B,5,,dark,dark,\n"           // 17: result beyond the last step
    "\n"                          // 18: blank
    "AB+,,,dark,bright\n";        // 19: used, AB+ (+,-) (no shot, no time, short row)

}  // namespace

TEST_CASE("Chunked read: a hand-counted table gives its counts for every chunk size", "[stats]") {
  // Expected values counted by hand from kSmallTable (common practice, no source).
  const TempTable t("macroreal-chunks-small", kSmallTable);
  const auto p = destructive_protocol();
  for (std::size_t block : {std::size_t{64}, std::size_t{65}, std::size_t{100}, std::size_t{150}}) {
    for (int threads : {1, 2}) {
      INFO("block " << block << ", threads " << threads);
      const auto r = read_outcome_table(t.path, p, options(threads, block, BadRowPolicy::skip));
      CHECK(r.counts.rows.read == 16);
      CHECK(r.counts.rows.used == 7);
      CHECK(r.counts.rows.rejected == 9);
      CHECK(r.counts.rows.reasons.at(row_reason::kUnknownSequence) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kDuplicatedShot) == 2);
      CHECK(r.counts.rows.reasons.at(row_reason::kResultAfterEnd) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kMissingResult) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kMalformedTime) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kMalformedShot) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kMalformedResult) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kResultBeyondSteps) == 1);
      CHECK(cell(r, "AB+", {+1, +1}) == 2);
      CHECK(cell(r, "AB+", {+1, -1}) == 2);
      CHECK(cell(r, "AB+", {-1}) == 1);
      CHECK(cell(r, "B", {+1}) == 1);
      CHECK(cell(r, "B", {-1}) == 1);
      CHECK(r.time_ranges[0].first == 0.25);
      CHECK(r.time_ranges[0].last == 4.0);
      CHECK(r.time_ranges[2].first == 0.125);
      CHECK(r.time_ranges[2].last == 1.5);
      // Policy error: the first bad line, line 7, in a later chunk for every block size.
      CHECK_THAT(error_of(t.path, p, options(threads, block, BadRowPolicy::error)),
                 Catch::Contains(t.path + ": line 7, column 1 (sequence)"));
    }
  }
}

TEST_CASE("Chunked read: a bad row or a duplicated shot in a later chunk is reported at its line", "[stats]") {
  // 3000 valid rows: row i (line i + 2) is AB+ (i even) or B (i odd) with shot i / 2, so
  // every line number is known by construction; `bad` replaces some rows. Chunks of 4096
  // bytes hold about 200 rows each. Invented.
  auto table = [](const std::map<long, std::string>& bad) {
    std::string s = "sequence,shot,time_s,r1,r2,r3\n";
    for (long i = 0; i < 3000; ++i) {
      if (bad.count(i)) {
        s += bad.at(i) + "\n";
        continue;
      }
      s += std::string(i % 2 == 0 ? "AB+" : "B") + "," + std::to_string(i / 2) + "," + std::to_string(i) +
           ".5," + (i % 3 == 0 ? "bright,," : i % 2 == 0 ? "dark,dark," : "dark,,") + "\n";
    }
    return s;
  };
  const auto p = destructive_protocol();
  SECTION("a result after the end of the shot at line 2502") {
    const TempTable t("macroreal-chunks-after-end", table({{2500, "AB+,1250,1.0,bright,dark,"}}));
    for (int threads : {1, 2})
      CHECK_THAT(error_of(t.path, p, options(threads, 4096, BadRowPolicy::error)),
                 Catch::Contains(t.path + ": line 2502, column 5 (r2)") &&
                     Catch::Contains("ended with bright at step 1"));
  }
  SECTION("the shot of line 12 (AB+ shot 5) repeated at line 2802") {
    const TempTable t("macroreal-chunks-dup", table({{2800, "AB+,5,9.0,dark,dark,"}}));
    for (int threads : {1, 2}) {
      CHECK_THAT(error_of(t.path, p, options(threads, 4096, BadRowPolicy::error)),
                 Catch::Contains(t.path + ": line 2802, column 2 (shot)") &&
                     Catch::Contains("shot 5 of sequence 'AB+' appears a second time"));
      const auto r = read_outcome_table(t.path, p, options(threads, 4096, BadRowPolicy::skip));
      CHECK(r.counts.rows.read == 3000);
      CHECK(r.counts.rows.used == 2999);
      CHECK(r.counts.rows.reasons.at(row_reason::kDuplicatedShot) == 1);
    }
  }
  SECTION("two bad rows in different chunks: the first one is reported") {
    const TempTable t("macroreal-chunks-two-bad",
                      table({{1201, "XY,600,1201.5,dark,,"}, {2900, "AB+,1450,1.0,dork,,"}}));
    for (int threads : {1, 2}) {
      CHECK_THAT(error_of(t.path, p, options(threads, 4096, BadRowPolicy::error)),
                 Catch::Contains(t.path + ": line 1203, column 1 (sequence)"));
      const auto r = read_outcome_table(t.path, p, options(threads, 4096, BadRowPolicy::skip));
      CHECK(r.counts.rows.used == 2998);
      CHECK(r.counts.rows.reasons.at(row_reason::kUnknownSequence) == 1);
      CHECK(r.counts.rows.reasons.at(row_reason::kMalformedResult) == 1);
    }
  }
  SECTION("a row rejected for its time does not take its shot: the same shot later is used") {
    // Row 100 (AB+ shot 50, line 102) has a malformed time; row 2600 gives AB+ shot 50 again.
    const TempTable t("macroreal-chunks-retake",
                      table({{100, "AB+,50,x,dark,dark,"}, {2600, "AB+,50,7.0,dark,dark,"}}));
    for (int threads : {1, 2}) {
      const auto r = read_outcome_table(t.path, p, options(threads, 4096, BadRowPolicy::skip));
      CHECK(r.counts.rows.read == 3000);
      CHECK(r.counts.rows.used == 2999);
      CHECK(r.counts.rows.reasons.at(row_reason::kMalformedTime) == 1);
      CHECK(r.counts.rows.reasons.count(row_reason::kDuplicatedShot) == 0);
      CHECK_THAT(error_of(t.path, p, options(threads, 4096, BadRowPolicy::error)),
                 Catch::Contains(t.path + ": line 102, column 3 (time_s)"));
    }
  }
}

TEST_CASE("Chunked read: two threads give the one-thread stream's results on a table with bad rows", "[stats]") {
  // An equivalence of two code paths (common practice, no source): a fixed LCG mixes valid
  // rows (words and photon counts, short rows, CRLF line ends, comments) with invalid ones of
  // every kind and duplicated shots. Invented.
  const char* names[5] = {"AB+", "AB-", "B", "ABC", "XY"};
  const char* tails[14] = {"dark,dark,", "dark,bright,", "bright,,", "bright", "dark,dark",
                           "dark,dark,dark", "dark,bright,bright", "bright,dark,", "7,2,",
                           "dark,,", ",dark,", "dark,bright,dark", "dork,dark,", "0,bright,"};
  std::string text = "sequence,shot,time_s,r1,r2,r3\n";
  std::uint64_t x = 77;
  for (int i = 0; i < 20000; ++i) {
    x = x * 6364136223846793005ull + 1442695040888963407ull;
    const int s = static_cast<int>((x >> 60) % 5);
    // Mostly valid rows (long plain stretches for the threads), some bad ones.
    const int t = (x >> 36) % 20 == 0 ? static_cast<int>((x >> 40) % 14) : static_cast<int>((x >> 40) % 3);
    const long shot = static_cast<long>((x >> 20) % 40000);  // some duplicates
    std::string time = std::to_string(i % 7000) + "." + std::to_string((x >> 8) % 1000);
    if ((x >> 30) % 500 == 0) time = "1e-3x";
    if ((x >> 30) % 500 == 1) time = "";
    text += std::string(names[(x >> 36) % 20 == 1 ? s : s % 3]) + "," + std::to_string(shot) + "," + time + "," + tails[t];
    text += (x >> 50) % 1000 == 0 ? "\r\n" : "\n";
    if ((x >> 52) % 2000 == 0) text += "# a comment\n";
  }
  const TempTable t("macroreal-chunks-mixed", text);
  Protocol p = destructive_protocol();
  p.detection.threshold = 3.0;
  const auto one = read_outcome_table(t.path, p, options(1, 4096, BadRowPolicy::skip));
  CHECK(one.counts.rows.read == 20000);
  CHECK(one.counts.rows.reasons.size() >= 5);
  CHECK(one.counts.rows.reasons.at(row_reason::kDuplicatedShot) > 0);
  CHECK(one.photon_count_results > 0);
  // In memory: the same parser over the same text.
  check_same(one, parse_outcome_table(text, t.path, p, options(1, 4096, BadRowPolicy::skip)));
  const std::string first_error = error_of(t.path, p, options(1, 4096, BadRowPolicy::error));
  REQUIRE(!first_error.empty());
  for (std::size_t block : {std::size_t{64}, std::size_t{1000}, std::size_t{4096}, std::size_t{65536}}) {
    INFO("block " << block);
    check_same(one, read_outcome_table(t.path, p, options(2, block, BadRowPolicy::skip)));
    CHECK(error_of(t.path, p, options(2, block, BadRowPolicy::error)) == first_error);
  }
}
