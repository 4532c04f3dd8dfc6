// Outcome table (CSV) and counts JSON reading: the format of DESIGN.md section 8, every
// validation rule with its file:line:column message, the skip policy's bookkeeping,
// photon-count thresholds, non-destructive tables and streaming of large files.
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#if defined(__linux__)
#include <sys/resource.h>
#include <unistd.h>
#endif

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

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

const std::string kHeader = "sequence,shot,time_s,r1,r2,r3\n";

OutcomeTableRead parse(const std::string& body, const OutcomeTableOptions& o = {}) {
  return parse_outcome_table(kHeader + body, "t.csv", destructive_protocol(), o);
}

std::string temp_path(const std::string& stem) {
#if defined(__linux__)
  const std::string id = std::to_string(::getpid());
#else
  const std::string id = "0";
#endif
  return (std::filesystem::temp_directory_path() / (stem + "-" + id + ".csv")).string();
}

}  // namespace

TEST_CASE("Outcome table: a valid destructive table is counted per cell", "[stats]") {
  // Format of DESIGN.md section 8 (our own); expected counts by construction of the text.
  const std::string text =
      "# invented demo table\n"
      "sequence,shot,time_s,r1,r2,r3,operator\r\n"
      "AB+,0,0.000,dark,bright,,x\r\n"
      "AB+,1,0.004,bright,,,y\n"
      "\n"
      "# a comment between rows\n"
      "AB+,2,0.008,dark,dark,,\n"
      "AB-,0,0.010,dark,,,\n"          // incomplete on purpose: dark at step 1 goes on
      "AB-,1,0.020,bright,,,\n"
      "B,0,0.5,bright,,\n"
      "ABC,7,1.5,dark,dark,bright\n"
      "ABC,8,1.25,dark,bright";          // no final newline
  // The valid variant completes that row.
  std::string valid = text;
  valid.replace(valid.find("AB-,0,0.010,dark,,,"), 19, "AB-,0,0.010,dark,dark,");
  const auto r = parse_outcome_table(valid, "t.csv", destructive_protocol());
  // AB+: dark = + at both steps.
  CHECK(cell(r, "AB+", {+1, -1}) == 1);
  CHECK(cell(r, "AB+", {-1}) == 1);
  CHECK(cell(r, "AB+", {+1, +1}) == 1);
  // AB-: dark = - at A, + at B; bright at A is +.
  CHECK(cell(r, "AB-", {-1, +1}) == 1);
  CHECK(cell(r, "AB-", {+1}) == 1);
  CHECK(cell(r, "B", {-1}) == 1);
  // ABC: dark_is + - +; dark,dark,bright = + - -; dark,bright = + +.
  CHECK(cell(r, "ABC", {+1, -1, -1}) == 1);
  CHECK(cell(r, "ABC", {+1, +1}) == 1);
  CHECK(r.counts.rows.read == 8);
  CHECK(r.counts.rows.used == 8);
  CHECK(r.counts.rows.rejected == 0);
  const auto& tr = r.time_ranges[3];  // ABC
  CHECK(tr.any);
  CHECK(tr.first == 1.25);
  CHECK(tr.last == 1.5);
  CHECK(r.time_ranges[0].first == 0.0);
  CHECK(r.time_ranges[0].last == 0.008);

  // The unedited text has AB- shot 0 (line 8) stopping after a dark first step.
  CHECK_THROWS_WITH(parse_outcome_table(text, "t.csv", destructive_protocol()),
                    Catch::Contains("t.csv: line 8, column 5 (r2)") &&
                        Catch::Contains("must have gone on"));
}

TEST_CASE("Outcome table: every validation rule names file, line and column", "[stats]") {
  // Rules of DESIGN.md section 8; messages are ours.
  CHECK_THROWS_WITH(parse("AB+,0,0,dark,dark,\nXY,1,0,dark,,\n"),
                    Catch::Contains("t.csv: line 3, column 1 (sequence)") &&
                        Catch::Contains("'XY' is not in the protocol"));
  CHECK_THROWS_WITH(parse("AB+,0,0,bright,dark,\n"),
                    Catch::Contains("t.csv: line 2, column 5 (r2)") &&
                        Catch::Contains("ended with bright at step 1"));
  CHECK_THROWS_WITH(parse("ABC,0,0,dark,bright,dark\n"),
                    Catch::Contains("t.csv: line 2, column 6 (r3)") &&
                        Catch::Contains("ended with bright at step 2"));
  CHECK_THROWS_WITH(parse("AB+,0,0,dark,,\n"),
                    Catch::Contains("t.csv: line 2, column 5 (r2)") &&
                        Catch::Contains("no result at step 2"));
  CHECK_THROWS_WITH(parse("AB+,0,0,drak,,\n"),
                    Catch::Contains("t.csv: line 2, column 4 (r1)") &&
                        Catch::Contains("'drak' is neither dark, bright"));
  CHECK_THROWS_WITH(parse("AB+,0,0,-3,,\n"), Catch::Contains("line 2, column 4 (r1)"));
  CHECK_THROWS_WITH(parse("AB+,0,0,dark,12x,\n"), Catch::Contains("line 2, column 5 (r2)"));
  CHECK_THROWS_WITH(parse("AB+,5,0,dark,dark,\nAB-,5,0,bright,,\nAB+,5,0,bright,,\n"),
                    Catch::Contains("t.csv: line 4, column 2 (shot)") &&
                        Catch::Contains("shot 5 of sequence 'AB+' appears a second time"));
  CHECK_THROWS_WITH(parse("AB+,x1,0,dark,dark,\n"), Catch::Contains("line 2, column 2 (shot)"));
  CHECK_THROWS_WITH(parse("AB+,1,abc,dark,dark,\n"),
                    Catch::Contains("t.csv: line 2, column 3 (time_s)") &&
                        Catch::Contains("'abc' is not a finite number"));
  CHECK_THROWS_WITH(parse("AB+,1,0.1s,dark,dark,\n"), Catch::Contains("column 3 (time_s)"));
  CHECK_THROWS_WITH(parse("AB+,1,0,dark,dark,,extra\n"),
                    Catch::Contains("t.csv: line 2") && Catch::Contains("more fields"));
  CHECK_THROWS_WITH(parse("B,1,0,dark,dark,\n"),
                    Catch::Contains("t.csv: line 2, column 5 (r2)") &&
                        Catch::Contains("has 1 steps"));
  // A photon count with no threshold anywhere is an error of the set-up, whatever the policy.
  OutcomeTableOptions skip;
  skip.bad_rows = BadRowPolicy::skip;
  CHECK_THROWS_WITH(parse("AB+,1,0,3,0,\n", skip),
                    Catch::Contains("line 2, column 4 (r1)") && Catch::Contains("no threshold"));
  // Header rules.
  const auto p = destructive_protocol();
  CHECK_THROWS_WITH(parse_outcome_table("shot,r1\n", "h.csv", p),
                    Catch::Contains("h.csv: line 1") && Catch::Contains("no 'sequence' column"));
  CHECK_THROWS_WITH(parse_outcome_table("# only a comment\nsequence,r2\n", "h.csv", p),
                    Catch::Contains("h.csv: line 2") && Catch::Contains("no r1"));
  CHECK_THROWS_WITH(parse_outcome_table("sequence,r1,r1\n", "h.csv", p),
                    Catch::Contains("column 3 (r1)") && Catch::Contains("repeated"));
  CHECK_THROWS_WITH(parse_outcome_table("# nothing\n", "h.csv", p), Catch::Contains("no header"));
  CHECK_THROWS_WITH(read_outcome_table("/nonexistent/dir/x.csv", p),
                    Catch::Contains("/nonexistent/dir/x.csv") && Catch::Contains("cannot open"));
}

TEST_CASE("Outcome table: photon counts are read with the threshold", "[stats]") {
  // Rule of DESIGN.md section 8: a count <= threshold reads dark.
  auto p = destructive_protocol();
  p.detection.threshold = 3.0;
  const std::string text = kHeader + "AB+,0,,3,4,\nAB+,1,,0,0,\nAB+,2,,4,,\n";
  const auto r = parse_outcome_table(text, "t.csv", p);
  CHECK(cell(r, "AB+", {+1, -1}) == 1);
  CHECK(cell(r, "AB+", {+1, +1}) == 1);
  CHECK(cell(r, "AB+", {-1}) == 1);
  OutcomeTableOptions o;
  o.threshold = 10.0;  // the option overrides the protocol
  const auto r2 = parse_outcome_table(kHeader + "AB+,0,,3,4,\nAB+,1,,0,11,\n", "t.csv", p, o);
  CHECK(cell(r2, "AB+", {+1, +1}) == 1);
  CHECK(cell(r2, "AB+", {+1, -1}) == 1);
}

TEST_CASE("Outcome table: the skip policy counts every rejected row by reason", "[stats]") {
  OutcomeTableOptions o;
  o.bad_rows = BadRowPolicy::skip;
  const auto r = parse(
      "AB+,0,0,dark,dark,\n"      // used
      "XY,1,0,dark,,\n"           // unknown sequence
      "AB+,1,0,bright,dark,\n"    // result after end
      "AB+,2,0,dark,,\n"          // missing result
      "AB+,3,0,drak,,\n"          // malformed result
      "AB+,0,0,bright,,\n"        // duplicated shot (0 was used above)
      "AB+,4,x,bright,,\n"        // malformed time
      "AB+,5,0,bright,,,,\n"      // too many fields
      "AB+,-1,0,bright,,\n"       // malformed shot
      "AB+,2,0,bright,,\n"        // used: shot 2 was rejected above, so it is not a repeat
      "B,9,0,dark,dark,\n",       // result beyond the last step
      o);
  const auto& rows = r.counts.rows;
  CHECK(rows.read == 11);
  CHECK(rows.used == 2);
  CHECK(rows.rejected == 9);
  CHECK(rows.read == rows.used + rows.rejected);
  CHECK(rows.reasons.at(row_reason::kUnknownSequence) == 1);
  CHECK(rows.reasons.at(row_reason::kResultAfterEnd) == 1);
  CHECK(rows.reasons.at(row_reason::kMissingResult) == 1);
  CHECK(rows.reasons.at(row_reason::kMalformedResult) == 1);
  CHECK(rows.reasons.at(row_reason::kDuplicatedShot) == 1);
  CHECK(rows.reasons.at(row_reason::kMalformedTime) == 1);
  CHECK(rows.reasons.at(row_reason::kTooManyFields) == 1);
  CHECK(rows.reasons.at(row_reason::kMalformedShot) == 1);
  CHECK(rows.reasons.at(row_reason::kResultBeyondSteps) == 1);
  CHECK(cell(r, "AB+", {+1, +1}) == 1);
  CHECK(cell(r, "AB+", {-1}) == 1);
  CHECK(r.counts.find("AB+")->total() == 2);
}

TEST_CASE("Outcome table: non-destructive readout runs every step", "[stats]") {
  Protocol p;
  p.readout = Readout::nondestructive;
  p.sequences = {seq("AB", {"A", "B"}, {+1, -1})};
  const std::string h = "sequence,r1,r2\n";
  const auto r = parse_outcome_table(h + "AB,bright,dark\nAB,bright,bright\nAB,dark,dark\n", "n.csv", p);
  // dark_is + - : bright at A is -, dark at B is -.
  CHECK(cell(r, "AB", {-1, -1}) == 1);
  CHECK(cell(r, "AB", {-1, +1}) == 1);
  CHECK(cell(r, "AB", {+1, -1}) == 1);
  CHECK(r.counts.sequences[0].cells.size() == 4);
  CHECK_THROWS_WITH(parse_outcome_table(h + "AB,bright,\n", "n.csv", p),
                    Catch::Contains("n.csv: line 2, column 3 (r2)") && Catch::Contains("runs every step"));
  // A short row has its missing trailing fields empty.
  CHECK_THROWS_WITH(parse_outcome_table(h + "AB,dark\n", "n.csv", p),
                    Catch::Contains("line 2, column 3 (r2)"));
}

TEST_CASE("Counts JSON: aggregated counts with the same validation", "[stats]") {
  const auto p = destructive_protocol();
  // Example of DESIGN.md section 8.
  const auto doc = nlohmann::json::parse(R"({"format": "macroreal-counts/1",
      "counts": {"AB+": {"dark,dark": 412, "dark,bright": 388, "bright": 200},
                 "B": {"dark": 7, "bright": 3}}})");
  const auto r = parse_counts_json(doc, "c.json", p);
  CHECK(cell(r, "AB+", {+1, +1}) == 412);
  CHECK(cell(r, "AB+", {+1, -1}) == 388);
  CHECK(cell(r, "AB+", {-1}) == 200);
  CHECK(cell(r, "B", {+1}) == 7);
  CHECK(r.counts.rows.read == 1010);
  CHECK(r.counts.rows.used == 1010);

  auto bad = [&](const std::string& counts) {
    return nlohmann::json::parse(R"({"format": "macroreal-counts/1", "counts": )" + counts + "}");
  };
  CHECK_THROWS_WITH(parse_counts_json(bad(R"({"AB+": {"bright,dark": 3}})"), "c.json", p),
                    Catch::Contains("c.json: counts.AB+.bright,dark") && Catch::Contains("ended with bright"));
  CHECK_THROWS_WITH(parse_counts_json(bad(R"({"AB+": {"dark": 3}})"), "c.json", p),
                    Catch::Contains("counts.AB+.dark") && Catch::Contains("must have gone on"));
  CHECK_THROWS_WITH(parse_counts_json(bad(R"({"XY": {"dark": 3}})"), "c.json", p),
                    Catch::Contains("counts.XY.dark") && Catch::Contains("not in the protocol"));
  CHECK_THROWS_WITH(parse_counts_json(bad(R"({"AB+": {"dark,drak": 3}})"), "c.json", p),
                    Catch::Contains("neither dark nor bright"));
  CHECK_THROWS_WITH(parse_counts_json(bad(R"({"AB+": {"bright": -3}})"), "c.json", p),
                    Catch::Contains("counts.AB+.bright") && Catch::Contains("non-negative integer"));
  CHECK_THROWS_WITH(parse_counts_json(bad(R"({"AB+": {"bright": 2.5}})"), "c.json", p),
                    Catch::Contains("non-negative integer"));
  CHECK_THROWS_WITH(parse_counts_json(nlohmann::json::parse(R"({"counts": {}})"), "c.json", p),
                    Catch::Contains("c.json: format"));

  OutcomeTableOptions o;
  o.bad_rows = BadRowPolicy::skip;
  const auto s = parse_counts_json(
      bad(R"({"AB+": {"dark,dark": 10, "bright,dark": 3, "dark": 4}, "XY": {"dark": 5}})"), "c.json", p, o);
  CHECK(s.counts.rows.used == 10);
  CHECK(s.counts.rows.rejected == 12);
  CHECK(s.counts.rows.read == 22);
  CHECK(s.counts.rows.reasons.at(row_reason::kResultAfterEnd) == 3);
  CHECK(s.counts.rows.reasons.at(row_reason::kMissingResult) == 4);
  CHECK(s.counts.rows.reasons.at(row_reason::kUnknownSequence) == 5);
}

TEST_CASE("Outcome table: a 10^6-row file streams in bounded memory", "[stats]") {
  // Generated deterministically: row i belongs to AB+ (i even) or AB- (i odd) and its cell
  // is chosen by i / 2 mod 3, so every count is known by construction.
  const std::string path = temp_path("macroreal-stream-test");
  const long rows = 1000000;
  double expected[2][3] = {{0, 0, 0}, {0, 0, 0}};
  {
    std::FILE* f = std::fopen(path.c_str(), "wb");
    REQUIRE(f != nullptr);
    std::fputs("# generated by the stats tests\nsequence,shot,time_s,r1,r2\n", f);
    const char* results[3] = {"dark,dark", "dark,bright", "bright,"};
    for (long i = 0; i < rows; ++i) {
      const int s = static_cast<int>(i % 2), c = static_cast<int>((i / 2) % 3);
      std::fprintf(f, "%s,%ld,%.6f,%s\n", s == 0 ? "AB+" : "AB-", i / 2, 1e-3 * static_cast<double>(i),
                   results[c]);
      expected[s][c] += 1;
    }
    std::fclose(f);
  }
#if defined(__linux__)
  rusage before{};
  getrusage(RUSAGE_SELF, &before);
#endif
  const auto p = destructive_protocol();
  for (std::size_t block : {std::size_t{1} << 20, std::size_t{4096}}) {
    OutcomeTableOptions o;
    o.block_bytes = block;  // 4096 makes many lines cross block boundaries
    const auto r = read_outcome_table(path, p, o);
    CHECK(r.counts.rows.read == rows);
    CHECK(r.counts.rows.used == rows);
    // Cells in layout order: [d d+], [d d-], [bright first].
    for (int s = 0; s < 2; ++s)
      for (int c = 0; c < 3; ++c)
        CHECK(r.counts.sequences[static_cast<std::size_t>(s)].counts[static_cast<std::size_t>(c)] == expected[s][c]);
    CHECK(r.time_ranges[0].first == 0.0);
    CHECK(r.time_ranges[1].last == 1e-3 * (rows - 1));
  }
#if defined(__linux__)
  rusage after{};
  getrusage(RUSAGE_SELF, &after);
  // The file is about 33 MB; holding it would raise the peak resident size by that much.
  // Streaming keeps a 1 MiB block and 2 x 62.5 kB of shot bits (common practice, no source).
  CHECK(after.ru_maxrss - before.ru_maxrss < 12 * 1024);  // kB
#endif
  std::remove(path.c_str());
}

TEST_CASE("Outcome table: long lines and lines longer than a read block", "[stats]") {
  // Lines over 64 bytes take the byte-by-byte split; a 10 000-byte line exceeds the 4096-byte
  // block and makes the reader grow its buffer. Expected counts by construction.
  const std::string note(10000, 'x');
  const std::string text = "sequence,shot,time_s,r1,r2,note\n"
                           "AB+,0,0.5,dark,dark," + std::string(100, 'y') + "\n"
                           "AB+,1,0.75,dark,bright," + note + "\n"
                           "AB+,2,1.0,bright,," + note + ",extra\n";
  const auto p = destructive_protocol();
  CHECK_THROWS_WITH(parse_outcome_table(text, "l.csv", p),
                    Catch::Contains("l.csv: line 4") && Catch::Contains("more fields"));
  const std::string good = text.substr(0, text.rfind(",extra")) + "\n";
  const std::string path = temp_path("macroreal-long-lines");
  {
    std::ofstream out(path, std::ios::binary);
    out << good;
  }
  OutcomeTableOptions o;
  o.block_bytes = 4096;
  const auto r = read_outcome_table(path, p, o);
  std::remove(path.c_str());
  CHECK(r.counts.rows.used == 3);
  CHECK(cell(r, "AB+", {+1, +1}) == 1);
  CHECK(cell(r, "AB+", {+1, -1}) == 1);
  CHECK(cell(r, "AB+", {-1}) == 1);
  CHECK(r.time_ranges[0].last == 1.0);
  const auto r2 = parse_outcome_table(good, "l.csv", p);
  CHECK(r2.counts.rows.used == 3);
}

TEST_CASE("Outcome table: time_s values equal the C library's strtod of the text", "[stats]") {
  // Reference: std::strtod (C standard library), an implementation independent of ours.
  const std::vector<std::string> times = {".5", "5.", "1e-3", "-2.5", "0.1234567890123456789",
                                          "12345678901.5", "0.000001", "99999999.9999999",
                                          "7", "3.14159265358979", "-0.0000000001"};
  for (const auto& t : times) {
    const std::string text = kHeader + "B,0," + t + ",dark\n";
    const auto r = parse_outcome_table(text, "t.csv", destructive_protocol());
    INFO("time_s = " << t);
    const auto& tr = r.time_ranges[2];  // B
    REQUIRE(tr.any);
    CHECK(tr.first == std::strtod(t.c_str(), nullptr));
    CHECK(tr.last == tr.first);
  }
  // Several rows: the range is the smallest and the largest value.
  const auto r = parse_outcome_table(kHeader + "B,0,2.5,dark\nB,1,-1e2,dark\nB,2,0.75,bright\nB,3,300.125,dark\n",
                                     "t.csv", destructive_protocol());
  CHECK(r.time_ranges[2].first == -100.0);
  CHECK(r.time_ranges[2].last == 300.125);
  for (const std::string bad : {".", "-", "1.2.3", "--1", "1e", "nan", "inf", "0x10", "+1"})
    CHECK_THROWS_WITH(parse_outcome_table(kHeader + "B,0," + bad + ",dark\n", "t.csv", destructive_protocol()),
                      Catch::Contains("column 3 (time_s)"));
}

TEST_CASE("Outcome table: the fast path for the documented column order agrees with the general parser", "[stats]") {
  // The reader recognises plain rows of the header `sequence,shot,time_s,r1,...` by one hash
  // probe and hands every other row to the general parser. The same rows under a header
  // with an extra ignored column (which disables the fast path) must give the same counts,
  // rows read / used / rejected by reason and time ranges (an equivalence of two code paths:
  // common practice, no source). Rows: a fixed LCG mixes valid rows (words and photon
  // counts, short rows without trailing commas) with invalid ones of every kind. Invented.
  const char* names[5] = {"AB+", "AB-", "B", "ABC", "XY"};
  const char* tails[14] = {"dark,dark,", "dark,bright,", "bright,,", "bright", "dark,dark",
                           "dark,dark,dark", "dark,bright,bright", "bright,dark,", "7,2,",
                           "dark,,", ",dark,", "dark,bright,dark", "dork,dark,", "0,bright,"};
  std::string canonical = "sequence,shot,time_s,r1,r2,r3\n", other = "note,sequence,shot,time_s,r1,r2,r3\n";
  std::uint64_t x = 2024;
  for (int i = 0; i < 3000; ++i) {
    x = x * 6364136223846793005ull + 1442695040888963407ull;
    const int s = static_cast<int>((x >> 60) % 5), t = static_cast<int>((x >> 40) % 14);
    const long shot = static_cast<long>((x >> 20) % 1500);  // some duplicates
    std::string time = std::to_string(i) + "." + std::to_string((x >> 8) % 1000);
    if ((x >> 30) % 50 == 0) time = "1e-3x";  // malformed
    if ((x >> 30) % 50 == 1) time = "";
    const std::string row = std::string(names[s]) + "," + std::to_string(shot) + "," + time + "," + tails[t];
    canonical += row + "\n";
    other += "n" + std::to_string(i) + "," + row + "\n";
  }
  Protocol p = destructive_protocol();
  p.detection.threshold = 3.0;
  OutcomeTableOptions o;
  o.bad_rows = BadRowPolicy::skip;
  const auto a = parse_outcome_table(canonical, "fast.csv", p, o);
  const auto b = parse_outcome_table(other, "general.csv", p, o);
  CHECK(a.counts.rows.read == 3000);
  CHECK(a.counts.rows.read == b.counts.rows.read);
  CHECK(a.counts.rows.used == b.counts.rows.used);
  CHECK(a.counts.rows.rejected == b.counts.rows.rejected);
  CHECK(a.counts.rows.reasons == b.counts.rows.reasons);
  CHECK(a.counts.rows.used > 500);
  CHECK(a.counts.rows.reasons.size() >= 5);
  REQUIRE(a.counts.sequences.size() == b.counts.sequences.size());
  for (std::size_t s = 0; s < a.counts.sequences.size(); ++s) {
    CHECK(a.counts.sequences[s].counts == b.counts.sequences[s].counts);
    CHECK(a.time_ranges[s].any == b.time_ranges[s].any);
    CHECK(a.time_ranges[s].first == b.time_ranges[s].first);
    CHECK(a.time_ranges[s].last == b.time_ranges[s].last);
  }
  // Policy error: both stop at the same line and column.
  std::string ea, eb;
  try { parse_outcome_table(canonical, "t.csv", p); } catch (const InputError& e) { ea = e.what(); }
  try { parse_outcome_table(other, "t.csv", p); } catch (const InputError& e) { eb = e.what(); }
  REQUIRE(!ea.empty());
  CHECK(ea.substr(0, ea.find("column")) == eb.substr(0, eb.find("column")));
}
