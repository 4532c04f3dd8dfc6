// model_cells: the model in the statistics core's cell layout.
#include <catch2/catch.hpp>

#include <cmath>

#include "design/model_cells.hpp"
#include "protocol/protocol_reader.hpp"
#include "stats/linear_functional.hpp"
#include "support/compare.hpp"

using namespace macroreal;

TEST_CASE("model cells reproduce the predicted K through the statistics core's functional",
          "[design]") {
  const Protocol protocol =
      read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  const ModelCells cells = model_cells(protocol);
  REQUIRE(cells.probabilities.size() == cells.layout.sequences.size());
  for (const auto& p : cells.probabilities) {
    double total = 0.0;
    for (double x : p) total += x;
    CHECK_CLOSE(total, 1.0, 1e-12, 0.0);
  }
  // The non-pooled functional of the statistics core evaluated at the model's cells must give
  // the engine's K: two independent routes (linear_functional's coefficients from the cell
  // layout vs the engine's correlators) to DESIGN.md section 2's K_3 = C_12 + C_23 - C_13.
  for (const auto& t : cells.prediction.tests) {
    if (!t.lg) continue;
    const LinearFunctional k = lg_functional(cells.layout, t.spec.order);
    CHECK_CLOSE(k.value_at(cells.probabilities), t.lg->K, 1e-12, 0.0);
  }
}
