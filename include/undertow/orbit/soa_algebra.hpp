#pragma once
// An odeint algebra for flat structure-of-arrays batch states (std::vector<double> holding
// x[n], y[n], z[n], ...): each for_each is one contiguous OpenMP simd loop, so the stepper's
// updates vectorise like the force does. Elementwise updates in place are safe for simd.
// (odeint's algebra concept: Boost.Odeint manual, "Algebras and operations".)
#include <cstddef>

namespace undertow::orbit {

struct SoaAlgebra {
  template <class S1, class Op> static void for_each1(S1& s1, Op op) {
    auto* a = s1.data();
    const std::size_t n = s1.size();
#pragma omp simd
    for (std::size_t i = 0; i < n; ++i)
      op(a[i]);
  }
  template <class S1, class S2, class Op> static void for_each2(S1& s1, S2& s2, Op op) {
    auto* a = s1.data();
    auto* b = s2.data();
    const std::size_t n = s1.size();
#pragma omp simd
    for (std::size_t i = 0; i < n; ++i)
      op(a[i], b[i]);
  }
  template <class S1, class S2, class S3, class Op>
  static void for_each3(S1& s1, S2& s2, S3& s3, Op op) {
    auto* a = s1.data();
    auto* b = s2.data();
    auto* c = s3.data();
    const std::size_t n = s1.size();
#pragma omp simd
    for (std::size_t i = 0; i < n; ++i)
      op(a[i], b[i], c[i]);
  }
  template <class S1, class S2, class S3, class S4, class Op>
  static void for_each4(S1& s1, S2& s2, S3& s3, S4& s4, Op op) {
    auto* a = s1.data();
    auto* b = s2.data();
    auto* c = s3.data();
    auto* d = s4.data();
    const std::size_t n = s1.size();
#pragma omp simd
    for (std::size_t i = 0; i < n; ++i)
      op(a[i], b[i], c[i], d[i]);
  }
};

} // namespace undertow::orbit
