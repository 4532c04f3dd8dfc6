// The number of photon-count results an outcome table was read with
// (OutcomeTableRead::photon_count_results, stats/outcome_table_reader.hpp) counts the results of
// used rows only: a row that the skip policy rejects contributes nothing to the analysis, so its
// counts must not appear in the report's "N photon-count results read with threshold T" either.
// The expected tallies are counted by hand from the table below (common practice, no source).
#include <catch2/catch.hpp>

#include <string>

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

Protocol counted_protocol() {
  Protocol p;
  p.readout = Readout::destructive;
  p.detection.threshold = 3.0;  // a count <= 3 reads dark (DESIGN.md section 8)
  p.sequences = {seq("AB+", {"A", "B"}, {+1, +1}), seq("B", {"B"}, {+1})};
  return p;
}

}  // namespace

TEST_CASE("Photon-count tally: rows rejected in skip mode do not count", "[stats]") {
  OutcomeTableOptions o;
  o.bad_rows = BadRowPolicy::skip;
  const std::string table =
      "sequence,shot,time_s,r1,r2\n"
      "AB+,0,,1,2\n"       // used: two counts
      "AB+,1,,7,\n"        // used: one count (bright ends the shot)
      "AB+,2,,7,2\n"       // rejected after a count was read: a result after the shot ended
      "AB+,3,,0,x\n"       // rejected: malformed second result, after a valid first count
      "B,4,,2,5\n"         // rejected: a result beyond the last step, after a valid count
      "B,5,,dark,\n";      // used: no count
  const OutcomeTableRead r = parse_outcome_table(table, "t.csv", counted_protocol(), o);
  REQUIRE(r.counts.rows.used == 3);
  REQUIRE(r.counts.rows.rejected == 3);
  CHECK(r.photon_count_results == 3);
}

TEST_CASE("Photon-count tally: a table with only rejected count rows tallies none", "[stats]") {
  OutcomeTableOptions o;
  o.bad_rows = BadRowPolicy::skip;
  const std::string table =
      "sequence,shot,time_s,r1,r2\n"
      "AB+,0,,9,1\n"       // rejected: result after the shot ended
      "AB+,1,,dark,dark\n";  // used: no count
  const OutcomeTableRead r = parse_outcome_table(table, "t.csv", counted_protocol(), o);
  REQUIRE(r.counts.rows.used == 1);
  CHECK(r.photon_count_results == 0);
}
