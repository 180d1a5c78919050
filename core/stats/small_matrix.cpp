#include "core/stats/small_matrix.h"

#include <cmath>

namespace budledger::stats::detail {

std::optional<SymMatrix> cholesky(const SymMatrix& m, Real relTol) {
  const std::size_t p = m.p;
  Real scale = 0.0L;
  for (std::size_t i = 0; i < p; ++i) scale = std::fmax(scale, std::fabs(m(i, i)));
  if (!(scale > 0.0L)) return std::nullopt;
  SymMatrix l(p);
  for (std::size_t j = 0; j < p; ++j) {
    Real d = m(j, j);
    for (std::size_t k = 0; k < j; ++k) d -= l(j, k) * l(j, k);
    if (!(d > relTol * scale)) return std::nullopt;
    l(j, j) = std::sqrt(d);
    for (std::size_t i = j + 1; i < p; ++i) {
      Real s = m(i, j);
      for (std::size_t k = 0; k < j; ++k) s -= l(i, k) * l(j, k);
      l(i, j) = s / l(j, j);
    }
  }
  return l;
}

std::vector<Real> choleskySolve(const SymMatrix& l, std::vector<Real> b) {
  const std::size_t p = l.p;
  for (std::size_t i = 0; i < p; ++i) {
    for (std::size_t k = 0; k < i; ++k) b[i] -= l(i, k) * b[k];
    b[i] /= l(i, i);
  }
  for (std::size_t i = p; i-- > 0;) {
    for (std::size_t k = i + 1; k < p; ++k) b[i] -= l(k, i) * b[k];
    b[i] /= l(i, i);
  }
  return b;
}

SymMatrix choleskyInverse(const SymMatrix& l) {
  const std::size_t p = l.p;
  SymMatrix inv(p);
  for (std::size_t j = 0; j < p; ++j) {
    std::vector<Real> e(p, 0.0L);
    e[j] = 1.0L;
    auto col = choleskySolve(l, std::move(e));
    for (std::size_t i = 0; i < p; ++i) inv(i, j) = col[i];
  }
  return inv;
}

}  // namespace budledger::stats::detail
