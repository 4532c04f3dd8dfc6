// Runs Eigen's matrix products single-threaded inside a scope. The Fock engine's matrices are
// small (tens to a few hundred levels): Eigen's OpenMP-parallel products then cost more in
// thread start-up and, on a loaded machine, in oversubscription than they gain (measured
// 75x slower on two busy cores). DESIGN.md section 4 asks for Eigen::setNbThreads(1) inside
// our own loops. The previous setting is restored on exit; scopes nest.
#pragma once

#include <Eigen/Core>

namespace macroreal::detail {

class SerialEigenScope {
 public:
  SerialEigenScope() : saved_(Eigen::nbThreads()) { Eigen::setNbThreads(1); }
  ~SerialEigenScope() { Eigen::setNbThreads(saved_); }
  SerialEigenScope(const SerialEigenScope&) = delete;
  SerialEigenScope& operator=(const SerialEigenScope&) = delete;

 private:
  int saved_;
};

}  // namespace macroreal::detail
