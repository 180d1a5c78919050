#pragma once
// Dense symmetric positive-definite solves for the few-by-few matrices of
// score tests and Newton steps (groups − 1, covariates): Cholesky in long
// double. Not a general linear-algebra library.
#include <cstddef>
#include <optional>
#include <vector>

namespace budledger::stats::detail {

using Real = long double;

// Row-major p×p matrix.
struct SymMatrix {
  std::size_t p = 0;
  std::vector<Real> a;
  explicit SymMatrix(std::size_t n = 0) : p(n), a(n * n, 0.0L) {}
  Real& operator()(std::size_t i, std::size_t j) { return a[i * p + j]; }
  Real operator()(std::size_t i, std::size_t j) const { return a[i * p + j]; }
};

// Cholesky factor L (lower) of m, or none when m is not numerically positive
// definite (a pivot below relTol times the largest diagonal entry).
std::optional<SymMatrix> cholesky(const SymMatrix& m, Real relTol = 1e-12L);
std::vector<Real> choleskySolve(const SymMatrix& l, std::vector<Real> b);
SymMatrix choleskyInverse(const SymMatrix& l);

}  // namespace budledger::stats::detail
